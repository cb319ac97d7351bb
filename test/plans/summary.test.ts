import { testFood } from '../helpers/food.js';
import { describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { profileFood } from '../../src/phosphorus/profile.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import type { PlanDay } from '../../src/plans/plan.js';
import { planSummarySchema } from '../../src/plans/summary.schema.js';
import { summarizePlan } from '../../src/plans/summary.js';

// Invented test foods (values invented, not from any table) to exercise the arithmetic.
function food(
  id: number,
  name: string,
  per100g: Partial<Food['per100g']>,
  group = 'Invented',
): Food {
  return testFood({ id, name, group, per100g });
}

const a = food(1, 'Invented food A', {
  phosphorusMg: 200,
  proteinG: 20,
  energyKcal: 150,
  potassiumMg: 300,
  sodiumMg: 100,
  calciumMg: 50,
});
// no potassium value in its table: totals that include it are lower bounds
const b = food(2, 'Invented food B', {
  phosphorusMg: 100,
  proteinG: 4,
  energyKcal: 80,
  sodiumMg: 10,
  calciumMg: 5,
});
const foods = new Map([a, b].map((f) => [f.id, f]));
const targets = computeTargets({
  weightKg: 50,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  targetOverrides: {},
  // Invented demo result: 5.2 mg/dL is above KDOQI 2003's 4.6 mg/dL for CKD 3-4, so the
  // 800-1,000 mg/day phosphorus default applies.
  labs: [{ analyte: 'phosphate', value: 5.2, unit: 'mg/dL', date: '2026-03-01' }],
});
const settings = { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS };

const item = (foodId: number, grams: number) => ({ foodId, grams, measure: null, label: null });
const days: PlanDay[] = [
  {
    label: 'Day 1',
    occasions: [
      { name: 'Lunch', kind: 'meal', time: '12:30', items: [item(1, 150), item(2, 50)] },
      { name: 'Snack', kind: 'snack', time: null, items: [item(2, 20)] },
    ],
  },
  {
    label: 'Day 2',
    occasions: [{ name: 'Lunch', kind: 'meal', time: null, items: [item(1, 50)] }],
  },
];
const plan = { planId: 7, patientId: 3, version: 2, name: 'Invented', days };

describe('summarizePlan arithmetic (invented foods; expected values worked by hand)', () => {
  const s = summarizePlan(plan, foods, targets, settings);

  it('sums items into occasions, days and the plan average', () => {
    // Day 1: A 150 g -> P 300, protein 30, K 450, Na 150, Ca 75, 225 kcal
    //        B 50 g -> P 50, protein 2, Na 5, Ca 2.5, 40 kcal; B 20 g -> P 20, protein 0.8, Na 2, Ca 1, 16 kcal
    const d1 = s.days[0];
    expect(d1?.occasions[0]?.nutrients).toMatchObject({
      phosphorusMg: 350,
      proteinG: 32,
      potassiumMg: 450,
    });
    expect(d1?.nutrients).toMatchObject({
      phosphorusMg: 370,
      proteinG: 32.8,
      potassiumMg: 450, // B has no potassium value
      sodiumMg: 157,
      calciumMg: 78.5,
      energyKcal: 281,
      phosphorusProteinRatioMgPerG: 11.3, // 370 / 32.8 = 11.28
      incomplete: ['potassiumMg'],
    });
    expect(d1?.occasions[0]?.items[1]?.nutrients.potassiumMg).toBeNull();
    // Day 2: A 50 g -> P 100, protein 10; average over 2 days: P (370 + 100) / 2 = 235, protein 21.4
    expect(s.average.nutrients).toMatchObject({ phosphorusMg: 235, proteinG: 21.4 });
  });

  it('absorbable phosphorus is the phosphorus model scaled to the grams', () => {
    // 150 g of A = 1.5 x its per-100 g profile (scaleProfile), whatever split the model finds
    const pa = profileFood(a, DEFAULT_ABSORPTION_FRACTIONS).absorbableMg;
    const pb = profileFood(b, DEFAULT_ABSORPTION_FRACTIONS).absorbableMg;
    if (!pa || !pb) throw new Error('profiles need total P');
    const typical = 1.5 * pa.typical + 0.5 * pb.typical + 0.2 * pb.typical;
    expect(s.days[0]?.nutrients.absorbablePhosphorusMg.typical).toBeCloseTo(typical, 1);
  });

  it('checks each day against the targets (KDOQI 2020 CKD 4: protein 0.55-0.60 g/kg x 50 kg = 27.5-30 g)', () => {
    const checks = Object.fromEntries((s.days[0]?.status.checks ?? []).map((c) => [c.target, c]));
    expect(checks.proteinG).toMatchObject({ status: 'above', min: 27.5, max: 30 }); // 32.8 > 30
    // 281 kcal < 25 x 50 = 1,250 kcal
    expect(checks.energyKcal?.status).toBe('below');
    expect(checks.phosphorusMg?.status).toBe('below'); // 370 < 800 (KDOQI 2003 range offered)
    expect(checks.potassiumMg).toMatchObject({ status: 'not-set', incomplete: true });
    expect(checks.potassiumMg?.message).toMatch(/lower bound/);
    expect(s.days[1]?.status.level).toBe('attention');
  });

  it('ranks contributors by absorbable phosphorus over the plan and shares of total P', () => {
    // plan P 470 mg: A 300 + 100 = 400 (85.1%), B 50 + 20 = 70 (14.9%)
    expect(
      s.topContributors.map((c) => [c.foodId, c.phosphorusMg, c.share, c.occurrences]),
    ).toEqual([
      [1, 400, 0.851, 2],
      [2, 70, 0.149, 2],
    ]);
    // B: 100 / 4 = 25 mg/g >= 16 and 4 g protein >= 2.5 g -> high ratio; A 10 mg/g is not
    expect(s.flags.highRatioFoods.map((f) => f.foodId)).toEqual([2]);
  });

  it('without a prescription the binder section says so and lists nothing', () => {
    expect(s.binders).toMatchObject({
      prescription: null,
      perOccasion: [],
      elementalCalciumMgPerDay: 0,
    });
  });

  it('pairs a per-meal prescription with meals only, day by day', () => {
    const withBinder = summarizePlan(plan, foods, targets, settings, {
      ingredient: 'sucroferric-oxyhydroxide',
      unitStrengthMg: 2500,
      schedule: 'per-meal',
      units: 1,
      otherMedicines: ['Levothyroxine sodium'],
    });
    expect(withBinder.binders.perOccasion.map((o) => [o.day, o.occasion, o.units])).toEqual([
      ['Day 1', 'Lunch', 1],
      ['Day 1', 'Snack', 0],
      ['Day 2', 'Lunch', 1],
    ]);
    expect(withBinder.binders.ingredient?.pbedGPerUnit).toBeNull(); // not in Daugirdas 2011
    expect(withBinder.binders.ingredient?.spacingForListedMedicines[0]?.notes[0]?.medicines).toBe(
      'levothyroxine',
    );
    expect(withBinder.binders.elementalCalciumMgPerDay).toBe(0);
  });

  it('the OpenAPI response schema describes every field (parsing loses nothing)', () => {
    expect(planSummarySchema.parse(s)).toEqual(s);
    const withBinder = summarizePlan(plan, foods, targets, settings, {
      ingredient: 'calcium-acetate',
      unitStrengthMg: 667,
      schedule: 'per-day',
      units: 3,
      otherMedicines: [],
    });
    expect(planSummarySchema.parse(withBinder)).toEqual(withBinder);
  });
});
