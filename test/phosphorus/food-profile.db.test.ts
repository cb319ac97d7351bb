import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { ADDITIVE_CATALOGUE_VERSION } from '../../src/additives/catalogue.js';
import { analyzeIngredients } from '../../src/additives/ingredient-parser.js';
import type { Food } from '../../src/foods/food.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { testFood } from '../helpers/food.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestContext();
});
afterEach(async () => {
  await ctx.close();
});

const CONTRACT_KEYS = [
  'absorbableMg',
  'additiveMg',
  'evidence',
  'method',
  'organicAnimalMg',
  'organicPlantMg',
  'phytateMg',
  'ratioBand',
  'ratioMgPerG',
  'totalMg',
];

describe('phosphorus profile in the food JSON', () => {
  it.skipIf(!hasSr28)(
    `GET /api/foods/:id carries the profile (USDA SR28 01009 cheddar) ${hasSr28 ? '' : SR28_MISSING}`,
    async () => {
      const [cheddar] = insertFoods(ctx.db, sr28Foods('01009')) as [Food];
      const res = await ctx.inject({ method: 'GET', url: `/api/foods/${cheddar.id}` });
      expect(res.statusCode).toBe(200);
      const p = res.json().phosphorus;
      for (const k of CONTRACT_KEYS) expect(p, k).toHaveProperty(k);
      // SR28 01009: 455 mg P, 22.87 g protein: 19.9 mg/g; all organic animal; absorbable 40/50/60%
      expect(p).toMatchObject({
        totalMg: 455,
        organicAnimalMg: 455,
        organicPlantMg: 0,
        additiveMg: 0,
        method: 'food-group',
        absorbableMg: { low: 182, typical: 227.5, high: 273 },
        ratioMgPerG: 19.9,
        ratioBand: '16-or-more',
      });
    },
  );

  it.skipIf(!hasSr28)(
    `search hits carry the profile, with the clinic's fractions ${hasSr28 ? '' : SR28_MISSING}`,
    async () => {
      insertFoods(ctx.db, sr28Foods('14400'));
      // absorption fractions are changed by an admin
      const admin = await ctx.signIn('admin');
      const put = await admin.inject({
        method: 'PUT',
        url: '/api/settings/absorption',
        payload: {
          ...DEFAULT_ABSORPTION_FRACTIONS,
          additive: { low: 0.5, typical: 0.5, high: 0.5 },
        },
      });
      expect(put.statusCode).toBe(200);
      const res = await ctx.inject({ method: 'GET', url: '/api/foods?q=cola' });
      const hit = res.json()[0];
      // SR28 14400: 10 mg P, 0.07 g protein: the acidulant is the source, so all 10 mg is
      // additive (E 338, Reg. (EC) 1333/2008 Annex II); ratio undefined
      expect(hit.phosphorus).toMatchObject({
        totalMg: 10,
        additiveMg: 10,
        method: 'generic-rule',
        ratioMgPerG: null,
        ratioBand: 'no-protein',
      });
      // absorbable typical: 10 x 0.5 (clinic override for additive phosphorus) = 5.0 mg
      expect(hit.phosphorus.absorbableMg.typical).toBeCloseTo(5.0, 1);
    },
  );

  it('uses the stored scan of a branded food when it is current', async () => {
    // invented demo product: the stored scan names E 451 although the statement (edited later) does not
    const food = testFood({
      id: 0,
      sourceId: 0,
      source: 'demo-branded',
      code: 'D1',
      name: 'Demo chicken slices',
      group: 'Poultry Products',
      kind: 'branded',
      brandOwner: 'Demo',
      ingredients: 'chicken, water, salt',
      ingredientsLanguage: 'en',
      per100g: { phosphorusMg: 250, proteinG: 20 },
    });

    const [saved] = insertFoods(ctx.db, [food], {
      format: 'demo-branded',
      name: 'Demo products',
      release: 'invented',
    }) as [Food];
    const scan = JSON.stringify(analyzeIngredients('chicken, water, salt, stabiliser: E 451'));
    const setScan = ctx.db.sqlite.prepare(
      'update food set additive_scan = ?, additive_scan_version = ? where id = ?',
    );
    setScan.run(scan, ADDITIVE_CATALOGUE_VERSION, saved.id);
    let p = (await ctx.inject({ method: 'GET', url: `/api/foods/${saved.id}` })).json().phosphorus;
    // natural 20 g x 9.3 mg/g (Benini 2011) = 186 mg; additive 250 - 186 = 64 mg
    expect(p).toMatchObject({
      method: 'ingredient-statement',
      additiveMg: 64,
      additiveLikely: true,
    });
    // an outdated scan is not trusted: the statement is read again
    setScan.run(scan, 'outdated', saved.id);
    p = (await ctx.inject({ method: 'GET', url: `/api/foods/${saved.id}` })).json().phosphorus;
    expect(p).toMatchObject({
      method: 'ingredient-statement',
      additiveMg: 0,
      additiveLikely: false,
    });
  });
});
