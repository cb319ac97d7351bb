import { afterEach, describe, expect, it } from 'vitest';
import { createTestContext, type TestContext } from './helpers/context.js';

describe('GET /api/health (no source needed: fixed invented clock)', () => {
  let ctx: TestContext;
  afterEach(async () => ctx.close());

  it('answers ok with the clock time', async () => {
    ctx = await createTestContext();
    const res = await ctx.app.inject({ method: 'GET', url: '/api/health' });
    expect(res.statusCode).toBe(200);
    expect(res.json()).toEqual({ status: 'ok', time: '2026-03-05T09:30:00.000Z' });
  });

  it('answers unknown routes with a stable error code', async () => {
    ctx = await createTestContext();
    const res = await ctx.app.inject({ method: 'GET', url: '/api/nope' });
    expect(res.statusCode).toBe(404);
    expect(res.json().error.code).toBe('PHL_ROUTE_NOT_FOUND');
  });

  it('rejects a bad food search query with 400 naming the field', async () => {
    ctx = await createTestContext();
    const res = await ctx.inject({ method: 'GET', url: '/api/foods?q=&limit=abc' });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.code).toBe('PHL_REQUEST_INVALID');
    expect(res.json().error.message).toMatch(/q|limit/);
  });
});
