import { describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { planInputSchema, resolvePlan } from '../../src/plans/plan.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { sr28Foods } from '../helpers/sr28.js';

const name = (t: string) => `${t} (${hasSr28 ? 'USDA SR28' : SR28_MISSING})`;

function foodsById(foods: Food[]) {
  return new Map(foods.map((f) => [f.id, f]));
}

describe('household measures to grams with the table gram weights', () => {
  it.skipIf(!hasSr28)(
    name('a measure converts with its own gram weight, per unit of its amount'),
    () => {
      // sr28Foods ids are the NDB numbers; portion ids are the helper's sequential ids
      const [egg, chicken] = sr28Foods('01123', '05064') as [Food, Food];
      const large = egg.portions.find((p) => p.description === 'large');
      const halfBreast = chicken.portions.find((p) => p.description.startsWith('breast'));
      expect(large?.grams).toBe(50); // USDA SR28 WEIGHT 01123 seq 1: 1 large = 50 g
      expect([halfBreast?.amount, halfBreast?.grams]).toEqual([0.5, 86]); // 05064 seq 3: 0.5 breast = 86 g
      const input = planInputSchema.parse({
        name: 'Test',
        days: [
          {
            label: 'Monday',
            occasions: [
              {
                name: 'Breakfast',
                items: [
                  { foodId: egg.id, measure: { portionId: large?.id, count: 2 }, label: 'huevos' },
                ],
              },
              {
                name: 'Lunch',
                items: [{ foodId: chicken.id, measure: { portionId: halfBreast?.id, count: 0.5 } }],
              },
              { name: 'Snack', items: [{ foodId: egg.id, grams: 25 }] },
            ],
          },
        ],
      });
      const r = resolvePlan(input, foodsById([egg, chicken]));
      if (!r.ok) throw new Error(JSON.stringify(r.issues));
      const [b, l, s] = r.value.days[0]?.occasions ?? [];
      // 2 x 50 g = 100 g
      expect(b?.items[0]).toMatchObject({
        grams: 100,
        label: 'huevos',
        measure: { count: 2, description: 'large', gramsPerUnit: 50 },
      });
      // 86 g per 0.5 breast = 172 g per breast; 0.5 breast = 86 g
      expect(l?.items[0]).toMatchObject({ grams: 86, measure: { gramsPerUnit: 172 } });
      expect(b?.kind).toBe('meal');
      expect(s?.kind).toBe('snack'); // named "Snack" (common practice)
    },
  );

  it.skipIf(!hasSr28)(
    name("refuses unknown foods, another food's measure and more than 5 kg, naming the field"),
    () => {
      const [egg, milk] = sr28Foods('01123', '01077') as [Food, Food];
      const quart = milk.portions.find((p) => p.description === 'quart'); // 01077: 1 quart = 976 g
      const input = planInputSchema.parse({
        name: 'Test',
        days: [
          {
            label: 'Monday',
            occasions: [
              {
                name: 'Breakfast',
                items: [
                  { foodId: 999999, grams: 100 },
                  { foodId: egg.id, measure: { portionId: quart?.id, count: 1 } },
                  { foodId: milk.id, measure: { portionId: quart?.id, count: 6 } }, // 6 x 976 = 5,856 g
                ],
              },
            ],
          },
        ],
      });
      const r = resolvePlan(input, foodsById([egg, milk]));
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(r.issues.map((i) => i.path)).toEqual([
        'days.0.occasions.0.items.0.foodId',
        'days.0.occasions.0.items.1.measure.portionId',
        'days.0.occasions.0.items.2.measure.count',
      ]);
      expect(r.issues[0]?.message).toBe('unknown food id 999999');
      expect(r.issues[2]?.message).toMatch(/5856 g is more than 5000 g/);
    },
  );
});

describe('plan input schema (bad input names the field)', () => {
  const paths = (v: unknown) =>
    planInputSchema.safeParse(v).error?.issues.map((i) => `${i.path.join('.')}: ${i.message}`) ??
    [];

  it('a plan with no days', () => {
    expect(paths({ name: 'x', days: [] })).toEqual(['days: a plan needs at least one day']);
  });

  it('quantities <= 0 or over 5 kg, both or neither of grams and measure', () => {
    const plan = (item: object) => ({
      name: 'x',
      days: [{ label: 'd', occasions: [{ name: 'o', items: [item] }] }],
    });
    expect(paths(plan({ foodId: 1, grams: 0 }))).toEqual([
      'days.0.occasions.0.items.0.grams: grams must be greater than 0',
    ]);
    expect(paths(plan({ foodId: 1, grams: -5 }))).toEqual([
      'days.0.occasions.0.items.0.grams: grams must be greater than 0',
    ]);
    expect(paths(plan({ foodId: 1, grams: 5001 }))).toEqual([
      'days.0.occasions.0.items.0.grams: grams must be at most 5000 (5 kg) in one item',
    ]);
    expect(paths(plan({ foodId: 1 }))[0]).toMatch(/give either grams or a household measure/);
    expect(paths(plan({ foodId: 1, measure: { portionId: 3, count: 0 } }))).toEqual([
      'days.0.occasions.0.items.0.measure.count: count must be greater than 0',
    ]);
  });
});
