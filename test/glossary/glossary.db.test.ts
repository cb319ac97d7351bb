import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

const t = (name: string) => `${name} (${hasSr28 ? 'USDA SR28 foods' : SR28_MISSING})`;

// USDA SR28 NDB numbers: 14148 cola, regular (a drink: "1 can or bottle (12 fl oz)" 370 g,
// "1 fl oz" 30.8 g, so 370 g / 30.8 g per 29.57 ml = 355 ml); 07008 bologna, beef and pork;
// 05064 chicken breast, roasted. Patient and plan are invented demo data.
const NDB = ['14148', '07008', '05064'] as const;

describe('clinic food names (glossary) and the handout', () => {
  let ctx: TestContext;
  let foods: Food[];
  beforeEach(async () => {
    ctx = await createTestContext();
    if (hasSr28) foods = insertFoods(ctx.db, sr28Foods(...NDB));
  });
  afterEach(async () => ctx.close());

  it.skipIf(!hasSr28)(
    t('sets, lists, exports, imports (all or nothing) and removes names'),
    async () => {
      const [cola, bologna] = foods as [Food, Food];
      const put = await ctx.inject({
        method: 'PUT',
        url: `/api/glossary/${bologna.id}/es`,
        payload: { name: 'Mortadela de res y cerdo', status: 'reviewed' },
      });
      expect(put.statusCode).toBe(200);
      const list = await ctx.inject(`/api/glossary?language=es&foodIds=${cola.id},${bologna.id}`);
      expect(list.statusCode).toBe(200);
      const entries = list.json() as Array<{
        foodId: number;
        name: string;
        origin: string;
        status: string;
      }>;
      expect(entries).toContainEqual(
        expect.objectContaining({
          foodId: bologna.id,
          name: 'Mortadela de res y cerdo',
          origin: 'clinic',
          status: 'reviewed',
        }),
      );
      // The starter's drafted name for the cola (templates/glossary/starter.csv).
      expect(entries).toContainEqual(
        expect.objectContaining({
          foodId: cola.id,
          name: 'Refresco de cola',
          origin: 'starter',
          status: 'drafted',
        }),
      );

      const bad = await ctx.inject({
        method: 'PUT',
        url: `/api/glossary/${bologna.id}/xx`,
        payload: { name: 'x' },
      });
      expect(bad.statusCode).toBe(400);
      expect(bad.json().error.code).toBe('PHL_GLOSSARY_LANGUAGE_UNKNOWN');

      const csv = await ctx.inject('/api/glossary.csv?language=es');
      expect(csv.headers['content-type']).toContain('text/csv');
      expect(csv.body).toContain('usda-sr28,07008,es,Mortadela de res y cerdo,reviewed,');

      // One bad line (unknown language, unknown food) refuses the whole file: nothing changes.
      const refused = await ctx.inject({
        method: 'POST',
        url: '/api/glossary/import',
        payload: {
          csv: 'food_source,food_code,language,name,status\nusda-sr28,14148,fr,Cola,drafted\nusda-sr28,14148,xx,Cola,drafted\nusda-sr28,99999,es,Nada,drafted\n',
        },
      });
      expect(refused.statusCode).toBe(400);
      expect(refused.json().error.code).toBe('PHL_GLOSSARY_CSV_INVALID');
      expect(refused.json().error.message).toContain('line 3');
      const afterRefused = await ctx.inject('/api/glossary?language=fr');
      expect(afterRefused.json()).toEqual([]);

      const imported = await ctx.inject({
        method: 'POST',
        url: '/api/glossary/import',
        payload: {
          csv: '\uFEFFfood_source,food_code,language,name\r\nusda-sr28,14148,fr,"Cola, canette",\r\n',
        },
      });
      expect(imported.statusCode).toBe(200);
      expect(imported.json()).toEqual({ imported: 1 });
      const fr = await ctx.inject('/api/glossary?language=fr');
      expect(fr.json()).toEqual([
        expect.objectContaining({ foodId: cola.id, name: 'Cola, canette', status: 'drafted' }),
      ]);

      const del = await ctx.inject({ method: 'DELETE', url: `/api/glossary/${cola.id}/fr` });
      expect(del.statusCode).toBe(204);
      const again = await ctx.inject({ method: 'DELETE', url: `/api/glossary/${cola.id}/fr` });
      expect(again.statusCode).toBe(404);
    },
  );

  it.skipIf(!hasSr28)(
    t('the handout uses the clinic name, then the starter name (marked drafted), drinks in ml'),
    async () => {
      const [cola, bologna, chicken] = foods as [Food, Food, Food];
      const can = cola.portions.find((p) => /^can/.test(p.description));
      expect(can, 'SR28 14148 has a "can or bottle" measure').toBeTruthy();
      await ctx.inject({
        method: 'PUT',
        url: '/api/settings/clinic',
        payload: { name: 'Test Renal Unit', contact: '555-0100', dietitianName: 'R. Test' },
      });
      const p = await ctx.inject({
        method: 'POST',
        url: '/api/patients',
        payload: {
          label: 'GLOSSARY-01 (invented)',
          language: 'es',
          weightKg: 70,
          ckdStage: '4',
          dialysis: 'none',
          diabetes: false,
        },
      });
      const plan = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${p.json().id}/plans`,
        payload: {
          name: 'Names test',
          days: [
            {
              label: 'Day 1',
              occasions: [
                {
                  name: 'Lunch',
                  items: [
                    { foodId: cola.id, measure: { portionId: can!.id, count: 1 } },
                    { foodId: bologna.id, grams: 28 },
                    { foodId: chicken.id, grams: 85, label: 'pollo de mi casa' },
                  ],
                },
              ],
            },
          ],
        },
      });
      expect(plan.statusCode).toBe(201);
      await ctx.inject({
        method: 'PUT',
        url: `/api/glossary/${bologna.id}/es`,
        payload: { name: 'Mortadela', status: 'reviewed' },
      });
      const html = await ctx.inject(`/plans/${plan.json().id}/handout?lang=es`);
      expect(html.statusCode).toBe(200);
      // Clinic name (reviewed: no mark), starter name (drafted: "*"), the patient's own words.
      expect(html.body).toContain('Mortadela<');
      expect(html.body).toContain('Refresco de cola *');
      expect(html.body).toContain('pollo de mi casa');
      expect(html.body).not.toContain('Bologna, beef and pork');
      // 1 can = 370 g (SR28 14148 WEIGHT); 1 fl oz = 30.8 g, so 370 / (30.8 / 29.5735) = 355.3 ml,
      // shown to 5 ml: 355 ml.
      expect(html.body).toContain('1 lata (unos 355 ml)');
      expect(html.body).toContain('Nombre del alimento en borrador');
    },
  );
});
