// Attacks on the running server, each repeated here. Sources: OWASP ASVS 4.0.3 (V2.2.1
// anti-automation, V3.4 cookies, V13.1.3 body limits; from memory), NIST SP 800-63B section
// 5.1.1.2 (memorized secrets), OWASP "CSV Injection", RFC 6265bis 4.1.3.2 (__Host- prefix).
import { mkdtempSync, rmSync } from 'node:fs';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough, Readable } from 'node:stream';
import { afterEach, describe, expect, it } from 'vitest';
import { csvCell } from '../../src/audit/audit.service.js';
import { TEST_SCRYPT_PARAMS, passwordProblem } from '../../src/auth/password.js';
import { isRepetition, isTrivialSequence } from '../../src/auth/password-rules.js';
import { proxyNotice } from '../../src/auth/transport.js';
import { runCli } from '../../src/cli/main.js';
import { fixedClock, type Clock } from '../../src/clock.js';
import { migrateToLatest, openDb, openMemoryDb } from '../../src/db/database.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { buildApp, type App } from '../../src/server/app.js';
import { createTestContext, TEST_PASSWORD, type TestContext } from '../helpers/context.js';

const MIN = 60_000;

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

let ctx: TestContext | undefined;
afterEach(async () => {
  await ctx?.close();
  ctx = undefined;
});

describe('request body limits (a 2 MB post never reaches a parser)', () => {
  it('answers 413 to a 2 MB sign-in body and 1 MB+ anywhere else', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    const twoMb = JSON.stringify({ username: 'dana', password: 'x'.repeat(2 * 1024 * 1024) });
    const signIn = await ctx.app.inject({
      method: 'POST',
      url: '/api/session',
      payload: twoMb,
      headers: { 'content-type': 'application/json' },
    });
    expect(signIn.statusCode).toBe(413);
    expect(signIn.json().error.code).toBe('PHL_HTTP_FST_ERR_CTP_BODY_TOO_LARGE');
    // the public set-up routes too: 9 KiB is over their 8 KiB
    const setup = await ctx.app.inject({
      method: 'POST',
      url: '/api/setup',
      payload: { token: 't'.repeat(40), username: 'x', password: 'y'.repeat(9 * 1024) },
    });
    expect(setup.statusCode).toBe(413);
    const form = await ctx.app.inject({
      method: 'POST',
      url: '/setup',
      payload: `token=${'t'.repeat(9 * 1024)}`,
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    });
    expect(form.statusCode).toBe(413);
    // the default for signed-in routes is 1 MiB
    const admin = await ctx.signIn('admin');
    const big = await admin.inject({
      method: 'PUT',
      url: '/api/settings/clinic',
      payload: { name: 'n'.repeat(1024 * 1024 + 1), contact: '', dietitianName: '' },
    });
    expect(big.statusCode).toBe(413);
  });

  it('answers 413 from the Content-Length alone, before the body has arrived', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    const address = await ctx.app.listen({ host: '127.0.0.1', port: 0 });
    const { port } = new URL(address);
    const answer = await new Promise<string>((resolve, reject) => {
      const socket = connect(Number(port), '127.0.0.1');
      let got = '';
      socket.on('data', (c: Buffer) => {
        got += c.toString('latin1');
        if (got.includes('\r\n\r\n')) {
          resolve(got);
          socket.destroy();
        }
      });
      socket.on('error', reject);
      // 2 MiB announced, 16 KiB sent: a server that read the body first would wait forever
      socket.write(
        'POST /api/session HTTP/1.1\r\nhost: 127.0.0.1\r\ncontent-type: application/json\r\n' +
          `content-length: ${2 * 1024 * 1024}\r\n\r\n{"username":"dana","password":"${'x'.repeat(16 * 1024)}`,
      );
      setTimeout(() => reject(new Error('no answer before the body was complete')), 5000);
    });
    expect(answer).toMatch(/^HTTP\/1\.1 413 /);
  });
});

describe('one-time set-up link (three parallel posts with one token)', () => {
  it('creates one admin however many posts race, over JSON and over the form', async () => {
    for (const via of ['json', 'form'] as const) {
      ctx = await createTestContext({ as: 'anonymous' });
      const token = await ctx.app.auth.issueSetupToken();
      const post = (username: string) =>
        via === 'json'
          ? ctx!.app.inject({
              method: 'POST',
              url: '/api/setup',
              payload: { token, username, password: 'a long admin password' },
            })
          : ctx!.app.inject({
              method: 'POST',
              url: '/setup',
              headers: { 'content-type': 'application/x-www-form-urlencoded' },
              payload: new URLSearchParams({
                token,
                username,
                password: 'a long admin password',
                password2: 'a long admin password',
              }).toString(),
            });
      const results = await Promise.all(['admin-a', 'admin-b', 'admin-c'].map(post));
      expect(
        results.filter((r) => r.statusCode === 201),
        via,
      ).toHaveLength(1);
      const refused = results.filter((r) => r.statusCode === 403 || r.statusCode === 409);
      expect(refused).toHaveLength(2);
      // the form's losers get a page that says why, like the form itself
      if (via === 'form') {
        for (const r of refused) {
          expect(r.headers['content-type']).toMatch(/^text\/html/);
          // refused by the transaction, or (had the winner already finished) by the route's check
          expect(r.body).toMatch(/Set-up was not done|set-up link is not valid|Set-up is done/);
        }
      }
      expect(await ctx.app.auth.countAdmins()).toBe(1);
      expect((await ctx.app.auth.listUsers()).filter((u) => u.role === 'admin')).toHaveLength(1);
      await ctx.close();
      ctx = undefined;
    }
  });

  it('keeps the token when the username is taken, so set-up can be finished', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const token = await ctx.app.auth.issueSetupToken();
    const body = (username: string) => ({ token, username, password: 'a long admin password' });
    const taken = await ctx.app.inject({
      method: 'POST',
      url: '/api/setup',
      payload: body('dana'),
    });
    expect(taken.statusCode).toBe(409);
    const ok = await ctx.app.inject({ method: 'POST', url: '/api/setup', payload: body('head') });
    expect(ok.statusCode).toBe(201);
  });
});

describe('throttles that do not lock people out', () => {
  const signIn = (app: App, username: string, password: string, remoteAddress = '127.0.0.1') =>
    app.inject({
      method: 'POST',
      url: '/api/session',
      payload: { username, password },
      remoteAddress,
    });

  it('counts wrong current passwords on password change and ends the guessing session', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const session = await signIn(ctx.app, 'dana', TEST_PASSWORD);
    const cookie = session.cookies.find((c) => c.name === 'phl_session')!.value;
    const csrf = session.json().csrfToken as string;
    const change = (currentPassword: string) =>
      ctx!.app.inject({
        method: 'PUT',
        url: '/api/session/password',
        cookies: { phl_session: cookie },
        headers: { 'x-csrf-token': csrf },
        payload: { currentPassword, newPassword: 'a brand new long secret' },
      });
    // policy: 3 wrong current passwords end the session (common practice, no source)
    expect((await change('guess number one')).json().error.code).toBe(
      'PHL_AUTH_INVALID_CREDENTIALS',
    );
    expect((await change('guess number two')).statusCode).toBe(401);
    const ended = await change('guess number three');
    expect(ended.statusCode).toBe(401);
    expect(ended.json().error.code).toBe('PHL_AUTH_SESSION_ENDED');
    const after = await ctx.app.inject({ url: '/api/session', cookies: { phl_session: cookie } });
    expect(after.statusCode).toBe(401);
    // the 3 guesses count with sign-in failures: 2 more make 5 and the account backs off
    await signIn(ctx.app, 'dana', 'wrong sign-in one');
    await signIn(ctx.app, 'dana', 'wrong sign-in two');
    expect((await signIn(ctx.app, 'dana', TEST_PASSWORD)).statusCode).toBe(429);
    const audit = ctx.db.sqlite
      .prepare("SELECT outcome FROM audit_event WHERE action = 'user.password-change'")
      .all();
    expect(audit).toEqual([{ outcome: 'denied' }, { outcome: 'denied' }, { outcome: 'denied' }]);
  });

  it('does not let a burst of parallel password-change guesses outrun the counter', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    const session = await signIn(ctx.app, 'dana', TEST_PASSWORD);
    const cookie = session.cookies.find((c) => c.name === 'phl_session')!.value;
    const csrf = session.json().csrfToken as string;
    const results = await Promise.all(
      Array.from({ length: 12 }, (_, i) =>
        ctx!.app.inject({
          method: 'PUT',
          url: '/api/session/password',
          cookies: { phl_session: cookie },
          headers: { 'x-csrf-token': csrf },
          payload: {
            currentPassword: `parallel guess ${i}`,
            newPassword: 'a brand new long secret',
          },
        }),
      ),
    );
    // at most the account's 5 free failures are checked; the rest are refused unchecked
    const checked = results.filter((r) => r.statusCode === 401).length;
    expect(checked).toBeGreaterThan(0);
    expect(checked).toBeLessThanOrEqual(5);
    expect(results.filter((r) => r.statusCode === 429)).toHaveLength(12 - checked);
  });

  it('does not lock everyone out when every client comes from the proxy address (no trust setting)', async () => {
    ctx = await createTestContext({ as: 'anonymous' });
    await ctx.app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
    // 30 failures across usernames used to lock the address 127.0.0.1, i.e. every client
    for (let i = 0; i < 30; i++) await signIn(ctx.app, `someone-${i}`, 'wrong password');
    expect((await signIn(ctx.app, 'dana', TEST_PASSWORD)).statusCode).toBe(200);
  });

  it('lets the admin back in at once with `phosledger users unlock`, and never for longer than 15 min', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'phl-unlock-'));
    const file = join(dir, 'db.sqlite');
    try {
      const db = openDb(file);
      await migrateToLatest(db);
      const clock = movableClock();
      ctx = await createTestContext({ as: 'anonymous', clock, db });
      await ctx.app.auth.createUser('head', 'admin', TEST_PASSWORD);
      for (let i = 0; i < 12; i++) {
        await signIn(ctx.app, 'head', `attacker guess ${i}`);
        clock.advance(20 * MIN); // an attacker who waits out each lock
      }
      await signIn(ctx.app, 'head', 'attacker guess 12');
      const locked = await signIn(ctx.app, 'head', TEST_PASSWORD);
      expect(locked.statusCode).toBe(429);
      // 8 failures past the limit: 1 min x 2^8 = 256 min, capped at 15 min = 900 s
      expect(locked.headers['retry-after']).toBe('900');
      // the admin's way back in: the command line on the server, over the same database file
      const out = new PassThrough();
      let text = '';
      out.on('data', (c: Buffer) => (text += c));
      const code = await runCli(['users', 'unlock', 'head'], {
        stdout: out,
        stderr: new PassThrough(),
        stdin: Readable.from([]),
        env: { PHOSLEDGER_DB: file },
      });
      expect(code).toBe(0);
      expect(text).toBe('head unlocked: failed sign-ins cleared\n');
      expect((await signIn(ctx.app, 'head', TEST_PASSWORD)).statusCode).toBe(200);
      const unlockEvent = ctx.db.sqlite
        .prepare("SELECT username FROM audit_event WHERE action = 'user.unlock'")
        .get() as { username: string };
      expect(unlockEvent.username).toMatch(/^cli:/);
    } finally {
      await ctx?.close();
      ctx = undefined;
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('says at start-up what the proxy setting does', () => {
    expect(proxyNotice(false)).toMatch(/PHOSLEDGER_TRUST_PROXY is off/);
    expect(proxyNotice(false)).toMatch(/users unlock/);
    expect(proxyNotice(true)).toMatch(/believed from\n127\.0\.0\.1 and ::1 only/);
  });
});

describe('passwords (NIST SP 800-63B 5.1.1.2): breached, common and trivial ones refused', () => {
  it('refuses list passwords (also with digits or symbols added), repeats and sequences', () => {
    // "passwordpassword", "qwerty123456", "michael" are on the @zxcvbn-ts/language-common list
    for (const p of ['passwordpassword', 'qwerty123456', 'Michael19851985', 'Password2024!!']) {
      expect(passwordProblem(p, 'dana'), p).toMatch(/common or breached/);
    }
    for (const p of ['aaaaaaaaaaaa', 'abcabcabcabc', 'abcd1234efgh', '9876543210zyx']) {
      expect(passwordProblem(p, 'dana'), p).toMatch(/repeated or sequential/);
    }
    expect(passwordProblem('phosledger-2026!', 'dana')).toMatch(/name of this service/);
    expect(passwordProblem('short', 'dana')).toMatch(/at least 12 characters/);
    // passphrases pass (invented)
    expect(passwordProblem('plate ledger lime kiln', 'dana')).toBeNull();
    expect(isRepetition('xyzxyz')).toBe(true);
    expect(isTrivialSequence('correct horse')).toBe(false);
  });

  it('answers 400 with the reason when an admin creates an account with one', async () => {
    ctx = await createTestContext({ as: 'admin' });
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/admin/users',
      payload: { username: 'sam', role: 'dietitian', password: 'iloveyou1234' },
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error).toMatchObject({ code: 'PHL_AUTH_PASSWORD_WEAK' });
    expect(res.json().error.message).toMatch(/common or breached/);
  });
});

describe('settings are audited and clinical ones are the admin’s', () => {
  // invented clinic override, within the published ranges (see ABSORPTION_SOURCES)
  const fractions = {
    ...DEFAULT_ABSORPTION_FRACTIONS,
    additive: { low: 0.7, typical: 0.85, high: 0.95 },
  };

  it('refuses a dietitian changing absorption, thresholds or clinic details, and records the attempt', async () => {
    ctx = await createTestContext();
    for (const [key, value] of [
      ['absorption', fractions],
      ['clinic', { name: 'Not the clinic', contact: '', dietitianName: '' }],
    ] as const) {
      const res = await ctx.inject({ method: 'PUT', url: `/api/settings/${key}`, payload: value });
      expect(res.statusCode, key).toBe(403);
      expect(res.json().error.code).toBe('PHL_SETTINGS_FORBIDDEN');
    }
    const reset = await ctx.inject({ method: 'DELETE', url: '/api/settings/thresholds' });
    expect(reset.statusCode).toBe(403);
    expect((await ctx.inject('/api/settings/absorption')).json().isDefault).toBe(true);
    const denied = ctx.db.sqlite
      .prepare("SELECT action, entity_id, outcome FROM audit_event WHERE entity = 'setting'")
      .all();
    expect(denied).toEqual([
      { action: 'setting.update', entity_id: 'absorption', outcome: 'denied' },
      { action: 'setting.update', entity_id: 'clinic', outcome: 'denied' },
      { action: 'setting.reset', entity_id: 'thresholds', outcome: 'denied' },
    ]);
  });

  it('records old and new values when an admin changes or resets one', async () => {
    ctx = await createTestContext({ as: 'admin' });
    const put = await ctx.inject({
      method: 'PUT',
      url: '/api/settings/absorption',
      payload: fractions,
    });
    expect(put.statusCode).toBe(200);
    const del = await ctx.inject({ method: 'DELETE', url: '/api/settings/absorption' });
    expect(del.statusCode).toBe(200);
    const rows = ctx.db.sqlite
      .prepare(
        "SELECT action, username, details_json FROM audit_event WHERE entity = 'setting' ORDER BY id",
      )
      .all() as Array<{ action: string; username: string; details_json: string }>;
    expect(rows.map((r) => [r.action, r.username])).toEqual([
      ['setting.update', 'test-admin'],
      ['setting.reset', 'test-admin'],
    ]);
    const [change, reset] = rows.map((r) => JSON.parse(r.details_json));
    expect(JSON.parse(change.old)).toEqual(DEFAULT_ABSORPTION_FRACTIONS);
    expect(JSON.parse(change.new)).toEqual(fractions);
    expect(JSON.parse(reset.old)).toEqual(fractions);
    expect(reset.newIsDefault).toBe(true);
  });

  it('refuses implausible fractions: outside 0-1, low above high, a typical of 0', async () => {
    ctx = await createTestContext({ as: 'admin' });
    const zero = { low: 0, typical: 0, high: 0 };
    const cases = [
      { ...fractions, additive: { low: 0.8, typical: 0.9, high: 1.2 } },
      { ...fractions, additive: { low: 0.95, typical: 0.9, high: 0.85 } },
      {
        animalOrganic: zero,
        plantOrganic: zero,
        phytate: zero,
        additive: zero,
        unknown: zero,
      },
    ];
    for (const payload of cases) {
      const res = await ctx.inject({ method: 'PUT', url: '/api/settings/absorption', payload });
      expect(res.statusCode).toBe(400);
      expect(res.json().error.code).toBe('PHL_SETTINGS_INVALID');
    }
    expect((await ctx.inject('/api/settings/absorption')).json().isDefault).toBe(true);
  });
});

describe('audit-log CSV cannot carry formulas; refused ids are not logged', () => {
  it('quotes every cell and neutralises = + - @ after leading separators or whitespace', () => {
    expect(csvCell(';=1+1')).toBe(`"';=1+1"`);
    expect(csvCell(' =HYPERLINK("http://x")')).toBe(`"' =HYPERLINK(""http://x"")"`);
    expect(csvCell('\t@SUM(A1)')).toBe(`"'\t@SUM(A1)"`);
    expect(csvCell(',-2+3')).toBe(`"',-2+3"`);
    expect(csvCell('\uFF1D1+1')).toBe(`"'\uFF1D1+1"`); // fullwidth equals sign
    expect(csvCell('plan.read')).toBe('"plan.read"');
    expect(csvCell(42)).toBe('"42"');
    expect(csvCell(null)).toBe('""');
  });

  it('logs no raw id from a refused URL', async () => {
    ctx = await createTestContext();
    const res = await ctx.inject({ url: `/api/patients/${encodeURIComponent(';=1+1')}` });
    expect(res.statusCode).toBe(400);
    const row = ctx.db.sqlite
      .prepare(
        "SELECT entity_id, patient_id, outcome FROM audit_event WHERE action = 'patient.read'",
      )
      .get();
    expect(row).toEqual({ entity_id: null, patient_id: null, outcome: 'failed' });
    const export_ = await ctx.signIn('admin');
    const csv = (await export_.inject('/api/admin/audit/export?format=csv')).body;
    expect(csv).not.toContain('=1+1');
  });
});

describe('session cookie over TLS: __Host- prefix (RFC 6265bis 4.1.3.2)', () => {
  it('sets and accepts only __Host-phl_session when the request came over HTTPS', async () => {
    const db = await openMemoryDb();
    const app = await buildApp({
      db,
      clock: fixedClock('2026-03-05T09:30:00Z'), // invented fixed time
      auth: { scryptParams: TEST_SCRYPT_PARAMS },
      trustProxy: true,
    });
    try {
      await app.ready();
      await app.auth.createUser('dana', 'dietitian', TEST_PASSWORD);
      const tls = { 'x-forwarded-proto': 'https', 'x-forwarded-host': 'clinic.example' };
      const res = await app.inject({
        method: 'POST',
        url: '/api/session',
        headers: { ...tls, origin: 'https://clinic.example' },
        payload: { username: 'dana', password: TEST_PASSWORD },
      });
      expect(res.statusCode).toBe(200);
      const setCookie = String(res.headers['set-cookie']);
      expect(setCookie).toMatch(
        /^__Host-phl_session=[\w-]+; Path=\/; HttpOnly; Secure; SameSite=Strict$/,
      );
      const token = res.cookies[0]!.value;
      const good = await app.inject({
        url: '/api/session',
        headers: tls,
        cookies: { '__Host-phl_session': token },
      });
      expect(good.statusCode).toBe(200);
      // a plain cookie (which a plain-http page or a neighbouring host could plant) is not read
      const planted = await app.inject({
        url: '/api/session',
        headers: tls,
        cookies: { phl_session: token },
      });
      expect(planted.statusCode).toBe(401);
    } finally {
      await app.close();
      await db.close();
    }
  });
});
