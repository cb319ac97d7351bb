import { testFood } from '../helpers/food.js';
import { describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { profileFood } from '../../src/phosphorus/profile.js';
import { comparisonPortion, rankSwaps, smallestTypicalFraction } from '../../src/plans/swaps.js';

// Invented test foods (values invented) for the per-portion branch of the swap ranking.
function drink(
  id: number,
  name: string,
  phosphorusMg: number,
  portionG: number | null,
  group = 'Beverages',
): Food {
  return testFood({
    id,
    name,
    group,
    per100g: {
      phosphorusMg,
      proteinG: 0,
      energyKcal: 40,
      potassiumMg: 5,
      sodiumMg: 5,
      calciumMg: 2,
      waterG: 90,
    },
    portions:
      portionG === null ? [] : [{ id: id * 10, description: 'glass', amount: 1, grams: portionG }],
  });
}

describe('swaps for foods without protein are compared per portion', () => {
  const original = drink(1, 'Invented drink A', 20, 250);
  const candidates = [
    drink(2, 'Invented drink B', 10, 250), // half the P per 100 g, same glass
    drink(3, 'Invented drink C', 10, 600), // half per 100 g but a 600 g portion: more per portion
    drink(4, 'Invented drink D', 15, null), // no measure: compared per 100 g
    drink(5, 'Invented food E', 1, 100, 'Sweets'), // another group
  ];
  const r = rankSwaps(original, candidates, {
    fractions: DEFAULT_ABSORPTION_FRACTIONS,
    maxShare: 0.8,
    limit: 5,
  });

  it('uses the first household measure, else 100 g, and keeps the same group', () => {
    expect(comparisonPortion(original)).toEqual({ description: '1 glass', grams: 250 });
    expect(comparisonPortion(candidates[2] as Food)).toEqual({ description: '100 g', grams: 100 });
    expect(r.basis).toBe('per-portion');
    const per100 = (f: Food) =>
      profileFood(f, DEFAULT_ABSORPTION_FRACTIONS).absorbableMg?.typical ?? NaN;
    // A: 250 g x per-100 g absorbable; B: 250 g (share = 10/20 = 0.5 with the same split);
    // D: 100 g x its per-100 g value; C: 600 g x half = 1.2 x A per portion -> not a swap
    const a = 2.5 * per100(original);
    const expected = [
      [2, (2.5 * per100(candidates[0] as Food)) / a],
      [4, per100(candidates[2] as Food) / a],
    ].sort((x, y) => (x[1] as number) - (y[1] as number));
    expect(r.swaps.map((s) => s.foodId)).toEqual(expected.map((x) => x[0]));
    for (const s of r.swaps) {
      const e = expected.find((x) => x[0] === s.foodId)?.[1] as number;
      expect(s.shareOfOriginal).toBeCloseTo(e, 3);
      expect(s.shareOfOriginal).toBeLessThanOrEqual(0.8);
    }
  });

  it('puts the same kind of food first, and never offers breast milk or infant foods', () => {
    // Invented names in the food-table style; values invented (all under 80% of the original).
    const milk = drink(10, 'Milk, whole', 20, 250, 'Dairy');
    const others = [
      drink(11, 'Yogurt drink, plain', 4, 250, 'Dairy'),
      drink(12, 'Milk, reduced fat', 12, 250, 'Dairy'),
      drink(13, 'Milk, human, mature, fluid', 3, 250, 'Dairy'),
      drink(14, 'Infant formula, milk based', 2, 250, 'Dairy'),
    ];
    const res = rankSwaps(milk, others, {
      fractions: DEFAULT_ABSORPTION_FRACTIONS,
      maxShare: 0.8,
      limit: 5,
    });
    expect(res.swaps.map((s) => [s.foodId, s.sameKind])).toEqual([
      [12, true],
      [11, false],
    ]);
  });

  it('the SQL prefilter bound uses the smallest typical fraction (phosphorus model defaults)', () => {
    const f = DEFAULT_ABSORPTION_FRACTIONS;
    expect(smallestTypicalFraction(f)).toBe(
      Math.min(
        f.animalOrganic.typical,
        f.plantOrganic.typical,
        f.phytate.typical,
        f.additive.typical,
        f.unknown.typical,
      ),
    );
  });
});
