import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ASSUMED_WORDING } from '../../src/i18n/user-wording.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

// The absorption defaults' source note (src/phosphorus/absorption.ts) says "from memory" for
// the split-unknown range (IOM 1997) and the plant non-phytate fraction.
describe('answers say "assumed (no published figure)", never "from memory"', () => {
  let ctx: TestContext;
  beforeAll(async () => {
    ctx = await createTestContext();
  });
  afterAll(async () => ctx.close());

  it('the absorption setting as the Clinic settings screen reads it', async () => {
    const res = await ctx.inject('/api/settings/absorption');
    expect(res.statusCode).toBe(200);
    expect(res.body).not.toMatch(/from memory/i);
    expect(res.body).toContain(ASSUMED_WORDING);
  });
});
