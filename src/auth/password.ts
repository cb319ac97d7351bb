import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto';
import { dictionary } from '@zxcvbn-ts/language-common';
import { commonPasswordProblem } from './password-rules.js';

/**
 * Passwords seen most often in breach corpuses: the `passwords-common` list of
 * @zxcvbn-ts/language-common 4.1.3 (MIT licence, https://github.com/zxcvbn-ts/zxcvbn), 49,233
 * lower-case entries ranked by frequency. Kept on disk in node_modules: no network look-up.
 */
let commonPasswords: ReadonlySet<string> | undefined;
export function commonPasswordList(): ReadonlySet<string> {
  commonPasswords ??= new Set(dictionary['passwords-common'].map((p) => p.toLowerCase()));
  return commonPasswords;
}

/**
 * Password hashing with scrypt (RFC 7914). Parameters are one of the equivalent minimum sets of
 * the OWASP Password Storage Cheat Sheet (N = 2^17/r 8/p 1, 2^16/8/2, 2^15/8/3, ...): we take
 * N = 2^15, r = 8, p = 3 (the list from memory), which costs the same CPU as 2^17/8/1 with a quarter of the memory
 * (32 MiB per hash instead of 128 MiB; about 0.45 s on the 2-core development machines). They
 * are stored with each hash, so raising them later breaks nothing: old hashes still verify and
 * are upgraded at the next sign-in.
 */
export interface ScryptParams {
  /** CPU/memory cost, a power of two. */
  N: number;
  /** Block size. */
  r: number;
  /** Parallelisation. */
  p: number;
}

export const DEFAULT_SCRYPT_PARAMS: ScryptParams = Object.freeze({ N: 2 ** 15, r: 8, p: 3 });

/** Cheap parameters for tests only (a test cannot wait 0.8 s per account). */
export const TEST_SCRYPT_PARAMS: ScryptParams = Object.freeze({ N: 2 ** 10, r: 8, p: 1 });

const SALT_BYTES = 16;
const KEY_BYTES = 32;
/** NIST SP 800-63B 5.1.1.2: at least 8 characters (from memory); we ask for 12 (common practice, no source). */
export const MIN_PASSWORD_LENGTH = 12;
/** Upper bound so a huge body cannot tie the CPU up (SP 800-63B allows capping at 64+). */
export const MAX_PASSWORD_LENGTH = 256;

function derive(password: string, salt: Buffer, params: ScryptParams): Promise<Buffer> {
  const options: ScryptOptions = {
    N: params.N,
    r: params.r,
    p: params.p,
    // scrypt needs 128 * N * r bytes; leave headroom above it.
    maxmem: 256 * params.N * params.r + 1024 * 1024,
  };
  return new Promise((resolve, reject) => {
    scrypt(password.normalize('NFC'), salt, KEY_BYTES, options, (err, key) =>
      err ? reject(err) : resolve(key),
    );
  });
}

/** Hashes a password: "scrypt$N$r$p$salt$hash" with base64url salt and hash. */
export async function hashPassword(
  password: string,
  params: ScryptParams = DEFAULT_SCRYPT_PARAMS,
): Promise<string> {
  const salt = randomBytes(SALT_BYTES);
  const key = await derive(password, salt, params);
  return [
    'scrypt',
    params.N,
    params.r,
    params.p,
    salt.toString('base64url'),
    key.toString('base64url'),
  ].join('$');
}

interface ParsedHash {
  params: ScryptParams;
  salt: Buffer;
  key: Buffer;
}

function parseHash(stored: string): ParsedHash | null {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return null;
  const [N, r, p] = parts.slice(1, 4).map(Number) as [number, number, number];
  if (![N, r, p].every((n) => Number.isInteger(n) && n > 0)) return null;
  if (N > 2 ** 20 || r > 32 || p > 16) return null; // refuse parameters that would exhaust memory
  const salt = Buffer.from(parts[4] ?? '', 'base64url');
  const key = Buffer.from(parts[5] ?? '', 'base64url');
  if (salt.length < 8 || key.length !== KEY_BYTES) return null;
  return { params: { N, r, p }, salt, key };
}

/** True when the password matches the stored hash; constant-time comparison. */
export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parsed = parseHash(stored);
  if (!parsed) return false;
  const key = await derive(password, parsed.salt, parsed.params);
  return timingSafeEqual(key, parsed.key);
}

/** True when the stored hash uses weaker parameters than the given ones. */
export function needsRehash(stored: string, params: ScryptParams = DEFAULT_SCRYPT_PARAMS): boolean {
  const parsed = parseHash(stored);
  if (!parsed) return true;
  return parsed.params.N < params.N || parsed.params.r < params.r || parsed.params.p < params.p;
}

/**
 * Why a new password is refused, or null when it is acceptable: the length rule, the username,
 * then the NIST SP 800-63B 5.1.1.2 checks (breached and common passwords, trivial patterns).
 */
export function passwordProblem(password: string, username: string): string | null {
  const length = [...password].length;
  if (length < MIN_PASSWORD_LENGTH)
    return `password must be at least ${MIN_PASSWORD_LENGTH} characters`;
  if (length > MAX_PASSWORD_LENGTH)
    return `password must be at most ${MAX_PASSWORD_LENGTH} characters`;
  if (password.toLowerCase().includes(username.toLowerCase()))
    return 'password must not contain the username';
  return commonPasswordProblem(password, commonPasswordList());
}
