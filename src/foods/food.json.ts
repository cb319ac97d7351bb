import type { Food } from './food.js';
import { phosphorusProteinRatio } from './search.js';
import { typicalUnit } from './unit-weights.js';

/** A search hit in the JSON contract: `{id, source, code, name, group, kind, per100g, ratio}`. */
export function toFoodHit(food: Food) {
  return {
    id: food.id,
    source: food.source,
    code: food.code,
    name: food.name,
    group: food.group,
    kind: food.kind,
    brandOwner: food.brandOwner,
    per100g: { phosphorusMg: food.per100g.phosphorusMg, proteinG: food.per100g.proteinG },
    phosphorusProteinRatioMgPerG: phosphorusProteinRatio(
      food.per100g.phosphorusMg,
      food.per100g.proteinG,
    ),
    portions: food.portions.map((p) => ({ id: p.id, description: p.description, grams: p.grams })),
  };
}
export type FoodHitJson = ReturnType<typeof toFoodHit>;

/** The full food in the JSON contract (provenance and nutrients added by the caller). */
export function toFoodJson(food: Food) {
  return {
    id: food.id,
    source: food.source,
    code: food.code,
    name: food.name,
    altNames: food.altNames,
    group: food.group,
    kind: food.kind,
    brandOwner: food.brandOwner,
    gtin: food.gtin,
    servingG: food.servingG,
    servingText: food.servingText,
    per100g: { ...food.per100g },
    phosphorusProteinRatioMgPerG: phosphorusProteinRatio(
      food.per100g.phosphorusMg,
      food.per100g.proteinG,
    ),
    portions: food.portions.map((p) => ({
      id: p.id,
      description: p.description,
      amount: p.amount,
      grams: p.grams,
    })),
    ingredients: food.ingredients,
    ingredientsLanguage: food.ingredientsLanguage,
    /** For a food whose table gives grams only: a typical unit weight with its source, or null. */
    typicalUnit: food.portions.length === 0 ? typicalUnit(food.name) : null,
  };
}
