import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';

/** A fresh unguessable token: 32 random bytes (256 bits) as base64url. */
export function newToken(): string {
  return randomBytes(32).toString('base64url');
}

/** SHA-256 of a token, hex: what the database keeps instead of the token. */
export function tokenHash(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** Constant-time string comparison (false on different lengths). */
export function sameSecret(a: string, b: string): boolean {
  const x = Buffer.from(a, 'utf8');
  const y = Buffer.from(b, 'utf8');
  return x.length === y.length && timingSafeEqual(x, y);
}
