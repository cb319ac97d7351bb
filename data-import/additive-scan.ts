import {
  ADDITIVE_CATALOGUE_VERSION,
  analyzeIngredients,
} from '../src/additives/ingredient-parser.js';

/**
 * The phosphate-additive scan of an ingredient statement, stored with each food that has one:
 * `JSON.stringify(analyzeIngredients(text, lang))` and the catalogue version it was made with
 * (so `ingredients rescan` can redo it when the catalogue changes).
 */
export function scanIngredients(
  text: string,
  language: string | null,
): { scan: string; version: string } {
  return {
    scan: JSON.stringify(analyzeIngredients(text, language)),
    version: ADDITIVE_CATALOGUE_VERSION,
  };
}
