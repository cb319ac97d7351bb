import { scanIngredients } from './additive-scan.js';
import { ImportCodes, parseNumberField, type IssueLog } from './issues.js';
import type { SourceWriter } from './writer.js';

/**
 * One Open Food Facts product as both exports give it (the CSV's columns, the JSONL's fields
 * and `nutriments`), before checks. Texts are '' when absent.
 */
export interface OffProduct {
  code: string;
  productName: string;
  genericName: string;
  brands: string;
  brandOwner: string;
  group: string;
  /** The ingredient statement and its language (null when the export does not say). */
  ingredients: string;
  ingredientsLang: string | null;
  servingSize: string;
  servingQuantity: string;
  /** The product's own names in other languages ([language, name]), from `product_name_<lc>`. */
  localNames?: Iterable<[string, string]>;
  /** `<nutrient>_100g` column or field -> its text (or number) as exported. */
  nutrients: Iterable<[string, unknown]>;
}

/**
 * Units of the `_100g` fields: grams, except energy in kJ ("energy-kcal_100g" in kcal), per the
 * Open Food Facts CSV field documentation ("fields that end with _100g correspond to the amount
 * of a nutriment (in g, or kJ for energy) for 100 g or 100 ml of product").
 */
export function offUnit(column: string): string {
  if (column === 'energy-kcal_100g') return 'kcal';
  if (column.startsWith('energy')) return 'kJ';
  return 'g';
}
const TAGS: Record<string, string> = {
  proteins_100g: 'PROCNT',
  phosphorus_100g: 'P',
  potassium_100g: 'K',
  sodium_100g: 'NA',
  calcium_100g: 'CA',
  water_100g: 'WATER',
  'energy-kcal_100g': 'ENERC_KCAL',
  'energy-kj_100g': 'ENERC_KJ',
  energy_100g: 'ENERC_KJ',
  'phytic-acid_100g': 'PHYTAC',
};
/** `_100g` fields that are scores, ratios or properties, not amounts of a nutrient. */
const NOT_NUTRIENTS =
  /score|footprint|^ph_|glycemic|hardness|fruits-vegetables|cocoa|collagen|nova|energy-from-fat|acidity/;

export function isOffNutrient(column: string): boolean {
  return column.endsWith('_100g') && !NOT_NUTRIENTS.test(column);
}

/**
 * Plausibility limits per 100 g (the offending value is left out and reported per product):
 * - no mass above 100 g in 100 g;
 * - energy above 900 kcal (3,766 kJ): pure fat gives 9 kcal/g (Atwater general factor, FAO 2003
 *   "Food energy: methods of analysis and conversion factors"); 1 kcal = 4.184 kJ;
 * - sodium above 39.3 g: pure sodium chloride is 39.3% sodium (22.990 / 58.443, IUPAC standard
 *   atomic weights);
 * - sodium and salt / 2.5 (EU Regulation 1169/2011 Annex I (11): salt = sodium x 2.5) that
 *   disagree by more than 20% of the larger (common practice, no source) and by more than
 *   5 mg (label rounding; common practice, no source): both are left out, as either may be
 *   the wrong one.
 */
export const OFF_LIMITS = {
  maxMassG: 100,
  maxEnergyKcal: 900,
  maxEnergyKj: 900 * 4.184,
  maxSodiumG: 39.3,
  saltPerSodium: 2.5,
  maxSodiumSaltDisagreement: 0.2,
  sodiumSaltToleranceG: 0.005,
} as const;

/** Why a value is implausible, or null. `value` is in the field's unit (`offUnit`). */
export function implausible(column: string, value: number): string | null {
  const unit = offUnit(column);
  if (unit === 'kcal' && value > OFF_LIMITS.maxEnergyKcal)
    return `${value} kcal is more than ${OFF_LIMITS.maxEnergyKcal} kcal (pure fat)`;
  if (unit === 'kJ' && value > OFF_LIMITS.maxEnergyKj)
    return `${value} kJ is more than ${Math.round(OFF_LIMITS.maxEnergyKj)} kJ (pure fat)`;
  if (unit === 'g' && value > OFF_LIMITS.maxMassG) return `${value} g is more than the whole 100 g`;
  if (column === 'sodium_100g' && value > OFF_LIMITS.maxSodiumG)
    return `${value} g is more sodium than pure salt has (${OFF_LIMITS.maxSodiumG} g)`;
  return null;
}

/** True when sodium and salt (g per 100 g) disagree beyond the limits. */
export function sodiumSaltDisagree(sodiumG: number, saltG: number): boolean {
  const fromSalt = saltG / OFF_LIMITS.saltPerSodium;
  const diff = Math.abs(sodiumG - fromSalt);
  if (diff <= OFF_LIMITS.sodiumSaltToleranceG) return false;
  return diff > OFF_LIMITS.maxSodiumSaltDisagreement * Math.max(sodiumG, fromSalt);
}

/** Volume units a label serving may be given in (kept as volume: no density is known). */
const VOLUME = /(\d)\s*(ml|cl|dl|l|fl\.?\s*oz)\b/i;
const MASS = /(\d)\s*(g|gr|grams?|kg)\b/i;

/** Grams or millilitres of one serving, from `serving_quantity` and the unit in the text. */
export function offServing(
  servingSize: string,
  servingQuantity: string,
): { g: number | null; ml: number | null } {
  const q = parseNumberField(servingQuantity);
  const amount = q.ok && q.value !== null && q.value > 0 ? q.value : null;
  if (amount === null) return { g: null, ml: null };
  // serving_quantity is in g or ml; the text says which ("250 ml", "1 bar (30 g)").
  const mass = MASS.test(servingSize);
  const volume = VOLUME.test(servingSize);
  if (mass) return { g: amount, ml: null };
  if (volume) return { g: null, ml: amount };
  return { g: null, ml: null };
}

/** Nutrient definitions of this import, by field (bounded by the export's field names). */
export class OffDefs {
  private readonly ids = new Map<string, number>();
  constructor(private readonly writer: SourceWriter) {}
  id(column: string, order: number): number {
    let id = this.ids.get(column);
    if (id === undefined) {
      id = this.writer.defineNutrient({
        code: column,
        name: column.replace(/_100g$/, '').replace(/-/g, ' '),
        unit: offUnit(column),
        tag: TAGS[column] ?? null,
        sortOrder: order,
      });
      this.ids.set(column, id);
    }
    return id;
  }
}

/** Checks one product's values; returns the kept ones and reports the rest (one issue). */
function checkedValues(
  p: OffProduct,
  where: { file: string; line: number; at: string },
  issues: IssueLog,
): Array<[string, number]> {
  const kept = new Map<string, number>();
  const dropped: string[] = [];
  for (const [column, raw] of p.nutrients) {
    const v = parseNumberField(typeof raw === 'number' ? String(raw) : String(raw ?? ''));
    if (!v.ok) {
      issues.report(
        where.file,
        where.line,
        v.code,
        `${where.at}: product ${p.code}, ${column} ${v.reason}: value left out`,
      );
      continue;
    }
    if (v.value === null) continue;
    const why = implausible(column, v.value);
    if (why) dropped.push(`${column} (${why})`);
    else kept.set(column, v.value);
  }
  const sodium = kept.get('sodium_100g');
  const salt = kept.get('salt_100g');
  if (sodium !== undefined && salt !== undefined && sodiumSaltDisagree(sodium, salt)) {
    dropped.push(
      `sodium_100g ${sodium} g and salt_100g ${salt} g (salt / 2.5 = ${+(salt / 2.5).toFixed(4)} g: they disagree by more than 20%)`,
    );
    kept.delete('sodium_100g');
    kept.delete('salt_100g');
  }
  if (dropped.length > 0) {
    issues.report(
      where.file,
      where.line,
      ImportCodes.rowImplausible,
      `${where.at}: product ${p.code}: implausible, left out: ${dropped.join('; ')}`,
    );
  }
  return [...kept];
}

/**
 * The product's own names in other languages, from the language-suffixed name fields
 * (`product_name_es`, `product_name_fr`, ...; `generic_name_<lc>` when there is no product name
 * in that language): the JSONL export carries them, the CSV export has none. Handouts in that
 * language use them before the table's main name. Names equal to the main name are left out.
 */
export function localNamesFrom(
  fields: Iterable<[string, unknown]>,
  mainName: string,
): Array<[string, string]> {
  const out = new Map<string, string>();
  for (const [field, raw] of fields) {
    const m = /^(product|generic)_name_([a-z]{2,3})$/.exec(field);
    if (!m || typeof raw !== 'string') continue;
    const language = m[2] as string;
    const value = raw.trim();
    if (!value || value === mainName) continue;
    if (m[1] === 'product' || !out.has(language)) out.set(language, value);
  }
  return [...out];
}

/** Checks one product and stages it with its values; false when it was left out. */
export function stageOffProduct(
  writer: SourceWriter,
  defs: OffDefs,
  issues: IssueLog,
  p: OffProduct,
  where: { file: string; line: number },
): boolean {
  const at = `${where.file} line ${where.line}`;
  const name = p.productName || p.genericName;
  if (!p.code) {
    issues.skip(where.file, where.line, ImportCodes.rowMissing, `${at}: code (barcode) is empty`);
    return false;
  }
  if (!name) {
    issues.skip(
      where.file,
      where.line,
      ImportCodes.rowMissing,
      `${at}: product ${p.code} has no name`,
    );
    return false;
  }
  const values = checkedValues(p, { ...where, at }, issues);
  const ingredients = p.ingredients || null;
  const scan = ingredients ? scanIngredients(ingredients, p.ingredientsLang) : null;
  const serving = offServing(p.servingSize, p.servingQuantity);
  const brands = p.brands.split(',').map((b) => b.trim());
  const foodId = writer.addFood({
    code: p.code,
    name,
    altNames: [p.genericName, ...brands].filter((s) => s && s !== name),
    group: p.group && p.group !== 'unknown' ? p.group : null,
    kind: 'branded',
    brandOwner: p.brandOwner || brands[0] || null,
    gtin: /^\d{8,14}$/.test(p.code) ? p.code : null,
    ingredients,
    ingredientsLang: ingredients ? p.ingredientsLang : null,
    servingG: serving.g,
    servingMl: serving.ml,
    servingText: p.servingSize || null,
    additiveScan: scan?.scan ?? null,
    additiveScanVersion: scan?.version ?? null,
  });
  if (foodId === null) {
    issues.skip(
      where.file,
      where.line,
      ImportCodes.rowDuplicate,
      `${at}: barcode ${p.code} is already in this file`,
    );
    return false;
  }
  let order = 0;
  for (const [column, value] of values) {
    writer.addValue(foodId, defs.id(column, order++), value, null, null, where.file, where.line);
  }
  if (serving.g !== null) writer.addPortion(foodId, 1, 1, p.servingSize || 'serving', serving.g);
  for (const [language, localName] of p.localNames ?? [])
    if (localName !== name) writer.addLocalName(foodId, language, localName);
  return true;
}
