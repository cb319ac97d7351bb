/**
 * Request body limits. Fastify reads a whole JSON or form body into memory before validation,
 * so the limit is what one request can make the server hold: eight parallel 60 MB posts once
 * took the heap from 195 MB to 1 GB. A body over its route's limit is answered 413 from its
 * Content-Length alone (or as soon as a chunked body passes it), before anything is parsed.
 */

/** Every route unless it says otherwise: a plan or patient record is a few kB (common practice, no source). */
export const DEFAULT_BODY_LIMIT_BYTES = 1024 * 1024;

/**
 * Routes anyone can call without a session (sign-in, first-run set-up) and password change: a
 * username, a password of at most 256 characters and a token fit in well under 8 KiB.
 */
export const PUBLIC_AUTH_BODY_LIMIT_BYTES = 8 * 1024;
