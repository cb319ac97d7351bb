import { afterEach, describe, expect, it } from 'vitest';
import type { LightMyRequestResponse } from 'fastify';
import type { Clock } from '../../src/clock.js';
import { createTestContext, TEST_PASSWORD, type TestContext } from '../helpers/context.js';

/** A clock the test moves by hand (start time invented). */
function movableClock(iso = '2026-03-05T09:30:00Z') {
  let t = Date.parse(iso);
  const clock: Clock & { advance(ms: number): void } = {
    now: () => new Date(t),
    advance: (ms) => {
      t += ms;
    },
  };
  return clock;
}

const MIN = 60_000;

function sessionCookie(res: LightMyRequestResponse): string {
  const c = res.cookies.find((x) => x.name === 'phl_session');
  if (!c) throw new Error('no session cookie set');
  return c.value;
}

describe('sessions over app.inject with real cookies (OWASP ASVS 4.0.3 V3)', () => {
  let ctx: TestContext;
  afterEach(async () => ctx.close());

  async function signIn(username: string, password: string) {
    return ctx.app.inject({ method: 'POST', url: '/api/session', payload: { username, password } });
  }

  it('answers 401 without a session and signs in, reads, and signs out with cookie + CSRF', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('Dana', 'dietitian', TEST_PASSWORD);

    const anon = await ctx.app.inject({ method: 'GET', url: '/api/foods?q=milk' });
    expect(anon.statusCode).toBe(401);
    expect(anon.json().error.code).toBe('PHL_AUTH_REQUIRED');

    const res = await signIn('dana', TEST_PASSWORD);
    expect(res.statusCode).toBe(200);
    const setCookie = String(res.headers['set-cookie']);
    expect(setCookie).toMatch(/phl_session=[\w-]{43}/);
    expect(setCookie).toMatch(/HttpOnly/);
    expect(setCookie).toMatch(/SameSite=Strict/);
    expect(setCookie).toMatch(/Path=\//);
    expect(setCookie).not.toMatch(/Secure/); // plain http on loopback: the documented exception
    const body = res.json();
    expect(body.user).toEqual({ id: expect.any(Number), username: 'dana', role: 'dietitian' });
    const token = sessionCookie(res);

    const me = await ctx.app.inject({
      method: 'GET',
      url: '/api/session',
      cookies: { phl_session: token },
    });
    expect(me.statusCode).toBe(200);
    expect(me.json().user.username).toBe('dana');
    expect(me.json().csrfToken).toBe(body.csrfToken);
    expect(me.json().csrfToken).toMatch(/^[\w-]{43}$/);

    const read = await ctx.app.inject({
      method: 'GET',
      url: '/api/foods?q=milk',
      cookies: { phl_session: token },
    });
    expect(read.statusCode).toBe(200);

    const noCsrf = await ctx.app.inject({
      method: 'DELETE',
      url: '/api/session',
      cookies: { phl_session: token },
    });
    expect(noCsrf.statusCode).toBe(403);
    expect(noCsrf.json().error.code).toBe('PHL_AUTH_CSRF');

    // The token with its last character changed (to one it is not: 'A' would be no change for a
    // token that already ends in 'A', one time in 64).
    const last = body.csrfToken.slice(-1) === 'A' ? 'B' : 'A';
    const wrongCsrf = await ctx.app.inject({
      method: 'DELETE',
      url: '/api/session',
      cookies: { phl_session: token },
      headers: { 'x-csrf-token': `${body.csrfToken.slice(0, -1)}${last}` },
    });
    expect(wrongCsrf.statusCode).toBe(403);

    const out = await ctx.app.inject({
      method: 'DELETE',
      url: '/api/session',
      cookies: { phl_session: token },
      headers: { 'x-csrf-token': body.csrfToken },
    });
    expect(out.statusCode).toBe(200);
    expect(String(out.headers['set-cookie'])).toMatch(/phl_session=;/);

    const after = await ctx.app.inject({
      method: 'GET',
      url: '/api/session',
      cookies: { phl_session: token },
    });
    expect(after.statusCode).toBe(401);
  });

  it('stores only a hash of the session token', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const token = sessionCookie(await signIn('dana', TEST_PASSWORD));
    const dump = JSON.stringify(ctx.db.sqlite.prepare('SELECT * FROM app_session').all());
    expect(dump).not.toContain(token);
    const audit = JSON.stringify(ctx.db.sqlite.prepare('SELECT * FROM audit_event').all());
    expect(audit).not.toContain(token);
    expect(audit).not.toContain(TEST_PASSWORD);
  });

  it('gives the same answer for an unknown user and a wrong password', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const unknown = await signIn('nobody', TEST_PASSWORD);
    const wrong = await signIn('dana', 'not the password at all');
    expect(unknown.statusCode).toBe(401);
    expect(wrong.statusCode).toBe(401);
    expect(unknown.json()).toEqual(wrong.json());
    expect(wrong.json().error.code).toBe('PHL_AUTH_INVALID_CREDENTIALS');
  });

  it('backs a username off after 5 failures: 1, 2, 4 ... up to 15 minutes, then lets the right password in', async () => {
    const clock = movableClock();
    ctx = await createTestContext({ as: 'anonymous', clock });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    // policy: 5 free failures, then 1 min doubling per failure up to 15 min (common practice, no source)
    for (let i = 0; i < 5; i++) {
      expect((await signIn('dana', `wrong password ${i}`)).statusCode).toBe(401);
    }
    const locked = await signIn('dana', TEST_PASSWORD);
    expect(locked.statusCode).toBe(429);
    expect(locked.json().error.code).toBe('PHL_AUTH_LOCKED');
    expect(locked.headers['retry-after']).toBe('60'); // 1 min * 60 s
    // each further failure after a lock doubles it: 2, 4, 8, then capped at 15 min
    for (const lockS of [120, 240, 480, 900, 900]) {
      clock.advance(15 * MIN);
      expect((await signIn('dana', 'still guessing')).statusCode).toBe(401);
      const again = await signIn('dana', TEST_PASSWORD);
      expect(again.statusCode).toBe(429);
      expect(again.headers['retry-after']).toBe(String(lockS));
    }
    // however long the guessing went on, the owner gets in once the (at most 15 min) lock passes
    clock.advance(15 * MIN);
    expect((await signIn('dana', TEST_PASSWORD)).statusCode).toBe(200);
  });

  it('locks unknown usernames the same way (lock-out does not reveal accounts)', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    for (let i = 0; i < 5; i++) await signIn('ghost', `wrong password ${i}`);
    expect((await signIn('ghost', TEST_PASSWORD)).statusCode).toBe(429);
  });

  it('locks an address after 30 failures across usernames', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const from = (username: string, password: string) =>
      ctx.app.inject({
        method: 'POST',
        url: '/api/session',
        payload: { username, password },
        remoteAddress: '192.0.2.7', // RFC 5737 documentation address
      });
    for (let i = 0; i < 30; i++) await from(`someone-${i}`, 'wrong password');
    const res = await from('dana', TEST_PASSWORD);
    expect(res.statusCode).toBe(429);
  });

  it('does not let a burst of parallel guesses outrun the lock-out counter', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const results = await Promise.all(
      Array.from({ length: 20 }, (_, i) => signIn('dana', `guess ${i}`)),
    );
    const checked = results.filter((r) => r.statusCode === 401).length;
    expect(checked).toBeLessThanOrEqual(5);
    expect(results.filter((r) => r.statusCode === 429).length).toBe(20 - checked);
  });

  it('ends a session after 30 minutes idle (ASVS V3.3.2 level 2)', async () => {
    const clock = movableClock();
    ctx = await createTestContext({ clock });
    expect((await ctx.inject({ method: 'GET', url: '/api/session' })).statusCode).toBe(200);
    clock.advance(29 * MIN);
    expect((await ctx.inject({ method: 'GET', url: '/api/session' })).statusCode).toBe(200);
    clock.advance(29 * MIN); // 29 min after the last request: still alive
    expect((await ctx.inject({ method: 'GET', url: '/api/session' })).statusCode).toBe(200);
    clock.advance(30 * MIN);
    const res = await ctx.inject({ method: 'GET', url: '/api/session' });
    expect(res.statusCode).toBe(401);
    expect(String(res.headers['set-cookie'])).toMatch(/phl_session=;/);
  });

  it('ends a session 12 hours after sign-in however busy (ASVS V3.3.2 level 2)', async () => {
    const clock = movableClock();
    ctx = await createTestContext({ clock });
    // 12 h = 720 min; a request every 20 min keeps it from idling out
    for (let m = 20; m < 720; m += 20) {
      clock.advance(20 * MIN);
      expect((await ctx.inject({ method: 'GET', url: '/api/session' })).statusCode).toBe(200);
    }
    clock.advance(20 * MIN); // now 720 min after sign-in
    expect((await ctx.inject({ method: 'GET', url: '/api/session' })).statusCode).toBe(401);
  });

  it('signs out everywhere', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const a = await signIn('dana', TEST_PASSWORD);
    const b = await signIn('dana', TEST_PASSWORD);
    const [ta, tb] = [sessionCookie(a), sessionCookie(b)];
    const res = await ctx.app.inject({
      method: 'DELETE',
      url: '/api/sessions',
      cookies: { phl_session: ta },
      headers: { 'x-csrf-token': a.json().csrfToken },
    });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual({ signedOut: 2 });
    for (const t of [ta, tb]) {
      const r = await ctx.app.inject({ url: '/api/session', cookies: { phl_session: t } });
      expect(r.statusCode).toBe(401);
    }
  });

  it('refuses a disabled account at once, including its open sessions', async () => {
    ctx = await createTestContext({ as: 'admin' });
    const other = await ctx.signIn('dietitian', 'sam');
    expect((await other.inject('/api/session')).statusCode).toBe(200);
    const res = await ctx.inject({
      method: 'PATCH',
      url: `/api/admin/users/${other.user.id}`,
      payload: { disabled: true },
    });
    expect(res.statusCode).toBe(200);
    expect(res.json().disabled).toBe(true);
    expect((await other.inject('/api/session')).statusCode).toBe(401);
    expect((await signIn('sam', TEST_PASSWORD)).statusCode).toBe(401);
  });

  it('keeps the admin routes to admins', async () => {
    ctx = await createTestContext();
    const res = await ctx.inject('/api/admin/users');
    expect(res.statusCode).toBe(403);
    expect(res.json().error.code).toBe('PHL_AUTH_FORBIDDEN');
    const admin = await ctx.signIn('admin');
    const ok = await admin.inject('/api/admin/users');
    expect(ok.statusCode).toBe(200);
    expect(ok.json().map((u: { username: string }) => u.username)).toContain('test-dietitian');
  });

  it('refuses the last admin removing their own role', async () => {
    ctx = await createTestContext({ as: 'admin' });
    const res = await ctx.inject({
      method: 'PATCH',
      url: `/api/admin/users/${ctx.user!.id}`,
      payload: { role: 'dietitian' },
    });
    expect(res.statusCode).toBe(409);
    expect(res.json().error.code).toBe('PHL_AUTH_LAST_ADMIN');
  });

  it('refuses state-changing requests from another site, even sign-in', async () => {
    ctx = await createTestContext();
    const cross = await ctx.inject({
      method: 'DELETE',
      url: '/api/session',
      headers: { origin: 'https://evil.example', host: 'localhost:8080' },
    });
    expect(cross.statusCode).toBe(403);
    expect(cross.json().error.code).toBe('PHL_AUTH_CROSS_SITE');
    const login = await ctx.app.inject({
      method: 'POST',
      url: '/api/session',
      headers: { 'sec-fetch-site': 'cross-site' },
      payload: { username: 'x', password: 'y' },
    });
    expect(login.statusCode).toBe(403);
    const same = await ctx.inject({
      method: 'DELETE',
      url: '/api/session',
      headers: { origin: 'http://localhost:8080', host: 'localhost:8080' },
    });
    expect(same.statusCode).toBe(200);
  });

  it('sets the security headers on every answer, 401 and 404 included', async () => {
    ctx = await createTestContext();
    for (const res of [
      await ctx.inject('/api/session'),
      await ctx.app.inject('/api/session'),
      await ctx.app.inject('/api/nope'),
    ]) {
      expect(res.headers['content-security-policy']).toBe(
        "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data: blob:; " +
          "font-src 'self'; connect-src 'self'; worker-src 'self' blob:; object-src 'none'; " +
          "base-uri 'none'; frame-ancestors 'none'; form-action 'self'",
      );
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['x-frame-options']).toBe('DENY');
      expect(res.headers['referrer-policy']).toBe('no-referrer');
      expect(res.headers['cache-control']).toBe('no-store');
      expect(res.headers['strict-transport-security']).toBeUndefined(); // only over TLS
    }
  });

  it('changes the password and ends the other sessions', async () => {
    ctx = await createTestContext();
    const second = await ctx.app.auth.openSession(ctx.user!);
    const res = await ctx.inject({
      method: 'PUT',
      url: '/api/session/password',
      payload: { currentPassword: TEST_PASSWORD, newPassword: 'a much longer new secret' },
    });
    expect(res.statusCode).toBe(200);
    const old = await ctx.app.inject({
      url: '/api/session',
      cookies: { phl_session: second.token },
    });
    expect(old.statusCode).toBe(401);
    expect((await signIn('test-dietitian', 'a much longer new secret')).statusCode).toBe(200);
  });

  it('records sign-ins in the audit log without the password', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    await signIn('dana', 'wrong password here');
    await signIn('dana', TEST_PASSWORD);
    const rows = ctx.db.sqlite
      .prepare('SELECT username, action, outcome FROM audit_event ORDER BY id')
      .all();
    expect(rows).toEqual([
      { username: null, action: 'session.sign-in', outcome: 'denied' },
      { username: 'dana', action: 'session.sign-in', outcome: 'ok' },
    ]);
  });
});

describe('API docs only public when the admin allows it', () => {
  let ctx: TestContext;
  afterEach(async () => ctx.close());

  it('answers 401 on /api/docs until the admin opens it, and 403 to a dietitian trying', async () => {
    ctx = await createTestContext({ as: 'admin' });
    expect((await ctx.app.inject('/api/docs/json')).statusCode).toBe(401);
    expect((await ctx.inject('/api/docs/json')).statusCode).toBe(200);
    const dietitian = await ctx.signIn('dietitian');
    const refused = await dietitian.inject({
      method: 'PUT',
      url: '/api/admin/docs-access',
      payload: { public: true },
    });
    expect(refused.statusCode).toBe(403);
    const opened = await ctx.inject({
      method: 'PUT',
      url: '/api/admin/docs-access',
      payload: { public: true },
    });
    expect(opened.json()).toEqual({ public: true });
    const spec = await ctx.app.inject('/api/docs/json');
    expect(spec.statusCode).toBe(200);
    expect(spec.json().openapi).toMatch(/^3\./);
    // still nothing else opens with it
    expect((await ctx.app.inject('/api/foods?q=milk')).statusCode).toBe(401);
    await ctx.inject({ method: 'PUT', url: '/api/admin/docs-access', payload: { public: false } });
    expect((await ctx.app.inject('/api/docs/json')).statusCode).toBe(401);
  });
});

describe('behind a TLS proxy on loopback (PHOSLEDGER_TRUST_PROXY=1)', () => {
  it('marks the cookie Secure from X-Forwarded-Proto and accepts the public origin', async () => {
    const { buildApp } = await import('../../src/server/app.js');
    const { openMemoryDb } = await import('../../src/db/database.js');
    const { TEST_SCRYPT_PARAMS } = await import('../../src/auth/password.js');
    const { fixedClock } = await import('../../src/clock.js');
    const db = await openMemoryDb();
    const app = await buildApp({
      db,
      clock: fixedClock('2026-03-05T09:30:00Z'), // invented fixed time
      trustProxy: true,
      auth: { scryptParams: TEST_SCRYPT_PARAMS },
    });
    try {
      await app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
      const res = await app.inject({
        method: 'POST',
        url: '/api/session',
        headers: {
          'x-forwarded-proto': 'https',
          'x-forwarded-host': 'clinic.example',
          origin: 'https://clinic.example',
          'sec-fetch-site': 'same-origin',
        },
        payload: { username: 'dana', password: TEST_PASSWORD },
      });
      expect(res.statusCode).toBe(200);
      expect(String(res.headers['set-cookie'])).toMatch(/; Secure/);
      expect(res.headers['strict-transport-security']).toMatch(/max-age=31536000/);
    } finally {
      await app.close();
      await db.close();
    }
  });
});
