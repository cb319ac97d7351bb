/**
 * The stored form of an ingredient-statement scan (`food.additive_scan`, JSON) and the catalogue
 * version it was made with (`food.additive_scan_version`).
 */
import { z } from 'zod';
import {
  ADDITIVE_CATALOGUE_VERSION,
  analyzeIngredients,
  type IngredientAnalysis,
} from './ingredient-parser.js';

export const additiveFindingSchema = z.object({
  code: z.string(),
  family: z.string(),
  name: z.string(),
  matchedText: z.string(),
  start: z.number().int().nonnegative(),
  end: z.number().int().nonnegative(),
  counted: z.boolean(),
  reason: z.string(),
});

export const ingredientAnalysisSchema = z.object({ additives: z.array(additiveFindingSchema) });

/** What an importer stores for a food with an ingredient statement. */
export function scanForStorage(
  ingredients: string,
  language?: string | null,
): { additiveScan: string; additiveScanVersion: string } {
  return {
    additiveScan: JSON.stringify(analyzeIngredients(ingredients, language)),
    additiveScanVersion: ADDITIVE_CATALOGUE_VERSION,
  };
}

/**
 * A stored scan, if it is well-formed and made with the current catalogue version; null
 * otherwise (the caller then analyses the statement again).
 */
export function readStoredScan(
  json: string | null,
  version: string | null,
): IngredientAnalysis | null {
  if (json === null || version !== ADDITIVE_CATALOGUE_VERSION) return null;
  try {
    const r = ingredientAnalysisSchema.safeParse(JSON.parse(json));
    return r.success ? r.data : null;
  } catch {
    return null;
  }
}
