import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { profileFood, scaleProfile } from '../../src/phosphorus/profile.js';
import { testFood } from '../helpers/food.js';

// Invented demo foods: any group name, name and nutrient values a table could hold.
const GROUPS = [
  'Dairy and Egg Products',
  'Beef Products',
  'Legumes and Legume Products',
  'Beverages',
  'Fast Foods',
  'Baked Products',
  'Sausages and Luncheon Meats',
  'Vegetables and Vegetable Products',
  'Fromages',
  'Bebidas',
  null,
];
const NAMES = [
  'Cheese, pasteurized process',
  'Cola',
  'Ham, cured',
  'Lentils',
  'Pizza, frozen',
  'Apple',
  'Demo dish',
  'Baking powder',
];
const nutrient = fc.option(fc.double({ min: 0, max: 5000, noNaN: true }), { nil: null });

const foodArb = fc.record({
  name: fc.oneof(fc.constantFrom(...NAMES), fc.string({ maxLength: 40 })),
  group: fc.constantFrom(...GROUPS),
  ingredients: fc.option(
    fc.oneof(
      fc.constantFrom('pork, water, E 451', 'milk, salt', 'water, phosphoric acid'),
      fc.string({ maxLength: 80 }),
    ),
    { nil: null },
  ),
  phosphorusMg: nutrient,
  proteinG: fc.option(fc.double({ min: 0, max: 90, noNaN: true }), { nil: null }),
  phytateMg: nutrient,
});

type FoodInput = typeof foodArb extends fc.Arbitrary<infer T> ? T : never;

function toFood(x: FoodInput): Food {
  return testFood({
    source: 'demo',
    code: 'X',
    name: x.name,
    group: x.group,
    kind: x.ingredients ? 'branded' : 'generic',
    ingredients: x.ingredients,
    per100g: { phosphorusMg: x.phosphorusMg, proteinG: x.proteinG, phytateMg: x.phytateMg },
  });
}

describe('phosphorus profile properties (fast-check, invented foods)', () => {
  it('never throws; amounts add up; absorbable stays within 0 and the total', () => {
    fc.assert(
      fc.property(foodArb, (x) => {
        const p = profileFood(toFood(x));
        if (p.totalMg === null) {
          expect(p.absorbableMg).toBeNull();
          return;
        }
        const parts = [p.organicAnimalMg, p.organicPlantMg, p.additiveMg];
        if (parts.every((v) => v !== null)) {
          const sum = (parts as number[]).reduce((a, b) => a + b, 0);
          expect(Math.abs(sum - p.totalMg)).toBeLessThanOrEqual(1e-9 * Math.max(1, p.totalMg));
        }
        for (const v of parts) if (v !== null) expect(v).toBeGreaterThanOrEqual(0);
        if (p.phytateMg !== null && p.organicPlantMg !== null)
          expect(p.phytateMg).toBeLessThanOrEqual(p.organicPlantMg + 1e-9);
        const a = p.absorbableMg as { low: number; typical: number; high: number };
        expect(a.low).toBeGreaterThanOrEqual(0);
        expect(a.low).toBeLessThanOrEqual(a.typical + 1e-9);
        expect(a.typical).toBeLessThanOrEqual(a.high + 1e-9);
        expect(a.high).toBeLessThanOrEqual(p.totalMg * (1 + 1e-12) + 1e-9);
        if (p.ratioMgPerG !== null) expect(Number.isFinite(p.ratioMgPerG)).toBe(true);
        expect(p.evidence.length).toBeGreaterThan(0);
      }),
      { numRuns: 1500 },
    );
  });

  it('scaling by g / 100 multiplies every amount and keeps the ratio', () => {
    fc.assert(
      fc.property(foodArb, fc.double({ min: 0, max: 2000, noNaN: true }), (x, grams) => {
        const p = profileFood(toFood(x));
        const s = scaleProfile(p, grams);
        if (p.totalMg !== null) expect(s.totalMg).toBeCloseTo((p.totalMg * grams) / 100, 6);
        expect(s.ratioMgPerG).toBe(p.ratioMgPerG);
        expect(s.method).toBe(p.method);
      }),
      { numRuns: 300 },
    );
  });
});
