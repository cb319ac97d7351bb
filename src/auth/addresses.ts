/** True for addresses only this machine can reach (IPv4 127/8, ::1, and either as IPv4-mapped IPv6). */
export function isLoopbackAddress(address: string): boolean {
  const a = address.replace(/^\[|\]$/g, '').toLowerCase();
  const v4 = a.startsWith('::ffff:') ? a.slice(7) : a;
  return a === 'localhost' || a === '::1' || /^127\.\d+\.\d+\.\d+$/.test(v4);
}
