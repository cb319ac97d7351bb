import cookie from '@fastify/cookie';
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError } from '../errors.js';
import {
  CSRF_HEADER,
  DEFAULT_AUTH_POLICY,
  HOST_COOKIE_PREFIX,
  SESSION_COOKIE,
  type AuthPolicy,
  type AuthUser,
  type Role,
} from './auth.js';
import { AuthService, type ActiveSession } from './auth.service.js';
import { DEFAULT_SCRYPT_PARAMS, type ScryptParams } from './password.js';
import { setSecurityHeaders } from './security-headers.js';
import { sameSecret } from './tokens.js';

declare module 'fastify' {
  interface FastifyRequest {
    /** The signed-in user, or null on public routes answered anonymously. */
    user: AuthUser | null;
    /** The session behind the cookie (never the token itself). */
    authSession: ActiveSession | null;
  }
  interface FastifyContextConfig {
    /** Only users with this role may call the route (403 otherwise). */
    role?: Role;
  }
  interface FastifyInstance {
    auth: AuthService;
    /** Every route registered after accounts were installed (for the route inventory). */
    routeInventory: RouteInfo[];
  }
}

export interface AuthOptions {
  policy?: Partial<AuthPolicy>;
  /** Password hashing cost; tests pass TEST_SCRYPT_PARAMS. */
  scryptParams?: ScryptParams;
}

/** One registered route as the inventory sees it. */
export interface RouteInfo {
  method: string;
  url: string;
  public: boolean;
  role: Role | null;
  /** The audit action of `config.audit`, or null when the route declares none. */
  audit: string | null;
  /** The route's own body limit in bytes, or null when it keeps the server's default. */
  bodyLimit: number | null;
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function secureCookie(request: FastifyRequest, policy: AuthPolicy): boolean {
  return policy.secureCookies === 'always' || request.protocol === 'https';
}

export function sessionCookieOptions(request: FastifyRequest, policy: AuthPolicy) {
  return {
    path: '/',
    httpOnly: true,
    sameSite: 'strict' as const,
    secure: secureCookie(request, policy),
  };
}

/**
 * The session cookie's name: over TLS `__Host-phl_session` (RFC 6265bis 4.1.3.2: the browser
 * keeps it only when Secure, Path=/ and without Domain, so a neighbouring host or a plain-http
 * page cannot plant or overwrite it); `phl_session` on plain http to 127.0.0.1.
 */
export function sessionCookieName(request: FastifyRequest, policy: AuthPolicy): string {
  return secureCookie(request, policy) ? `${HOST_COOKIE_PREFIX}${SESSION_COOKIE}` : SESSION_COOKIE;
}

/** Sets the session cookie under the name the request's transport calls for. */
export function setSessionCookie(
  request: FastifyRequest,
  reply: FastifyReply,
  policy: AuthPolicy,
  token: string,
) {
  reply.setCookie(sessionCookieName(request, policy), token, sessionCookieOptions(request, policy));
}

export function clearSessionCookie(
  request: FastifyRequest,
  reply: FastifyReply,
  policy: AuthPolicy,
) {
  reply.clearCookie(sessionCookieName(request, policy), sessionCookieOptions(request, policy));
}

/** Rejects state-changing requests that a browser sent from another site (login CSRF too). */
function checkOrigin(request: FastifyRequest): void {
  const site = request.headers['sec-fetch-site'];
  if (site === 'cross-site' || site === 'same-site') {
    throw new AppError('PHL_AUTH_CROSS_SITE', 403, 'cross-site requests are refused');
  }
  const origin = request.headers.origin;
  if (origin === undefined) return;
  let host: string | null = null;
  try {
    host = origin === 'null' ? null : new URL(origin).host;
  } catch {
    host = null;
  }
  // request.host is the Host header, or X-Forwarded-Host behind a trusted proxy
  if (host === null || host !== request.host) {
    throw new AppError('PHL_AUTH_CROSS_SITE', 403, 'cross-site requests are refused');
  }
}

/**
 * Installs accounts on the root instance: cookies, `request.user`, the global hook that answers
 * 401 on every route without `config.public`, CSRF checks, role checks and security headers.
 */
export async function registerAuth(
  app: FastifyInstance,
  deps: { db: Db; clock: Clock } & AuthOptions,
): Promise<AuthService> {
  const policy: AuthPolicy = { ...DEFAULT_AUTH_POLICY, ...deps.policy };
  const service = new AuthService(
    deps.db,
    deps.clock,
    policy,
    deps.scryptParams ?? DEFAULT_SCRYPT_PARAMS,
  );
  await app.register(cookie);
  app.decorate('auth', service);
  app.decorateRequest('user', null);
  app.decorateRequest('authSession', null);
  const inventory: RouteInfo[] = [];
  app.decorate('routeInventory', inventory);
  app.addHook('onRoute', (route) => {
    const methods = Array.isArray(route.method) ? route.method : [route.method];
    const config = route.config as
      { public?: boolean; role?: Role; audit?: { action?: string } } | undefined;
    for (const method of methods) {
      inventory.push({
        method,
        url: route.url,
        public: config?.public === true,
        role: config?.role ?? null,
        audit: config?.audit?.action ?? null,
        bodyLimit: route.bodyLimit ?? null,
      });
    }
  });

  app.addHook('onRequest', async (request, reply) => {
    setSecurityHeaders(request, reply);
    const config = request.routeOptions.config;
    // Unknown routes answer 404 whoever asks: nothing behind them to protect.
    const isPublic =
      config?.public === true ||
      request.is404 ||
      (request.url.startsWith('/api/docs') && (await service.docsPublic()));
    const unsafe = !SAFE_METHODS.has(request.method);
    if (unsafe) checkOrigin(request);

    // Public page shells and assets never look at the user: spare them the session lookup.
    if (isPublic && !unsafe && !request.url.startsWith('/api/')) return;
    // Over TLS only the __Host- cookie counts: a plain one may have been planted.
    const token = request.cookies[sessionCookieName(request, policy)];
    if (token) {
      const found = await service.authenticate(token);
      if (found) {
        request.user = found.user;
        request.authSession = found.session;
      } else {
        clearSessionCookie(request, reply, policy);
      }
    }
    if (!request.user) {
      if (isPublic) return;
      throw new AppError('PHL_AUTH_REQUIRED', 401, 'sign in first');
    }
    // OWASP CSRF cheat sheet: a per-session synchronizer token in a custom header.
    if (unsafe) {
      const sent = request.headers[CSRF_HEADER];
      if (typeof sent !== 'string' || !sameSecret(sent, request.authSession!.csrfToken)) {
        throw new AppError(
          'PHL_AUTH_CSRF',
          403,
          `missing or wrong ${CSRF_HEADER} header (get it from GET /api/session)`,
        );
      }
    }
    if (config?.role && request.user.role !== config.role) {
      throw new AppError('PHL_AUTH_FORBIDDEN', 403, `this needs the ${config.role} role`);
    }
  });
  return service;
}
