import { z } from 'zod';

export type FoodKind = 'generic' | 'branded';

/** Core nutrients per 100 g edible portion; null = the table has no value (never 0). */
export interface NutrientsPer100g {
  phosphorusMg: number | null;
  proteinG: number | null;
  energyKcal: number | null;
  potassiumMg: number | null;
  sodiumMg: number | null;
  calciumMg: number | null;
  waterG: number | null;
  phytateMg: number | null;
}

/** A household measure from the food's table: `amount` of `description` weighs `grams`. */
export interface Portion {
  id: number;
  description: string;
  amount: number;
  grams: number;
}

/** A food as the domain sees it (the repository maps rows to this). */
export interface Food {
  id: number;
  sourceId: number;
  /** Importer format key of the source, e.g. 'usda-sr28'. */
  source: string;
  sourceRelease: string;
  code: string;
  name: string;
  altNames: string[];
  group: string | null;
  kind: FoodKind;
  brandOwner: string | null;
  gtin: string | null;
  ingredients: string | null;
  ingredientsLanguage: string | null;
  servingG: number | null;
  servingText: string | null;
  per100g: NutrientsPer100g;
  portions: Portion[];
}

/** Narrow lookup the plan, diary and handout code depend on (tests hand in a Map-backed fake). */
export interface FoodLookup {
  getFoods(ids: readonly number[]): Promise<Map<number, Food>>;
}

export const foodSearchQuerySchema = z.object({
  q: z.string().trim().min(1, 'q must not be empty').max(200),
  limit: z.coerce.number().int().min(1).max(100).default(20),
  source: z.string().max(60).optional(),
  group: z.string().max(200).optional(),
});
export type FoodSearchQuery = z.infer<typeof foodSearchQuerySchema>;
