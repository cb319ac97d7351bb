/**
 * A three-food day small enough to balance by hand (invented demo foods, not from any table).
 * Every absorption fraction is set to 0.5, so absorbable phosphorus = 0.5 x total phosphorus
 * whatever the source split, and the arithmetic below can be followed with a pencil.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import type { PlanContent } from '../../src/plans/plan.js';
import { DEFAULT_BALANCING } from '../../src/balance/balance.js';
import { balancePlan, type BalanceProblem } from '../../src/balance/balancer.js';
import { highsSolver } from '../../src/balance/highs-solver.js';
import type { LpSolver } from '../../src/balance/lp-model.js';
import { testFood } from '../helpers/food.js';

const half = { low: 0.5, typical: 0.5, high: 0.5 }; // invented: one fraction for every source
const absorption = {
  animalOrganic: half,
  plantOrganic: half,
  phytate: half,
  additive: half,
  unknown: half,
};

// Invented demo foods, per 100 g.
const eggWhite = testFood({
  id: 1,
  name: 'Invented egg white',
  per100g: { phosphorusMg: 20, proteinG: 10, energyKcal: 50 },
}); // 2 mg P per g protein
const cheese = testFood({
  id: 2,
  name: 'Invented hard cheese',
  per100g: { phosphorusMg: 500, proteinG: 25, energyKcal: 400 },
}); // 20 mg P per g protein
const rice = testFood({
  id: 3,
  name: 'Invented boiled rice',
  per100g: { phosphorusMg: 100, proteinG: 2.5, energyKcal: 130 },
});
const foods = new Map<number, Food>([eggWhite, cheese, rice].map((f) => [f.id, f]));

const item = (foodId: number, grams: number) => ({ foodId, grams, measure: null, label: null });
const plan: PlanContent = {
  name: 'Worked example (invented demo data)',
  days: [
    {
      label: 'Day 1',
      occasions: [
        { name: 'Breakfast', kind: 'meal', time: null, items: [item(1, 100)] },
        { name: 'Lunch', kind: 'meal', time: null, items: [item(2, 40), item(3, 200)] },
      ],
    },
  ],
};

// Protein at least 29.9 g, at most 40 g (invented demo targets); energy left open.
const targets = computeTargets({
  weightKg: 60,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  targetOverrides: {
    proteinG: { min: 29.9, max: 40 },
    energyKcal: { min: null, max: null },
  },
});

function problem(over: Partial<BalanceProblem> = {}): BalanceProblem {
  return {
    plan,
    days: [0],
    foods,
    targets,
    settings: { absorption, thresholds: DEFAULT_THRESHOLDS },
    binder: null,
    balancing: { ...DEFAULT_BALANCING, deviationPenaltyMgPer100g: 0, newFoodPenaltyMg: 0 },
    robust: false,
    // egg white 50-200% (50-200 g), cheese 25-200% (10-80 g), rice kept at 200 g
    choices: [
      { day: 1, occasion: 1, item: 1, mode: 'adjust' },
      { day: 1, occasion: 2, item: 1, mode: 'adjust', minShare: 0.25 },
      { day: 1, occasion: 2, item: 2, mode: 'keep' },
    ],
    candidates: [],
    ...over,
  };
}

describe('worked example: three foods balanced by hand (invented demo data)', () => {
  let solver: LpSolver;
  beforeAll(async () => {
    solver = await highsSolver();
  });

  it('moves protein from cheese to egg white, in 5 g steps', () => {
    // Before: protein 100 x 0.10 + 40 x 0.25 + 200 x 0.025 = 10 + 10 + 5 = 25 g (below 29.9 g).
    //   absorbable P = 0.5 x (100 x 0.20 + 40 x 5.00 + 200 x 1.00) = 0.5 x 420 = 210 mg.
    // Absorbable P per g protein: egg white 0.5 x 2 = 1 mg/g, cheese 0.5 x 20 = 10 mg/g, so the
    // best plan takes egg white to its ceiling (200% = 200 g, 20 g protein) and then needs
    // 29.9 - 20 - 5 = 4.9 g from cheese = 19.6 g of cheese, rounded up to the 5 g step: 20 g.
    // After: protein 20 + 5 + 5 = 30 g; absorbable = 0.5 x (200 x 0.2 + 20 x 5 + 200 x 1)
    //   = 0.5 x (40 + 100 + 200) = 170 mg.
    const r = balancePlan(problem(), solver);
    expect(r.status).toBe('optimal');
    expect(r.before.proteinG).toBe(25);
    expect(r.before.absorbablePhosphorusMg.typical).toBe(210);
    expect(r.after.proteinG).toBe(30);
    expect(r.after.absorbablePhosphorusMg.typical).toBe(170);
    expect(r.changes).toEqual([
      expect.objectContaining({
        day: 1,
        occasion: 'Breakfast',
        foodId: 1,
        gramsBefore: 100,
        gramsAfter: 200,
      }),
      expect.objectContaining({
        day: 1,
        occasion: 'Lunch',
        foodId: 2,
        gramsBefore: 40,
        gramsAfter: 20,
      }),
    ]);
    expect(r.relaxed).toEqual([]);
  });

  it('prices the protein minimum from the duals: 10 mg absorbable P per g protein', () => {
    // With egg white at its ceiling, the last gram of protein comes from cheese:
    // 1 g protein = 4 g cheese = 4 x 5 mg P = 20 mg P, x 0.5 absorbed = 10 mg.
    const r = balancePlan(problem(), solver);
    expect(r.binding).toEqual([
      expect.objectContaining({ limit: 'day 1 proteinG.min', price: 10, day: 1 }),
    ]);
    expect(r.binding[0]?.unit).toBe('mg absorbable phosphorus per 1 g of protein');
  });

  it('reports the nearest plan and the miss when the protein target cannot be met', () => {
    // Everything at its ceiling: egg white 200 g (20 g), cheese 80 g (20 g), rice 200 g (5 g)
    // = 45 g. A minimum of 50 g cannot be met: the nearest plan is 5 g short.
    const high = computeTargets({
      weightKg: 60,
      ckdStage: '4',
      dialysis: 'none',
      diabetes: false,
      targetOverrides: { proteinG: { min: 50, max: 60 }, energyKcal: { min: null, max: null } },
    });
    const r = balancePlan(problem({ targets: high }), solver);
    expect(r.status).toBe('relaxed');
    expect(r.relaxed).toEqual([
      expect.objectContaining({ limit: 'day 1 proteinG.min', by: 5, unit: 'g' }),
    ]);
    expect(r.after.proteinG).toBe(45);
  });

  it('keeps the plan when it already is the best one', () => {
    // Everything kept: nothing may move, so the answer is the plan as it stands.
    const r = balancePlan(
      problem({
        choices: [
          { day: 1, occasion: 1, item: 1, mode: 'keep' },
          { day: 1, occasion: 2, item: 1, mode: 'keep' },
          { day: 1, occasion: 2, item: 2, mode: 'keep' },
        ],
        targets: computeTargets({
          weightKg: 60,
          ckdStage: '4',
          dialysis: 'none',
          diabetes: false,
          targetOverrides: { proteinG: { min: 20, max: 40 }, energyKcal: { min: null, max: null } },
        }),
      }),
      solver,
    );
    expect(r.status).toBe('unchanged');
    expect(r.changes).toEqual([]);
  });

  it('relaxes only the day that cannot meet its limits when the whole plan is balanced', () => {
    // Day 2 is rice alone, kept: 200 g x 0.025 = 5 g protein, 24.9 g short of 29.9 g whatever
    // happens; day 1 is balanced exactly as above (egg white 200 g, cheese 20 g).
    const twoDays: PlanContent = {
      ...plan,
      days: [
        plan.days[0]!,
        {
          label: 'Day 2',
          occasions: [{ name: 'Lunch', kind: 'meal', time: null, items: [item(3, 200)] }],
        },
      ],
    };
    const r = balancePlan(
      problem({
        plan: twoDays,
        days: [0, 1],
        choices: [...problem().choices, { day: 2, occasion: 1, item: 1, mode: 'keep' }],
      }),
      solver,
    );
    expect(r.status).toBe('relaxed');
    expect(r.relaxed).toEqual([
      expect.objectContaining({ limit: 'day 2 proteinG.min', by: 24.9, unit: 'g' }),
    ]);
    expect(r.days[0]!.after.proteinG).toBe(30);
    expect(r.days[0]!.after.absorbablePhosphorusMg.typical).toBe(170);
  });
});
