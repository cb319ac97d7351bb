import { z } from 'zod';
import { MAX_PASSWORD_LENGTH } from './password.js';

export const ROLES = ['admin', 'dietitian'] as const;
export type Role = (typeof ROLES)[number];
export const roleSchema = z.enum(ROLES);

/** The signed-in user as routes see it (`request.user`). */
export interface AuthUser {
  id: number;
  username: string;
  role: Role;
}

/** Lower-case letters, digits and . _ - ; 2-64 characters. Stored lower-cased. */
export const usernameSchema = z
  .string()
  .trim()
  .toLowerCase()
  .regex(/^[a-z0-9][a-z0-9._-]{1,63}$/, 'use 2-64 letters, digits, dot, dash or underscore');

export const signInBodySchema = z.object({
  username: z.string().min(1).max(64),
  password: z.string().min(1).max(MAX_PASSWORD_LENGTH),
});
export type SignInBody = z.infer<typeof signInBodySchema>;

export const userJsonSchema = z.object({
  id: z.number().int(),
  username: z.string(),
  role: roleSchema,
});

/** How long sessions live and how sign-in failures are throttled. */
export interface AuthPolicy {
  /** Session ends after this much inactivity (OWASP ASVS 4.0.3 V3.3.2, level 2: 30 min; from memory). */
  idleTimeoutMs: number;
  /** Session ends this long after sign-in whatever happens (ASVS V3.3.2, level 2: 12 h; from memory). */
  absoluteTimeoutMs: number;
  /** Consecutive failures on one username before back-off starts (ASVS V2.2.1 anti-automation; from memory). */
  userFailureLimit: number;
  /** First lock of a username at the limit; each further failure doubles it up to the cap. */
  userLockoutMs: number;
  /** Longest lock of a username: the only admin is never locked out for longer than this. */
  userLockoutMaxMs: number;
  /** A username's failures are forgotten this long after its last failure (or at a good sign-in). */
  userFailureWindowMs: number;
  /**
   * Failures from one address within the window before the address is locked. Loopback
   * addresses are not counted: behind a proxy every client looks like 127.0.0.1.
   */
  addressFailureLimit: number;
  /** Window over which an address's failures are counted, and length of its lock. */
  failureWindowMs: number;
  lockoutMs: number;
  /** Wrong current passwords on password change (counted with sign-in failures) that end the session. */
  passwordChangeFailureLimit: number;
  /** How old `last_seen_at` may get before a request writes it again (limits writes). */
  touchIntervalMs: number;
  /** Validity of the first-run set-up link. */
  setupTokenTtlMs: number;
  /**
   * 'auto': cookies are Secure when the request came over TLS (the loopback exception: plain
   * http on 127.0.0.1 keeps working); 'always': always Secure (behind a TLS proxy).
   */
  secureCookies: 'auto' | 'always';
}

const MINUTE = 60_000;
export const DEFAULT_AUTH_POLICY: AuthPolicy = Object.freeze({
  idleTimeoutMs: 30 * MINUTE,
  absoluteTimeoutMs: 12 * 60 * MINUTE,
  userFailureLimit: 5, // common practice, no source (ASVS asks for < 100 per hour)
  // 1, 2, 4, 8 then 15 min: at most 4 + ~4 guesses an hour (common practice, no source)
  userLockoutMs: MINUTE,
  userLockoutMaxMs: 15 * MINUTE,
  userFailureWindowMs: 60 * MINUTE,
  addressFailureLimit: 30, // common practice, no source
  failureWindowMs: 15 * MINUTE,
  lockoutMs: 15 * MINUTE,
  passwordChangeFailureLimit: 3, // common practice, no source
  touchIntervalMs: MINUTE,
  setupTokenTtlMs: 24 * 60 * MINUTE,
  secureCookies: 'auto',
});

export const SESSION_COOKIE = 'phl_session';
/** Cookie-name prefix browsers enforce Secure, Path=/ and no Domain for (RFC 6265bis). */
export const HOST_COOKIE_PREFIX = '__Host-';
export const CSRF_HEADER = 'x-csrf-token';
