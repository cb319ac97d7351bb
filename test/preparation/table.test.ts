import { describe, expect, it } from 'vitest';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import { planInputSchema, resolvePlan, type PlanItem } from '../../src/plans/plan.js';
import { planSummarySchema } from '../../src/plans/summary.schema.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { cookedStateOf, prepClassOf } from '../../src/preparation/cooked-state.js';
import { PLATE_YIELD, PREPARATION_METHODS, PREP_NUTRIENTS } from '../../src/preparation/methods.js';
import { toFoodPreparationJson } from '../../src/preparation/preparation.json.js';
import { testFood } from '../helpers/food.js';

// Names below are written like USDA SR28 descriptions; values are invented demo data.
const state = (name: string, group: string | null = null, source = 'usda-sr28') =>
  cookedStateOf({ name, group, source }).state;

describe('cooked state from the table description (one rule, its exceptions)', () => {
  it('reads raw, cooked and unknown', () => {
    expect(state('Chicken, broilers or fryers, breast, meat only, cooked, stewed')).toBe('cooked');
    expect(state('Potatoes, boiled, cooked without skin, flesh, without salt')).toBe('cooked');
    expect(state('Beans, snap, green, canned, regular pack, drained solids')).toBe('cooked');
    expect(state('Beef, round, top round steak, separable lean only, raw')).toBe('raw');
    expect(state('Pasta, dry, enriched')).toBe('raw');
    expect(state('Lentils, mature seeds, raw')).toBe('raw');
    expect(state('Carrots')).toBe('unknown');
  });
  it('applies its exceptions first', () => {
    // cured or smoked meat is processed: not raw for boiling
    expect(state('Pork, cured, ham, boneless, raw')).toBe('unknown');
    // frozen and unprepared vegetables count as raw (blanched only)
    expect(state('Broccoli, frozen, chopped, unprepared')).toBe('raw');
    // a table that lists raw edible portions (IFCT 2017) is raw unless the name says otherwise
    expect(state('Carrot, orange', 'Roots and Tubers', 'ifct2017')).toBe('raw');
  });
  it('gives classes only to foods the table has factors for', () => {
    expect(prepClassOf({ name: 'Chicken, breast, raw', group: 'Poultry Products' })).toBe(
      'poultry',
    );
    expect(
      prepClassOf({
        name: 'Potatoes, flesh and skin, raw',
        group: 'Vegetables and Vegetable Products',
      }),
    ).toBe('tuber');
    expect(prepClassOf({ name: 'Frankfurter, beef', group: 'Sausages and Luncheon Meats' })).toBe(
      null,
    );
    expect(prepClassOf({ name: 'Bread, white', group: 'Baked Products' })).toBe(null);
    expect(prepClassOf({ name: 'Apples, raw, with skin', group: 'Fruits and Fruit Juices' })).toBe(
      null,
    );
  });
});

describe('the method table', () => {
  it('keeps low <= typical <= high, a source or "from memory" on every factor', () => {
    for (const m of Object.values(PREPARATION_METHODS))
      for (const set of Object.values(m.factors))
        for (const n of PREP_NUTRIENTS) {
          const x = set[n];
          expect(x.low).toBeLessThanOrEqual(x.typical);
          expect(x.typical).toBeLessThanOrEqual(x.high);
          // a factor marked verified names the source it was checked against
          if (x.verified) expect(x.sources.length).toBeGreaterThan(0);
          else expect(x.note).toMatch(/from memory/);
          // nothing but calcium (hard water) and protein ends rise above what was there
          if (n !== 'calcium') expect(x.high).toBeLessThanOrEqual(1);
        }
    for (const y of Object.values(PLATE_YIELD)) expect(y.low).toBeLessThanOrEqual(y.high);
  });
  it('shows from-memory figures to users as assumed, never "from memory"', () => {
    const food = testFood({
      name: 'Beans, kidney, mature seeds, raw',
      group: 'Legumes and Legume Products',
      per100g: { phosphorusMg: 400, proteinG: 23 },
    });
    const json = toFoodPreparationJson(food);
    expect(json.cookedState).toBe('raw');
    expect(json.preparations.map((p) => p.method)).toEqual([
      'boil-drain',
      'soak-boil-drain',
      'pressure-boil-drain',
    ]);
    const text = json.preparations.flatMap((p) => p.sources).join('\n');
    expect(text).not.toMatch(/from memory/);
    expect(text).toMatch(/assumed \(no published figure\)/);
  });
  it('lists no preparation for a cooked entry', () => {
    const food = testFood({
      name: 'Beans, kidney, mature seeds, cooked, boiled',
      group: 'Legumes and Legume Products',
    });
    expect(toFoodPreparationJson(food)).toMatchObject({ cookedState: 'cooked', preparations: [] });
  });
});

// Invented demo foods: raw chicken (P 200 mg, protein 20 g, K 300 mg per 100 g) and the same
// food with 100 mg of the P taken as additive by an ingredient statement naming E450.
const chicken = testFood({
  id: 1,
  name: 'Chicken, breast, raw',
  group: 'Poultry Products',
  per100g: {
    phosphorusMg: 200,
    proteinG: 20,
    potassiumMg: 300,
    sodiumMg: 50,
    calciumMg: 10,
    energyKcal: 120,
  },
});
const stewed = testFood({
  id: 2,
  name: 'Chicken, breast, cooked, stewed',
  group: 'Poultry Products',
  per100g: { phosphorusMg: 180, proteinG: 28 },
});
const foods = new Map([chicken, stewed].map((f) => [f.id, f]));

function plan(items: unknown[]) {
  return planInputSchema.parse({
    name: 'Demo',
    days: [{ label: 'Day 1', occasions: [{ name: 'Lunch', items }] }],
  });
}

describe('plan items with a preparation', () => {
  it('refuses a method on a cooked entry, naming the field', () => {
    const r = resolvePlan(plan([{ foodId: 2, grams: 100, preparation: 'boil-drain' }]), foods);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues[0]?.path).toBe('days.0.occasions.0.items.0.preparation');
      expect(r.issues[0]?.message).toMatch(/already cooked/);
    }
  });
  it('refuses an unknown method id at the schema', () => {
    expect(() => plan([{ foodId: 1, grams: 100, preparation: 'fried' }])).toThrow(
      /preparation must be one of/,
    );
  });
  it('stores items without a method exactly as before, and picks the larger reading when the basis is not given', () => {
    const r = resolvePlan(
      plan([
        { foodId: 1, grams: 100 },
        { foodId: 1, grams: 100, preparation: 'boil-drain' },
      ]),
      foods,
    );
    if (!r.ok) throw new Error('refused');
    const items = r.value.days[0]?.occasions[0]?.items as PlanItem[];
    expect(Object.keys(items[0] as object).sort()).toEqual(['foodId', 'grams', 'label', 'measure']);
    // poultry shrinks (yield 0.77 < 1): unstated grams are read as plate grams, the larger amounts
    expect(items[1]).toMatchObject({ preparation: 'boil-drain', weightBasis: 'plate' });
  });
  it('lowers P, K and the ratio, keeps additive P, and says its sources', () => {
    const targets = computeTargets({
      weightKg: 60,
      ckdStage: '4',
      dialysis: 'none',
      diabetes: false,
      targetOverrides: {},
    });
    const withAdditive = testFood({
      ...chicken,
      id: 3,
      name: 'Chicken, breast, raw',
      ingredients: 'chicken breast, water, sodium tripolyphosphate',
      ingredientsLanguage: 'en',
    });
    const all = new Map([...foods, [3, withAdditive]]);
    const item = (foodId: number, preparation?: string): PlanItem => ({
      foodId,
      grams: 100,
      measure: null,
      label: null,
      ...(preparation ? { preparation: preparation as 'boil-drain', weightBasis: 'table' } : {}),
    });
    const s = summarizePlan(
      {
        planId: 1,
        patientId: 1,
        version: 1,
        name: 'x',
        days: [
          {
            label: 'Day 1',
            occasions: [
              {
                name: 'Lunch',
                kind: 'meal',
                time: null,
                items: [item(1), item(1, 'boil-drain'), item(3, 'boil-drain')],
              },
            ],
          },
        ],
      },
      all,
      targets,
      { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
    );
    expect(planSummarySchema.parse(s)).toEqual(s);
    const [plain, boiled, processed] = s.days[0]?.occasions[0]?.items ?? [];
    expect(plain?.preparation).toBeUndefined();
    // 200 mg x 0.63 (Cupisti 2006 chicken) = 126 mg; K 300 x 0.55 (from memory) = 165 mg;
    // protein 20 x 0.81 = 16.2 g; ratio 126 / 16.2 = 7.8 mg/g (was 10)
    expect(boiled?.nutrients).toMatchObject({
      phosphorusMg: 126,
      potassiumMg: 165,
      proteinG: 16.2,
      phosphorusProteinRatioMgPerG: 7.8,
    });
    // absorbable (animal organic, 50% typical): 200 x 0.5 x 0.63 = 63 mg
    expect(boiled?.nutrients.absorbablePhosphorusMg?.typical).toBe(63);
    // additive part (200 - 20 g x 9.3 mg/g = 14 mg) is not leached: 14 + 186 x 0.63 = 131.2 mg
    expect(processed?.nutrients.phosphorusMg).toBe(131.2);
    expect(processed?.preparation?.notes.join(' ')).toMatch(/not assumed to leach/);
    expect(boiled?.preparation?.sources.join(' ')).toMatch(/Cupisti/);
    expect(s.days[0]?.nutrients.preparedRanges?.phosphorusMg.typical).toBe(457.2);
  });
});
