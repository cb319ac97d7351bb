import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

const skip = !hasSr28;
const t = (name: string) => `${name} (${hasSr28 ? 'USDA SR28' : SR28_MISSING})`;

// Invented demo patient.
const patientBody = {
  label: 'PREP-01 (invented)',
  language: 'es',
  weightKg: 70,
  ckdStage: '5',
  dialysis: 'hemodialysis',
  diabetes: false,
};

describe('preparation over HTTP', () => {
  let ctx: TestContext;
  let raw: Food;
  let cooked: Food;
  beforeEach(async () => {
    ctx = await createTestContext();
    // USDA SR28 NDB 05062 chicken breast raw, 05065 the same stewed
    if (hasSr28) [raw, cooked] = insertFoods(ctx.db, sr28Foods('05062', '05065')) as [Food, Food];
  });
  afterEach(async () => ctx.close());

  it.skipIf(skip)(t('GET /api/foods/:id gives cookedState and preparations'), async () => {
    const r = (await ctx.inject({ method: 'GET', url: `/api/foods/${raw.id}` })).json();
    expect(r.cookedState).toBe('raw');
    expect(r.preparations.map((p: { method: string }) => p.method)).toEqual([
      'boil-drain',
      'pressure-boil-drain',
      'slice-boil-drain',
    ]);
    // Cupisti 2006 chicken breast 63%, protein 81%
    expect(r.preparations[0].factors.phosphorus.typical).toBe(0.63);
    expect(r.preparations[0].factors.protein.typical).toBe(0.81);
    expect(r.phosphorus.totalMg).toBe(213); // the rest of the food passes through (SR28 05062)
    const c = (await ctx.inject({ method: 'GET', url: `/api/foods/${cooked.id}` })).json();
    expect([c.cookedState, c.preparations]).toEqual(['cooked', []]);
  });

  it.skipIf(skip)(
    t('a saved method lowers the summary; the version before it is unchanged'),
    async () => {
      const p = (
        await ctx.inject({ method: 'POST', url: '/api/patients', payload: patientBody })
      ).json();
      const plan = (items: object[]) => ({
        name: 'Boiled chicken',
        days: [{ label: 'Day 1', occasions: [{ name: 'Lunch', items }] }],
      });
      const created = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${p.id}/plans`,
        payload: plan([{ foodId: raw.id, grams: 100 }]),
      });
      expect(created.statusCode).toBe(201);
      const id = created.json().id;
      const v1 = (await ctx.inject({ method: 'GET', url: `/api/plans/${id}/summary` })).body;
      const saved = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${id}`,
        payload: plan([
          { foodId: raw.id, grams: 100, preparation: 'boil-drain', weightBasis: 'table' },
        ]),
      });
      expect(saved.statusCode).toBe(200);
      expect(saved.json().days[0].occasions[0].items[0]).toMatchObject({
        preparation: 'boil-drain',
        weightBasis: 'table',
      });
      const v2 = (
        await ctx.inject({ method: 'GET', url: `/api/plans/${id}/summary?version=2` })
      ).json();
      const item = v2.days[0].occasions[0].items[0];
      // 213 mg x 0.63 = 134.2 mg (USDA SR28 NDB 05062; Cupisti 2006)
      expect(item.nutrients.phosphorusMg).toBe(134.2);
      expect(item.preparation.method).toBe('boil-drain');
      expect(item.preparation.sources.join(' ')).toContain('Cupisti');
      expect(v2.days[0].nutrients.preparedRanges.phosphorusMg.typical).toBe(134.2);
      // version 1 (no method) is exactly as it was, with no preparation fields
      expect(
        (await ctx.inject({ method: 'GET', url: `/api/plans/${id}/summary?version=1` })).body,
      ).toBe(v1);
      expect(v1).not.toContain('preparation');
      // a cooked entry refuses a method, naming the field; nothing is saved
      const bad = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${id}`,
        payload: plan([{ foodId: cooked.id, grams: 100, preparation: 'boil-drain' }]),
      });
      expect(bad.statusCode).toBe(400);
      expect(JSON.stringify(bad.json())).toMatch(
        /items\.0\.preparation: boil-drain: .*already cooked/,
      );
    },
  );

  it('the OpenAPI document covers the new fields', async () => {
    const doc = JSON.stringify((await ctx.inject({ method: 'GET', url: '/api/docs/json' })).json());
    for (const field of [
      'cookedState',
      'preparations',
      'preparedRanges',
      'weightBasis',
      'boil-drain',
    ])
      expect(doc).toContain(`"${field}"`);
  });
});
