import type { Food } from '../../src/foods/food.js';

export type FoodOverrides = Partial<Omit<Food, 'per100g'>> & { per100g?: Partial<Food['per100g']> };

/**
 * A complete `Food` for tests: every field the table lacks is null (never 0), overridden by the
 * caller. Defaults are invented demo data, not from any table.
 */
export function testFood(over: FoodOverrides = {}): Food {
  return {
    id: 1,
    sourceId: 1,
    source: 'test',
    sourceRelease: 'invented',
    code: String(over.id ?? 1),
    name: 'Invented test food',
    altNames: [],
    group: null,
    kind: 'generic',
    brandOwner: null,
    gtin: null,
    ingredients: null,
    ingredientsLanguage: null,
    servingG: null,
    servingText: null,
    portions: [],
    ...over,
    per100g: {
      phosphorusMg: null,
      proteinG: null,
      energyKcal: null,
      potassiumMg: null,
      sodiumMg: null,
      calciumMg: null,
      waterG: null,
      phytateMg: null,
      ...over.per100g,
    },
  };
}
