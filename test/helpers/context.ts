import type { InjectOptions, LightMyRequestResponse } from 'fastify';
import { SESSION_COOKIE, type AuthUser, type Role } from '../../src/auth/auth.js';
import type { AuthOptions } from '../../src/auth/auth.plugin.js';
import { TEST_SCRYPT_PARAMS } from '../../src/auth/password.js';
import { fixedClock, type Clock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { buildApp, type App } from '../../src/server/app.js';

type Inject = (opts: InjectOptions | string) => Promise<LightMyRequestResponse>;

/** A fresh app over a fresh migrated in-memory database, for HTTP tests. */
export interface TestContext {
  app: App;
  db: Db;
  clock: Clock;
  /**
   * app.inject as the signed-in user (a dietitian unless `as` said otherwise): sends the session
   * cookie and the `x-csrf-token` header. Anonymous contexts pass requests through unchanged;
   * use `app.inject` directly to test anonymous access.
   */
  inject: Inject;
  /** The signed-in user (null for `as: 'anonymous'`). */
  user: AuthUser | null;
  /** The session cookie value and CSRF token `inject` sends (null when anonymous). */
  sessionToken: string | null;
  csrfToken: string | null;
  /** Creates another account with a session and returns an `inject` that acts as it. */
  signIn(role: Role, username?: string): Promise<{ user: AuthUser; inject: Inject }>;
  close(): Promise<void>;
}

export interface TestContextOptions {
  db?: Db;
  /** Who `ctx.inject` acts as: 'dietitian' (default), 'admin', or 'anonymous'. */
  as?: Role | 'anonymous';
  /** Session and lock-out policy overrides (password hashing is always cheap in tests). */
  auth?: AuthOptions;
  clock?: Clock;
}

/** Test password for helper-made accounts (invented; never a real credential). */
export const TEST_PASSWORD = 'correct horse battery staple';

function injector(app: App, token: string, csrf: string): Inject {
  return (o) => {
    const opts: InjectOptions = typeof o === 'string' ? { url: o } : o;
    const headers = { ...(opts.headers ?? {}) } as Record<string, string>;
    if (!Object.keys(headers).some((h) => h.toLowerCase() === 'x-csrf-token')) {
      headers['x-csrf-token'] = csrf;
    }
    const cookies = { [SESSION_COOKIE]: token, ...(opts.cookies ?? {}) };
    return app.inject({ ...opts, headers, cookies });
  };
}

export async function createTestContext(opts: TestContextOptions = {}): Promise<TestContext> {
  const db = opts.db ?? (await openMemoryDb());
  const clock = opts.clock ?? fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time
  const app = await buildApp({
    db,
    clock,
    auth: { scryptParams: TEST_SCRYPT_PARAMS, ...opts.auth },
  });
  await app.ready();
  let seq = 0;
  const signIn = async (role: Role, username?: string) => {
    seq += 1;
    const user = await app.auth.createUser(username ?? `test-${role}-${seq}`, role, TEST_PASSWORD);
    const s = await app.auth.openSession(user);
    return {
      user,
      token: s.token,
      csrf: s.session.csrfToken,
      inject: injector(app, s.token, s.session.csrfToken),
    };
  };
  const as = opts.as ?? 'dietitian';
  const main =
    as === 'anonymous' ? null : await signIn(as, as === 'admin' ? 'test-admin' : 'test-dietitian');
  return {
    app,
    db,
    clock,
    inject: main ? main.inject : (o) => app.inject(o as InjectOptions),
    user: main?.user ?? null,
    sessionToken: main?.token ?? null,
    csrfToken: main?.csrf ?? null,
    async signIn(role, username) {
      const s = await signIn(role, username);
      return { user: s.user, inject: s.inject };
    },
    async close() {
      await app.close();
      await db.close();
    },
  };
}
