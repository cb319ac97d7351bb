import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

const t = (name: string) => `${name} (${hasSr28 ? 'USDA SR28 foods' : SR28_MISSING})`;

// USDA SR28 NDB 18069 bread, white: P 98 mg per 100 g, so 58 g -> 56.84 mg and 87 g -> 85.26 mg.
// Patient and plan are invented demo data.
describe('plate ledger drafts: autosave without a version, a version on save', () => {
  let ctx: TestContext;
  let bread: Food;
  let planId = 0;
  const body = (grams: number) => ({
    name: 'Draft test',
    days: [
      { label: 'Day 1', occasions: [{ name: 'Breakfast', items: [{ foodId: bread.id, grams }] }] },
    ],
  });
  beforeEach(async () => {
    ctx = await createTestContext();
    if (!hasSr28) return;
    [bread] = insertFoods(ctx.db, sr28Foods('18069')) as [Food];
    const p = await ctx.inject({
      method: 'POST',
      url: '/api/patients',
      payload: {
        label: 'DRAFT-01 (invented)',
        weightKg: 70,
        ckdStage: '4',
        dialysis: 'none',
        diabetes: false,
      },
    });
    const plan = await ctx.inject({
      method: 'POST',
      url: `/api/patients/${p.json().id}/plans`,
      payload: body(58),
    });
    planId = plan.json().id;
  });
  afterEach(async () => ctx.close());

  it.skipIf(!hasSr28)(
    t('keeps edits as a draft with their summary; saving makes version 2'),
    async () => {
      const put = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${planId}/draft`,
        payload: body(87),
      });
      expect(put.statusCode).toBe(200);
      // 87 g x 98 mg / 100 g = 85.26 mg: the draft's own summary.
      expect(put.json().summary.days[0].nutrients.phosphorusMg).toBeCloseTo(85.3, 1);
      expect(put.json().baseVersion).toBe(1);
      const versions = await ctx.inject(`/api/plans/${planId}/versions`);
      expect(versions.json()).toHaveLength(1);
      // The saved version still sums 58 g: 56.84 mg.
      const summary = await ctx.inject(`/api/plans/${planId}/summary`);
      expect(summary.json().days[0].nutrients.phosphorusMg).toBeCloseTo(56.8, 1);

      const got = await ctx.inject(`/api/plans/${planId}/draft`);
      expect(got.json()).toMatchObject({ baseVersion: 1, stale: false, input: body(87) });

      // A bad draft is refused whole and the kept draft is unchanged.
      const bad = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${planId}/draft`,
        payload: body(-1),
      });
      expect(bad.statusCode).toBe(400);
      expect((await ctx.inject(`/api/plans/${planId}/draft`)).json().input).toEqual(body(87));

      const saved = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${planId}`,
        payload: body(87),
      });
      expect(saved.json().version).toBe(2);
      expect((await ctx.inject(`/api/plans/${planId}/draft`)).statusCode).toBe(404);
    },
  );

  it.skipIf(!hasSr28)(
    t('a draft older than the latest version is stale; DELETE drops it'),
    async () => {
      await ctx.inject({ method: 'PUT', url: `/api/plans/${planId}/draft`, payload: body(87) });
      // Saving a version from elsewhere (another screen, the CLI) clears this plan's draft, so a
      // stale one only arises when the draft was written against an older version.
      await ctx.db.sqlite
        .prepare('update plan_draft set base_version = 0 where plan_id = ?')
        .run(planId);
      expect((await ctx.inject(`/api/plans/${planId}/draft`)).json().stale).toBe(true);
      const del = await ctx.inject({ method: 'DELETE', url: `/api/plans/${planId}/draft` });
      expect(del.statusCode).toBe(204);
      expect((await ctx.inject(`/api/plans/${planId}/draft`)).statusCode).toBe(404);
    },
  );
});
