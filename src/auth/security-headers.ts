import type { FastifyReply, FastifyRequest } from 'fastify';

/**
 * Content-Security-Policy for the web UI: it serves its own scripts, styles and fonts, so
 * nothing outside our origin is allowed, no inline script, no framing (OWASP Secure Headers).
 */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  "connect-src 'self'",
  "worker-src 'self' blob:",
  "object-src 'none'",
  "base-uri 'none'",
  "frame-ancestors 'none'",
  "form-action 'self'",
].join('; ');

/** Swagger UI sets inline style attributes; its pages alone get 'unsafe-inline' styles. */
const DOCS_CSP = CONTENT_SECURITY_POLICY.replace(
  "style-src 'self'",
  "style-src 'self' 'unsafe-inline'",
);

const COMMON: Record<string, string> = {
  'x-content-type-options': 'nosniff',
  'x-frame-options': 'DENY',
  'referrer-policy': 'no-referrer',
  'cross-origin-opener-policy': 'same-origin',
  'cross-origin-resource-policy': 'same-origin',
  'permissions-policy': 'camera=(), microphone=(), geolocation=(), payment=(), usb=()',
  'x-dns-prefetch-control': 'off',
  'x-permitted-cross-domain-policies': 'none',
};

/** Sets the security headers on every answer; HSTS only when the request came over TLS. */
export function setSecurityHeaders(request: FastifyRequest, reply: FastifyReply): void {
  const path = request.url;
  reply.headers(COMMON);
  reply.header(
    'content-security-policy',
    path.startsWith('/api/docs') ? DOCS_CSP : CONTENT_SECURITY_POLICY,
  );
  if (request.protocol === 'https') {
    reply.header('strict-transport-security', 'max-age=31536000; includeSubDomains');
  }
  // API answers may carry health information: never stored by browsers or proxies.
  if (path.startsWith('/api/') || path.startsWith('/setup')) {
    reply.header('cache-control', 'no-store');
  }
}
