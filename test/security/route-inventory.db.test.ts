// Sources: 45 CFR 164.312(a)(1) access control; OWASP ASVS 4.0 V4.1.1 (from memory).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RouteInfo } from '../../src/auth/auth.plugin.js';
import {
  DEFAULT_BODY_LIMIT_BYTES,
  PUBLIC_AUTH_BODY_LIMIT_BYTES,
} from '../../src/server/body-limits.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

/**
 * Every registered route, found through an onRoute hook installed before any route: a route
 * without `config.public` must answer 401 to a request without a session (45 CFR 164.312(a)(1)
 * access control; OWASP ASVS V4.1.1). Public routes must be on the short list below.
 */

/** Routes that may answer without sign-in, by pattern (method + url). */
const PUBLIC_ALLOWED: Array<[RegExp, RegExp]> = [
  [/^(GET|HEAD)$/, /^\/api\/health$/],
  [/^POST$/, /^\/api\/session$/],
  [/^(GET|HEAD|POST)$/, /^\/api\/setup$/],
  [/^(GET|HEAD|POST)$/, /^\/setup$/],
  // web UI shells and their own scripts, styles and fonts (no patient data in them)
  [/^(GET|HEAD)$/, /^\/(?!api\/)/],
];

function concrete(url: string): string {
  return url.replace(/:[A-Za-z_]\w*(\([^)]*\))?/g, '1').replace(/\*/g, 'x');
}

const METHODS_WITH_BODY = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

describe('route inventory: no non-public route answers without a session', () => {
  let ctx: TestContext;
  let routes: RouteInfo[];
  beforeAll(async () => {
    ctx = await createTestContext();
    routes = ctx.app.routeInventory;
  });
  afterAll(async () => ctx.close());

  it('finds the routes (the hook saw them all)', () => {
    expect(routes.length).toBeGreaterThan(10);
    expect(routes.some((r) => r.url === '/api/foods' && r.method === 'GET')).toBe(true);
    expect(routes.some((r) => r.url === '/api/session' && r.method === 'DELETE')).toBe(true);
  });

  it('keeps public routes to the allowed list', () => {
    const unexpected = routes
      .filter((r) => r.public)
      .filter((r) => !PUBLIC_ALLOWED.some(([m, u]) => m.test(r.method) && u.test(r.url)))
      .map((r) => `${r.method} ${r.url}`);
    expect(unexpected).toEqual([]);
  });

  it('answers 401 on every non-public route without a session, and with a stale cookie', async () => {
    const leaks: string[] = [];
    let tried = 0;
    for (const r of routes.filter((x) => !x.public)) {
      const url = concrete(r.url);
      const base = {
        method: r.method as 'GET',
        url,
        ...(METHODS_WITH_BODY.has(r.method) ? { payload: {} } : {}),
      };
      for (const cookies of [{}, { phl_session: 'a'.repeat(43) }]) {
        tried += 1;
        const res = await ctx.app.inject({ ...base, cookies });
        // Consult screens turn the 401 into a redirect to the sign-in screen, without the page.
        const refused =
          res.statusCode === 401 ||
          (res.statusCode === 303 &&
            String(res.headers.location).startsWith('/signin?next=') &&
            !res.body.includes('<'));
        if (!refused) leaks.push(`${r.method} ${r.url} -> ${res.statusCode}`);
      }
    }
    expect(leaks).toEqual([]);
    expect(tried).toBeGreaterThan(20);
  });

  it('answers 403 on every non-public state-changing route without the CSRF token', async () => {
    const leaks: string[] = [];
    for (const r of routes.filter((x) => !x.public && METHODS_WITH_BODY.has(x.method))) {
      const res = await ctx.inject({
        method: r.method as 'POST',
        url: concrete(r.url),
        payload: {},
        headers: { 'x-csrf-token': 'wrong' },
      });
      if (res.statusCode !== 403) leaks.push(`${r.method} ${r.url} -> ${res.statusCode}`);
    }
    expect(leaks).toEqual([]);
  });

  it('audits every route that reads or writes patient data or runs an import (45 CFR 164.312(b))', () => {
    const PATIENT_DATA = [
      /^\/api\/patients/,
      /^\/api\/plans/,
      /^\/api\/diary/,
      /^\/api\/labs/,
      /^\/api\/handouts?\/(?!languages$)/,
      /^\/plans\/:id\/handout/,
    ];
    // every import is audited: starting one (its outcome is recorded when it ends)
    const IMPORT_START = /^\/api\/imports?(\/|$)/;
    // writes its own event inside the erasing transaction (and must not name the patient)
    const EXEMPT = new Set(['POST /api/patients/:id/erase']);
    const missing = routes
      .filter(
        (r) =>
          (r.method !== 'HEAD' && PATIENT_DATA.some((p) => p.test(r.url))) ||
          (r.method === 'POST' && IMPORT_START.test(r.url)),
      )
      .filter((r) => !r.audit && !EXEMPT.has(`${r.method} ${r.url}`))
      .map((r) => `${r.method} ${r.url}`);
    expect(missing).toEqual([]);
    expect(routes.filter((r) => r.audit).length).toBeGreaterThan(15);
  });

  it('keeps request bodies small: 8 KiB on public routes, 1 MiB unless a route needs more', () => {
    expect(DEFAULT_BODY_LIMIT_BYTES).toBe(1024 * 1024);
    expect(ctx.app.initialConfig.bodyLimit).toBe(DEFAULT_BODY_LIMIT_BYTES);
    // Anyone can post to these: a small limit, answered 413 before the body is read.
    const loosePublic = routes
      .filter((r) => r.public && METHODS_WITH_BODY.has(r.method))
      .filter((r) => r.bodyLimit === null || r.bodyLimit > PUBLIC_AUTH_BODY_LIMIT_BYTES)
      .map((r) => `${r.method} ${r.url} (${r.bodyLimit ?? 'default'})`);
    expect(loosePublic).toEqual([]);
    // Routes allowed above the default, and why (file uploads stream to disk instead).
    const RAISED = new Map([
      ['POST /api/diary-audits', 'a diary sent as JSON text, up to 5 MB'],
      ['POST /api/imports', 'admin only; the food table streams to disk, up to 4 GiB + 1 MiB'],
    ]);
    const raised = routes
      .filter((r) => r.bodyLimit !== null && r.bodyLimit > DEFAULT_BODY_LIMIT_BYTES)
      .map((r) => `${r.method} ${r.url}`)
      .filter((r) => !RAISED.has(r));
    expect(raised).toEqual([]);
  });

  it('answers 403 on every admin route for a dietitian', async () => {
    const leaks: string[] = [];
    for (const r of routes.filter((x) => x.role === 'admin')) {
      const res = await ctx.inject({
        method: r.method as 'GET',
        url: concrete(r.url),
        ...(METHODS_WITH_BODY.has(r.method) ? { payload: {} } : {}),
      });
      if (res.statusCode !== 403) leaks.push(`${r.method} ${r.url} -> ${res.statusCode}`);
    }
    expect(leaks).toEqual([]);
  });
});
