/**
 * Random small balancing problems from a seeded generator (invented demo foods and targets,
 * not from any table): for the solver comparison, the property test and the benchmark.
 */
import type { Food } from '../../src/foods/food.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import type { PlanContent, PlanItem } from '../../src/plans/plan.js';
import { DEFAULT_BALANCING, type PlacedCandidate } from '../../src/balance/balance.js';
import type { BalanceProblem } from '../../src/balance/balancer.js';
import { testFood } from '../helpers/food.js';

/** mulberry32: a small seeded generator, so every run draws the same instances. */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const GROUPS = [
  'Dairy and Egg Products',
  'Poultry Products',
  'Cereal Grains and Pasta',
  'Vegetables and Vegetable Products',
  'Fruits and Fruit Juices',
  'Legumes and Legume Products',
];
const NAMES = [
  'Milk, invented',
  'Chicken, invented',
  'Rice, invented',
  'Cabbage, invented',
  'Apple, invented',
  'Lentils, invented',
];

/** An invented food with values in the ranges of everyday foods (per 100 g). */
export function randomFood(rnd: () => number, id: number): Food {
  const k = Math.floor(rnd() * GROUPS.length);
  const withPortion = rnd() < 0.5;
  return testFood({
    id,
    name: `${NAMES[k]} ${id}`,
    group: GROUPS[k] as string,
    per100g: {
      phosphorusMg: Math.round(20 + rnd() * 480),
      proteinG: Math.round((0.5 + rnd() * 30) * 10) / 10,
      energyKcal: Math.round(20 + rnd() * 480),
      sodiumMg: Math.round(rnd() * 800),
      potassiumMg: Math.round(50 + rnd() * 550),
      calciumMg: Math.round(5 + rnd() * 295),
    },
    portions: withPortion
      ? [
          {
            id: id * 10,
            description: 'invented portion',
            amount: 1,
            grams: Math.round(20 + rnd() * 180),
          },
        ]
      : [],
  });
}

export interface RandomInstance {
  problem: BalanceProblem;
}

/**
 * A random plan of `days` days with `items` items a day over three occasions, `candidates`
 * candidate foods a day, and targets drawn around the plan's own totals (so some instances are
 * feasible as they stand, some need changes and some cannot be met).
 */
export function randomProblem(
  rnd: () => number,
  shape: { days: number; items: number; candidates: number } = { days: 1, items: 5, candidates: 3 },
): BalanceProblem {
  const foods = new Map<number, Food>();
  let nextId = 1;
  const newFood = () => {
    const f = randomFood(rnd, nextId++);
    foods.set(f.id, f);
    return f;
  };
  const occasions = ['Breakfast', 'Lunch', 'Dinner'];
  const plan: PlanContent = { name: 'Random plan (invented demo data)', days: [] };
  const candidates: PlacedCandidate[] = [];
  let protein = 0;
  let energy = 0;
  let sodium = 0;
  let potassium = 0;
  let calcium = 0;
  let phosphorus = 0;
  for (let d = 0; d < shape.days; d++) {
    const occ = occasions.map((name) => ({
      name,
      kind: 'meal' as const,
      time: null,
      items: [] as PlanItem[],
    }));
    for (let i = 0; i < shape.items; i++) {
      const f = newFood();
      const portion = f.portions[0];
      const count = 1 + Math.floor(rnd() * 3);
      const grams = portion ? portion.grams * count : 5 * Math.round((20 + rnd() * 180) / 5);
      occ[i % occ.length]!.items.push({
        foodId: f.id,
        grams,
        measure: portion
          ? {
              portionId: portion.id,
              count,
              description: portion.description,
              gramsPerUnit: portion.grams,
            }
          : null,
        label: null,
      });
      protein += ((f.per100g.proteinG ?? 0) * grams) / 100;
      energy += ((f.per100g.energyKcal ?? 0) * grams) / 100;
      sodium += ((f.per100g.sodiumMg ?? 0) * grams) / 100;
      potassium += ((f.per100g.potassiumMg ?? 0) * grams) / 100;
      calcium += ((f.per100g.calciumMg ?? 0) * grams) / 100;
      phosphorus += ((f.per100g.phosphorusMg ?? 0) * grams) / 100;
    }
    for (let c = 0; c < shape.candidates; c++) {
      candidates.push({ foodId: newFood().id, day: d, occasion: Math.floor(rnd() * occ.length) });
    }
    plan.days.push({ label: `Day ${d + 1}`, occasions: occ });
  }
  // limits drawn around the plan's own daily totals: some met as it stands, some not
  const around = (total: number, lo: number, span: number) =>
    Math.round((total / shape.days) * (lo + rnd() * span));
  const perDayProtein = protein / shape.days;
  const perDayEnergy = energy / shape.days;
  const pMin = Math.round(perDayProtein * (0.7 + rnd() * 0.6));
  const eMin = Math.round(perDayEnergy * (0.6 + rnd() * 0.5));
  const targets = computeTargets({
    weightKg: 70,
    ckdStage: '4',
    dialysis: 'none',
    diabetes: false,
    targetOverrides: {
      proteinG: { min: pMin, max: Math.round(pMin * (1.2 + rnd() * 0.5)) },
      energyKcal: { min: eMin, max: Math.round(eMin * (1.3 + rnd())) },
      sodiumMg: { min: null, max: Math.max(1, around(sodium, 0.8, 0.8)) },
      potassiumMg:
        rnd() < 0.5
          ? { min: null, max: Math.max(1, around(potassium, 0.8, 0.8)) }
          : { min: null, max: null },
      phosphorusMg: { min: null, max: Math.max(1, around(phosphorus, 0.7, 0.6)) },
      // the stage's calcium target (800-1,000 mg, KDOQI 2020) would make almost every invented
      // day infeasible: drawn around the plan's own calcium like the other limits
      calciumMg: { min: null, max: Math.max(1, around(calcium, 0.8, 0.8)) },
    },
  });
  return {
    plan,
    days: plan.days.map((_, i) => i),
    foods,
    targets,
    settings: { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
    binder: null,
    balancing: {
      ...DEFAULT_BALANCING,
      mealProteinMinShare: rnd() < 0.3 ? 0.2 : null,
      calciumMaxMg: rnd() < 0.3 ? Math.round(500 + rnd() * 1000) : null,
    },
    robust: rnd() < 0.2,
    choices: [],
    candidates,
  };
}
