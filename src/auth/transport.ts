import { readFileSync } from 'node:fs';
import type { FastifyInstance } from 'fastify';
import { isLoopbackAddress } from './addresses.js';
import { announceSetup } from './setup-link.js';

export interface TlsFiles {
  tlsCert?: string | undefined;
  tlsKey?: string | undefined;
}

/** Reads the PEM certificate and key for HTTPS; both or neither must be given. */
export function loadTls(files: TlsFiles): { cert: Buffer; key: Buffer } | undefined {
  if (!files.tlsCert && !files.tlsKey) return undefined;
  if (!files.tlsCert || !files.tlsKey) throw new Error('--tls-cert and --tls-key go together');
  const read = (what: string, file: string) => {
    try {
      return readFileSync(file);
    } catch (err) {
      throw new Error(`cannot read the TLS ${what} ${file}: ${(err as Error).message}`);
    }
  };
  return { cert: read('certificate', files.tlsCert), key: read('key', files.tlsKey) };
}

/** True for addresses only this machine can reach. */
export function isLoopback(host: string): boolean {
  return isLoopbackAddress(host);
}

/**
 * The warning printed when the server would carry health information over plain HTTP beyond
 * this machine (45 CFR 164.312(e)(1) transmission security), or null when there is none.
 */
export function exposureWarning(host: string, tls: boolean): string | null {
  if (tls || isLoopback(host)) return null;
  return [
    `WARNING: listening on ${host} without TLS. Patient data and passwords would cross the`,
    'network unencrypted. Either start with --tls-cert <cert.pem> --tls-key <key.pem>, or keep',
    'the default --host 127.0.0.1 and put a TLS proxy in front (for example a Caddy or nginx',
    'site that terminates HTTPS and forwards to http://127.0.0.1:8080) and set',
    'PHOSLEDGER_TRUST_PROXY=1 so cookies are marked Secure and sign-in limits see real addresses.',
  ].join('\n');
}

/** After listening: tidy expired sessions and, while no admin exists, print the set-up link. */
export async function afterListen(
  app: FastifyInstance,
  address: string,
  out: NodeJS.WritableStream,
): Promise<void> {
  await app.auth.purgeExpiredSessions();
  await announceSetup(app.auth, address, out);
}

/**
 * PHOSLEDGER_TRUST_PROXY=1: a TLS proxy on this machine forwards to us; believe its
 * X-Forwarded-For/-Proto (from loopback only), so cookies get Secure and throttling sees the
 * client's address.
 */
export function trustProxyFromEnv(env: NodeJS.ProcessEnv): boolean {
  const v = env.PHOSLEDGER_TRUST_PROXY;
  if (v === undefined || v === '' || v === '0' || v === 'false') return false;
  if (v === '1' || v === 'true') return true;
  throw new Error('invalid environment variable PHOSLEDGER_TRUST_PROXY: use 1 or 0');
}

/**
 * What the proxy setting does, printed at every start: sign-in limits per address and Secure
 * cookies depend on it, and a wrong setting either locks everyone together or lets a client
 * claim any address.
 */
export function proxyNotice(trustProxy: boolean): string {
  return trustProxy
    ? [
        'PHOSLEDGER_TRUST_PROXY=1: X-Forwarded-For and X-Forwarded-Proto are believed from',
        '127.0.0.1 and ::1 only (the TLS proxy on this machine). Sign-in limits per address see the',
        "clients' own addresses; cookies are Secure when the proxy says the request came over HTTPS.",
      ].join('\n')
    : [
        'PHOSLEDGER_TRUST_PROXY is off: each client is known by its connection address. Behind a',
        'proxy every client would look like 127.0.0.1, so loopback addresses get no per-address',
        'sign-in limit (per-account back-off still applies). With a TLS proxy on this machine, set',
        'PHOSLEDGER_TRUST_PROXY=1. A locked account: phosledger users unlock <name>.',
      ].join('\n');
}
