/**
 * Balancing a plan whose items are cooked by a preparation method: the programme counts each
 * prepared item as the summary does, so its proposal passes the summary's re-check, and the
 * proposal keeps the method. Foods are invented demo foods named like raw table entries.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_BALANCING } from '../../src/balance/balance.js';
import { preparedPerGram } from '../../src/balance/balance-model.js';
import { balancePlan, type BalanceProblem } from '../../src/balance/balancer.js';
import { highsSolver } from '../../src/balance/highs-solver.js';
import type { LpSolver } from '../../src/balance/lp-model.js';
import type { Food } from '../../src/foods/food.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import { resolvePlan, type PlanContent } from '../../src/plans/plan.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { testFood } from '../helpers/food.js';

// Invented demo values per 100 g, close to a raw chicken breast and raw potato.
const chicken = testFood({
  id: 1,
  name: 'Chicken, broilers or fryers, breast, meat only, raw',
  group: 'Poultry Products',
  per100g: { phosphorusMg: 210, proteinG: 22, energyKcal: 120, potassiumMg: 330, sodiumMg: 45 },
});
const potato = testFood({
  id: 2,
  name: 'Potatoes, flesh and skin, raw',
  group: 'Vegetables and Vegetable Products',
  per100g: { phosphorusMg: 57, proteinG: 2, energyKcal: 77, potassiumMg: 420, sodiumMg: 6 },
});
const foods = new Map<number, Food>([chicken, potato].map((f) => [f.id, f]));

const plan: PlanContent = {
  name: 'Prepared items (invented demo data)',
  days: [
    {
      label: 'Day 1',
      occasions: [
        {
          name: 'Lunch',
          kind: 'meal',
          time: null,
          items: [
            {
              foodId: 1,
              grams: 80,
              measure: null,
              label: null,
              preparation: 'boil-drain',
              weightBasis: 'table',
            },
            {
              foodId: 2,
              grams: 200,
              measure: null,
              label: null,
              preparation: 'soak-boil-drain',
              weightBasis: 'table',
            },
          ],
        },
      ],
    },
  ],
};

// Protein at least 30 g (invented demo target, above what the day brings); energy left open.
const targets = computeTargets({
  weightKg: 60,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  targetOverrides: {
    proteinG: { min: 30, max: 60 },
    energyKcal: { min: null, max: null },
  },
});

const problem: BalanceProblem = {
  plan,
  days: [0],
  foods,
  targets,
  settings: { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
  binder: null,
  balancing: { ...DEFAULT_BALANCING, deviationPenaltyMgPer100g: 0, newFoodPenaltyMg: 0 },
  robust: false,
  choices: [],
  candidates: [],
};

const summarise = (content: PlanContent) =>
  summarizePlan(
    { ...content, planId: 0, patientId: 0, version: 0 },
    foods,
    targets,
    problem.settings,
  ).days[0]!;

describe('balancing prepared items (invented demo foods)', () => {
  let solver: LpSolver;
  beforeAll(async () => {
    solver = await highsSolver();
  });

  it('counts a prepared item per gram exactly as the summary does', () => {
    const prep = { method: 'boil-drain' as const, basis: 'table' as const };
    const per = preparedPerGram(chicken, DEFAULT_ABSORPTION_FRACTIONS, false, prep);
    const day = summarise(plan);
    const item = day.occasions[0]!.items[0]!;
    // 80 g x the per-gram prepared values = what the summary shows for the item
    expect(per).not.toBeNull();
    expect(80 * per!.proteinG).toBeCloseTo(item.nutrients.proteinG as number, 2);
    expect(80 * per!.phosphorusMg).toBeCloseTo(item.nutrients.phosphorusMg as number, 1);
    expect(80 * per!.potassiumMg).toBeCloseTo(item.nutrients.potassiumMg as number, 1);
    // boiling keeps less phosphorus than protein, so prepared P per g protein is lower than raw
    // (210 / 22 = 9.5 mg/g as listed)
    expect(per!.phosphorusMg / per!.proteinG).toBeLessThan(210 / 22);
  });

  it('meets the protein minimum on the summary of its proposal, which keeps the methods', () => {
    const before = summarise(plan);
    expect(before.nutrients.proteinG).toBeLessThan(30);
    const r = balancePlan(problem, solver);
    expect(r.status).toBe('optimal');
    const resolved = resolvePlan(r.proposal, foods);
    expect(resolved.ok).toBe(true);
    if (!resolved.ok) throw new Error('proposal does not resolve');
    const items = resolved.value.days[0]!.occasions[0]!.items;
    expect(items.map((i) => [i.foodId, i.preparation, i.weightBasis])).toEqual([
      [1, 'boil-drain', 'table'],
      [2, 'soak-boil-drain', 'table'],
    ]);
    const after = summarise(resolved.value);
    expect(after.nutrients.proteinG).toBeGreaterThanOrEqual(30);
    expect(r.after.proteinG).toBeCloseTo(after.nutrients.proteinG, 1);
  });
});
