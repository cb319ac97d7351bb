/**
 * The phosphate-additive scan of an ingredient statement, stored with each food that has one.
 *
 * HOOK: waiting for `src/additives/ingredient-parser.ts` (analyzeIngredients and
 * ADDITIVE_CATALOGUE_VERSION). Until that module lands this returns null, so foods are stored
 * with additive_scan = NULL ("not scanned"), never with an empty "nothing found" result.
 */
export function scanIngredients(
  _text: string,
  _language: string | null,
): { scan: string; version: string } | null {
  return null;
}
