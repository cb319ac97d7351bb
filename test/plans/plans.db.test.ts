import { gunzipSync } from 'node:zlib';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { settingsSource } from '../../src/plans/plan-settings-source.js';
import { PlanService } from '../../src/plans/plans.service.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

const t = (name: string) => `${name} (${hasSr28 ? 'USDA SR28' : SR28_MISSING})`;

// USDA SR28 NDB numbers of the hand-worked day
const NDB = {
  egg: '01123', // Egg, whole, raw, fresh
  bread: '18069', // Bread, white, commercially prepared
  milk: '01077', // Milk, whole, 3.25% milkfat, with added vitamin D
  rice: '20045', // Rice, white, long-grain, regular, enriched, cooked
  chicken: '05064', // Chicken, broilers or fryers, breast, meat only, cooked, roasted
  beans: '16043', // Beans, pinto, mature seeds, cooked, boiled, without salt
  cheddar: '01009', // Cheese, cheddar
  potato: '11674', // Potatoes, baked, flesh and skin, without salt
  apple: '09003', // Apples, raw, with skin
} as const;

// Invented demo patient: 70 kg on hemodialysis, no diabetes.
const patientBody = {
  label: 'TEST-07 (invented)',
  language: 'es',
  weightKg: 70,
  ckdStage: '5',
  dialysis: 'hemodialysis',
  diabetes: false,
  labs: [{ analyte: 'phosphate', value: 1.94, unit: 'mmol/L', date: '2026-03-01' }],
  binder: {
    ingredient: 'calcium-acetate',
    unitStrengthMg: 667,
    schedule: 'per-day',
    units: 6,
    otherMedicines: ['levothyroxine'],
  },
};

function measure(food: Food, pred: (p: Food['portions'][number]) => boolean) {
  const p = food.portions.find(pred);
  if (!p) throw new Error(`no such portion for ${food.code}`);
  return p.id;
}

describe('patients and plans over HTTP', () => {
  let ctx: TestContext;
  let f: Record<keyof typeof NDB, Food>;
  beforeEach(async () => {
    ctx = await createTestContext();
    if (hasSr28) {
      const keys = Object.keys(NDB) as (keyof typeof NDB)[];
      const foods = insertFoods(ctx.db, sr28Foods(...keys.map((k) => NDB[k])));
      f = Object.fromEntries(keys.map((k, i) => [k, foods[i] as Food])) as typeof f;
    }
  });
  afterEach(async () => ctx.close());

  function dayPlan() {
    return {
      name: 'Consult 1',
      days: [
        {
          label: 'Monday',
          occasions: [
            {
              name: 'Breakfast',
              time: '08:00',
              items: [
                {
                  foodId: f.egg.id,
                  measure: {
                    portionId: measure(f.egg, (p) => p.description === 'large'),
                    count: 2,
                  },
                  label: 'huevos',
                },
                {
                  foodId: f.bread.id,
                  measure: {
                    portionId: measure(f.bread, (p) => p.description === 'slice' && p.grams === 29),
                    count: 2,
                  },
                },
                {
                  foodId: f.milk.id,
                  measure: { portionId: measure(f.milk, (p) => p.description === 'cup'), count: 1 },
                },
              ],
            },
            {
              name: 'Lunch',
              time: '13:00',
              items: [
                {
                  foodId: f.rice.id,
                  measure: { portionId: measure(f.rice, (p) => p.description === 'cup'), count: 1 },
                },
                {
                  foodId: f.chicken.id,
                  measure: {
                    portionId: measure(f.chicken, (p) => p.description.startsWith('breast')),
                    count: 0.5,
                  },
                },
              ],
            },
            {
              name: 'Snack',
              items: [
                {
                  foodId: f.apple.id,
                  measure: {
                    portionId: measure(f.apple, (p) => p.description.startsWith('medium')),
                    count: 1,
                  },
                },
              ],
            },
            {
              name: 'Dinner',
              time: '20:00',
              items: [
                {
                  foodId: f.beans.id,
                  measure: {
                    portionId: measure(f.beans, (p) => p.description === 'cup'),
                    count: 1,
                  },
                },
                {
                  foodId: f.cheddar.id,
                  measure: {
                    portionId: measure(f.cheddar, (p) => p.description === 'oz'),
                    count: 1,
                  },
                },
                {
                  foodId: f.potato.id,
                  measure: {
                    portionId: measure(f.potato, (p) => p.description === 'potato medium'),
                    count: 1,
                  },
                },
              ],
            },
          ],
        },
      ],
    };
  }

  async function createPatient(body: object = patientBody) {
    const res = await ctx.inject({ method: 'POST', url: '/api/patients', payload: body });
    expect(res.statusCode, res.body).toBe(201);
    return res.json() as {
      id: number;
      targets: Record<string, { min: number | null; max: number | null }>;
    };
  }

  it('creates a patient with converted labs and cited targets', async () => {
    const p = await createPatient();
    // 1.94 mmol/L x 3.0974 = 6.01 mg/dL (IUPAC P 30.974 g/mol)
    const got = await ctx.inject({ method: 'GET', url: `/api/patients/${p.id}` });
    expect(got.json().labs[0]).toMatchObject({ mgPerDl: 6.01, mmolPerL: 1.94 });
    // KDOQI 2020, maintenance HD: 1.0-1.2 g/kg x 70 kg = 70-84 g
    expect(got.json().targets.proteinG).toMatchObject({ min: 70, max: 84 });
    const upd = await ctx.inject({
      method: 'PATCH',
      url: `/api/patients/${p.id}`,
      payload: { targetOverrides: { potassiumMg: { min: null, max: 2500 } } },
    });
    expect(upd.json().targets.potassiumMg).toMatchObject({ max: 2500, setBy: 'dietitian' });
  });

  it('refuses bad patient input with 400 naming the field and saves nothing', async () => {
    const cases: [object, RegExp][] = [
      [{ ...patientBody, weightKg: 12 }, /weightKg: weightKg must be between 20 and 300 kg/],
      [{ ...patientBody, weightKg: 301 }, /weightKg/],
      [
        { ...patientBody, ckdStage: '3b' },
        /ckdStage: ckdStage '3b' conflicts with dialysis 'hemodialysis'/,
      ],
    ];
    for (const [body, msg] of cases) {
      const res = await ctx.inject({ method: 'POST', url: '/api/patients', payload: body });
      expect(res.statusCode).toBe(400);
      expect(res.json().error.message).toMatch(msg);
    }
    // A patch that makes the merged record contradictory is refused too.
    const p = await createPatient({ ...patientBody, ckdStage: '4', dialysis: 'none' });
    const bad = await ctx.inject({
      method: 'PATCH',
      url: `/api/patients/${p.id}`,
      payload: { dialysis: 'peritoneal-dialysis' },
    });
    expect(bad.statusCode).toBe(400);
    expect(bad.json().error.message).toMatch(/ckdStage/);
    const list = await ctx.inject({ method: 'GET', url: '/api/patients' });
    expect(list.json()).toHaveLength(1);
    expect(list.json()[0].dialysis).toBe('none');
  });

  it.skipIf(!hasSr28)(
    t("a day's totals recomputed by hand from SR28 foods and household measures"),
    async () => {
      const p = await createPatient();
      const created = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${p.id}/plans`,
        payload: dayPlan(),
      });
      expect(created.statusCode, created.body).toBe(201);
      const res = await ctx.inject({
        method: 'GET',
        url: `/api/plans/${created.json().id}/summary`,
      });
      expect(res.statusCode).toBe(200);
      const s = res.json();
      const day = s.days[0];
      // Household measures (USDA SR28 WEIGHT) and values per 100 g (NUT_DATA: P, protein, K, Na, Ca, kcal):
      // egg 01123 2 x large 50 g = 100 g: P 198, prot 12.56, K 138, Na 142, Ca 56, 143 kcal
      // bread 18069 2 x slice 29 g = 58 g: P 98 x 0.58 = 56.84, prot 5.133, K 73.08, Na 284.2, Ca 83.52, 154.28 kcal
      // milk 01077 1 cup 244 g: P 84 x 2.44 = 204.96, prot 7.686, K 322.08, Na 104.92, Ca 275.72, 148.84 kcal
      // rice 20045 1 cup 158 g: P 67.94, prot 4.2502, K 55.3, Na 1.58, Ca 15.8, 205.4 kcal
      // chicken 05064 0.5 breast (0.5 breast = 86 g): P 196.08, prot 26.6772, K 220.16, Na 63.64, Ca 12.9, 141.9 kcal
      // apple 09003 1 medium 182 g: P 20.02, prot 0.4732, K 194.74, Na 1.82, Ca 10.92, 94.64 kcal
      // beans 16043 1 cup 171 g: P 251.37, prot 15.4071, K 745.56, Na 1.71, Ca 78.66, 244.53 kcal
      // cheddar 01009 1 oz 28.35 g: P 128.9925, prot 6.4836, K 21.546, Na 185.1255, Ca 201.285, 114.534 kcal
      // potato 11674 1 medium 173 g: P 121.1, prot 4.325, K 925.55, Na 17.3, Ca 25.95, 160.89 kcal
      // Sums: P 1,245.30 mg; protein 83.00 g; K 2,696.0 mg; Na 802.3 mg; Ca 760.8 mg; 1,408.0 kcal
      expect(day.nutrients).toMatchObject({
        phosphorusMg: 1245.3,
        proteinG: 83,
        potassiumMg: 2696,
        sodiumMg: 802.3,
        calciumMg: 760.8,
        energyKcal: 1408,
        phosphorusProteinRatioMgPerG: 15, // 1,245.30 / 83.00 = 15.0 mg/g
        incomplete: [],
      });
      // Breakfast: 198 + 56.84 + 204.96 = 459.8 mg P
      expect(day.occasions[0].nutrients.phosphorusMg).toBe(459.8);
      expect(day.occasions[0].items[0]).toMatchObject({
        grams: 100,
        label: 'huevos',
        measure: { count: 2, description: 'large' },
      });
      expect(day.occasions[1].items[1].grams).toBe(86);
      const abs = day.nutrients.absorbablePhosphorusMg;
      expect(abs.low).toBeLessThanOrEqual(abs.typical);
      expect(abs.typical).toBeLessThanOrEqual(abs.high);
      expect(abs.high).toBeLessThanOrEqual(1245.3);
      // Occasion sums add up to the day
      const occSum = day.occasions.reduce(
        (a: number, o: { nutrients: { absorbablePhosphorusMg: { typical: number } } }) =>
          a + o.nutrients.absorbablePhosphorusMg.typical,
        0,
      );
      expect(occSum).toBeCloseTo(abs.typical, 0);
      // Against targets: protein 83.0 in 70-84 (KDOQI 2020 HD); P 1,245 > 1,000 (KDOQI 2003); energy 1,408 < 1,750 (25 kcal x 70)
      const status = Object.fromEntries(
        day.status.checks.map((c: { target: string; status: string }) => [c.target, c.status]),
      );
      expect(status).toEqual({
        proteinG: 'within',
        energyKcal: 'below',
        sodiumMg: 'within',
        phosphorusMg: 'above',
        // hemodialysis: at most 2,737 mg offered (EBPG 2007, 70 mmol x 39.098 mg/mmol)
        potassiumMg: 'within',
        // diet calcium, no calcium binder in this record: under 2,000 mg (KDOQI 2003 Guideline 5)
        calciumMg: 'within',
      });
      expect(day.status.level).toBe('attention');
      // one day: the plan average equals the day
      expect(s.average.nutrients.phosphorusMg).toBe(1245.3);
      // top contributor by absorbable phosphorus is one of the big P items (beans, milk, egg or chicken)
      expect([f.beans.id, f.milk.id, f.egg.id, f.chicken.id]).toContain(
        s.topContributors[0].foodId,
      );
      // cheddar: 455 / 22.87 = 19.9 mg/g >= 16 (Noori 2010 band) -> high-ratio flag
      expect(s.flags.highRatioFoods.map((x: { foodId: number }) => x.foodId)).toContain(
        f.cheddar.id,
      );
      // binder: 6 units a day distributed over occasions; never more than prescribed
      const units = s.binders.perOccasion.map((o: { units: number }) => o.units);
      expect(units.reduce((a: number, b: number) => a + b, 0)).toBeLessThanOrEqual(6);
      // calcium acetate 667 mg x 6 = 6 x 169.01 = 1,014.1 mg elemental Ca/day
      expect(s.binders.elementalCalciumMgPerDay).toBeCloseTo(1014.1, 1);
      expect(s.binders.ingredient.spacingForListedMedicines[0].medicine).toBe('levothyroxine');
      // swaps for each top contributor (only this test's nine foods are in the table)
      const swaps = (
        await ctx.inject({ method: 'GET', url: `/api/plans/${created.json().id}/swaps?limit=2` })
      ).json();
      expect(swaps.map((x: { contributor: { foodId: number } }) => x.contributor.foodId)).toEqual(
        s.topContributors.map((c: { foodId: number }) => c.foodId),
      );
      for (const x of swaps) expect(x.swaps.swaps.length).toBeLessThanOrEqual(2);
      // JSON contract field names
      expect(Object.keys(s)).toEqual(
        expect.arrayContaining(['planId', 'patientId', 'days', 'binders']),
      );
      expect(Object.keys(day)).toEqual(
        expect.arrayContaining(['label', 'occasions', 'nutrients', 'targets', 'status']),
      );
      expect(Object.keys(day.occasions[0].items[0])).toEqual(
        expect.arrayContaining(['foodId', 'grams', 'label', 'nutrients']),
      );
      expect(Object.keys(s.binders)).toEqual(
        expect.arrayContaining(['prescription', 'perOccasion', 'elementalCalciumMgPerDay']),
      );
      expect(Object.keys(s.binders.perOccasion[0])).toEqual(
        expect.arrayContaining(['day', 'occasion', 'units', 'timing']),
      );
      expect(Object.keys(day.nutrients).sort()).toEqual(
        [
          'phosphorusMg',
          'absorbablePhosphorusMg',
          'additivePhosphorusMg',
          'proteinG',
          'phosphorusProteinRatioMgPerG',
          'potassiumMg',
          'sodiumMg',
          'calciumMg',
          'energyKcal',
          'incomplete',
        ].sort(),
      );
    },
  );

  it.skipIf(!hasSr28)(
    t('bad plans are refused with 400 naming the field and nothing is half-saved'),
    async () => {
      const p = await createPatient();
      const good = dayPlan();
      const withItem = (item: object) => {
        const plan = structuredClone(good);
        (plan.days[0]?.occasions[0]?.items as object[]).push(item);
        return plan;
      };
      const cases: [object, string, RegExp][] = [
        [
          withItem({ foodId: 987654, grams: 10 }),
          'PHL_PLAN_INVALID',
          /days\.0\.occasions\.0\.items\.3\.foodId: unknown food id 987654/,
        ],
        [withItem({ foodId: f.egg.id, grams: 0 }), 'PHL_REQUEST_INVALID', /items\.3\.grams/],
        [withItem({ foodId: f.egg.id, grams: 5001 }), 'PHL_REQUEST_INVALID', /at most 5000/],
        [
          withItem({
            foodId: f.egg.id,
            measure: { portionId: measure(f.milk, (x) => x.description === 'cup'), count: 1 },
          }),
          'PHL_PLAN_INVALID',
          /items\.3\.measure\.portionId: household measure \d+ is not one of food/,
        ],
        [{ name: 'Empty', days: [] }, 'PHL_REQUEST_INVALID', /days: a plan needs at least one day/],
      ];
      for (const [body, code, msg] of cases) {
        const res = await ctx.inject({
          method: 'POST',
          url: `/api/patients/${p.id}/plans`,
          payload: body,
        });
        expect(res.statusCode, JSON.stringify(body).slice(0, 80)).toBe(400);
        expect(res.json().error.code).toBe(code);
        expect(res.json().error.message).toMatch(msg);
      }
      expect((await ctx.inject({ method: 'GET', url: '/api/plans' })).json()).toEqual([]);
      const versions = ctx.db.sqlite.prepare('select count(*) as n from plan_version').get() as {
        n: number;
      };
      expect(versions.n).toBe(0);
      const unknownPatient = await ctx.inject({
        method: 'POST',
        url: '/api/patients/999/plans',
        payload: good,
      });
      expect(unknownPatient.statusCode).toBe(404);
    },
  );

  it.skipIf(!hasSr28)(
    t('saving keeps earlier versions, which summarise exactly as before'),
    async () => {
      const p = await createPatient();
      const created = (
        await ctx.inject({ method: 'POST', url: `/api/patients/${p.id}/plans`, payload: dayPlan() })
      ).json();
      const v1 = (await ctx.inject({ method: 'GET', url: `/api/plans/${created.id}/summary` }))
        .body;

      // A second consult: less cheese; then the food table and the record change.
      const plan2 = dayPlan();
      plan2.name = 'Consult 2';
      plan2.days[0]?.occasions[3]?.items.splice(1, 1);
      const saved = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${created.id}`,
        payload: plan2,
      });
      expect(saved.statusCode, saved.body).toBe(200);
      expect(saved.json()).toMatchObject({ version: 2, latestVersion: 2, name: 'Consult 2' });
      // a bad save is refused and adds no version
      const badSave = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${created.id}`,
        payload: { ...plan2, days: [] },
      });
      expect(badSave.statusCode).toBe(400);
      ctx.db.sqlite.prepare('update food set phosphorus_mg = phosphorus_mg * 2').run();
      await ctx.inject({
        method: 'PATCH',
        url: `/api/patients/${p.id}`,
        payload: { weightKg: 90 },
      });

      const again = await ctx.inject({
        method: 'GET',
        url: `/api/plans/${created.id}/summary?version=1`,
      });
      expect(again.body).toBe(v1);
      // ... and recomputed from scratch by a fresh service (no cached summary) it is the same
      const fresh = new PlanService(
        ctx.db.kysely,
        ctx.clock,
        new FoodRepository(ctx.db.kysely),
        settingsSource(ctx.db),
      );
      expect(await fresh.getSummaryJson(created.id, 1)).toBe(v1);
      // gzip when the client accepts it, the same JSON inside
      const gz = await ctx.inject({
        method: 'GET',
        url: `/api/plans/${created.id}/summary?version=1`,
        headers: { 'accept-encoding': 'gzip, deflate' },
      });
      expect(gz.headers['content-encoding']).toBe('gzip');
      expect(gunzipSync(gz.rawPayload).toString('utf8')).toBe(v1);
      const versions = (
        await ctx.inject({ method: 'GET', url: `/api/plans/${created.id}/versions` })
      ).json();
      expect(versions.map((v: { version: number; name: string }) => [v.version, v.name])).toEqual([
        [1, 'Consult 1'],
        [2, 'Consult 2'],
      ]);
      const old = (
        await ctx.inject({ method: 'GET', url: `/api/plans/${created.id}/versions/1` })
      ).json();
      expect(old.days[0].occasions[3].items).toHaveLength(3);
      const latest = (
        await ctx.inject({ method: 'GET', url: `/api/plans/${created.id}/summary` })
      ).json();
      // version 2 froze the table as it was when saved (before the doubling): 1,245.30 - 128.99 (cheddar) = 1,116.3
      expect(latest.days[0].nutrients.phosphorusMg).toBe(1116.3);
      // the database refuses to change a version
      expect(() => ctx.db.sqlite.prepare("update plan_version set name = 'x'").run()).toThrow(
        /immutable/,
      );
      expect(() => ctx.db.sqlite.prepare('delete from plan_version').run()).toThrow(/immutable/);
      const list = (await ctx.inject({ method: 'GET', url: '/api/plans' })).json();
      expect(list).toEqual([
        expect.objectContaining({
          id: created.id,
          patientId: p.id,
          name: 'Consult 2',
          days: 1,
          latestVersion: 2,
        }),
      ]);
      expect(
        (await ctx.inject({ method: 'GET', url: `/api/plans/${created.id}/binders` })).json()
          .perOccasion,
      ).toHaveLength(4);
    },
  );

  it.skipIf(!hasSr28)(
    t('swaps: same group, clearly less absorbable P per g protein, cheeses first, best first'),
    async () => {
      // Besides this test's foods (cheddar 01009, egg 01123, milk 01077, ...), more SR28 dairy and
      // egg foods (P mg / protein g per 100 g) and one fruit of another group, as a second source
      insertFoods(
        ctx.db,
        sr28Foods('01012', '01016', '01124', '01026', '01017', '01001', '01256', '09003'),
        {
          format: 'usda-sr28',
          name: 'USDA SR28 (second test subset)',
          release: 'SR28-test-2',
        },
      );
      const cheddar = f.cheddar;
      const res = await ctx.inject({ method: 'GET', url: `/api/swaps/${cheddar?.id}` });
      expect(res.statusCode).toBe(200);
      const r = res.json();
      // All are animal foods with the same split here, so shares follow total P / protein:
      // cheddar 01009 455/22.87 = 19.89 mg/g (the reference)
      // cottage 1% 01016 134/12.39 = 10.82 -> 0.544; cottage creamed 01012 159/11.12 = 14.30 -> 0.719
      // Greek yogurt 01256 135/10.19 = 13.25 -> 0.666
      // egg white 01124 and whole egg 01123 are raw (not ready to eat as the cheese is): no swap
      // mozzarella 01026 354/22.17 = 15.97 -> 0.803 > 0.8 (not clearly less); cream cheese 01017 17.4 -> 0.875
      // butter 01001 (0.85 g protein), milk 01077 (3.15 g < 25% of 22.87 g) and apple 09003 (another
      // group) are not compared. Cheddar carries little potassium (76 / 22.87 = 3.3 mg per g
      // protein): cottage 1% 2.09x, creamed 2.81x, Greek yogurt 4.16x, all over +20%, so they
      // are shown only with a potassium caution, the two cheeses first (the same kind of food).
      expect(r.basis).toBe('per-g-protein');
      expect(r.swaps).toEqual([]);
      expect(r.cautioned.map((x: { code: string }) => x.code)).toEqual(['01016', '01012', '01256']);
      expect(r.cautioned.map((x: { shareOfOriginal: number }) => x.shareOfOriginal)).toEqual([
        0.544, 0.719, 0.666,
      ]);
      expect(r.cautioned.map((x: { potassiumShare: number }) => x.potassiumShare)).toEqual([
        2.089, 2.814, 4.164,
      ]);
      expect(r.cautioned.map((x: { sameKind: boolean }) => x.sameKind)).toEqual([
        true,
        true,
        false,
      ]);
      const one = await ctx.inject({ method: 'GET', url: `/api/swaps/${cheddar?.id}?limit=1` });
      expect(one.json().cautioned).toHaveLength(1);
      expect((await ctx.inject({ method: 'GET', url: '/api/swaps/999999' })).statusCode).toBe(404);
      expect(
        (await ctx.inject({ method: 'GET', url: `/api/swaps/${cheddar?.id}?limit=6` })).statusCode,
      ).toBe(400);
    },
  );

  it('patient and plan routes need a signed-in user', async () => {
    for (const url of ['/api/patients', '/api/plans', '/api/plans/1/summary']) {
      const res = await ctx.app.inject({ method: 'GET', url });
      expect(res.statusCode).toBe(401);
    }
  });
});
