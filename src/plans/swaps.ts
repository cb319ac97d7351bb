import type { Food } from '../foods/food.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import { nameWords } from '../foods/text.js';
import { profileFood, type PhosphorusProfile } from '../phosphorus/profile.js';
import { preparedSwap, type PreparedSwap } from '../preparation/swap.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../phosphorus/absorption.js';

/** Below this protein (g/100 g) a food is compared per portion instead (common practice, no source). */
export const SWAP_MIN_PROTEIN_G_PER_100G = 1;
/** A protein-food swap must keep at least this share of the original's protein per 100 g (common practice, no source). */
export const SWAP_MIN_PROTEIN_SHARE = 0.25;
export const MAX_SWAPS = 5;

export type SwapBasis = 'per-g-protein' | 'per-portion';

export interface SwapCandidate {
  foodId: number;
  name: string;
  code: string;
  source: string;
  group: string | null;
  basis: SwapBasis;
  /** Absorbable phosphorus (typical) in mg per g protein, or mg per portion. */
  absorbableMg: number;
  /** The candidate's value as a share of the original's (0-1). */
  shareOfOriginal: number;
  portion: { description: string; grams: number } | null;
  per100g: { phosphorusMg: number | null; proteinG: number | null };
  additiveLikely: boolean;
  /** The same kind of food: its name starts with the original's first word ("Cheese, ..."). */
  sameKind: boolean;
}

export interface SwapResult {
  foodId: number;
  name: string;
  group: string | null;
  basis: SwapBasis;
  /** The original's absorbable phosphorus (typical) per g protein or per portion, mg. */
  absorbableMg: number | null;
  portion: { description: string; grams: number } | null;
  swaps: SwapCandidate[];
  rule: string;
  /** The same food cooked so it loses phosphorus ("same food, boiled and drained"), when that clears the rule. */
  prepared?: PreparedSwap | null;
}

/** The portion used for per-portion comparisons: the label serving, else the first household measure, else 100 g. */
export function comparisonPortion(food: Food): { description: string; grams: number } {
  if (food.servingG !== null && food.servingG > 0)
    return { description: food.servingText ?? `${food.servingG} g serving`, grams: food.servingG };
  const p = food.portions[0];
  if (p && p.grams > 0) return { description: `${p.amount} ${p.description}`, grams: p.grams };
  return { description: '100 g', grams: 100 };
}

/** Which basis compares this food: per g protein when it has protein, else per portion. */
export function swapBasis(food: Food): SwapBasis {
  const prot = food.per100g.proteinG;
  return prot !== null && prot >= SWAP_MIN_PROTEIN_G_PER_100G ? 'per-g-protein' : 'per-portion';
}

function metric(
  food: Food,
  basis: SwapBasis,
  fractions: AbsorptionFractions | undefined,
): number | null {
  return metricOf(food, profileFood(food, fractions), basis);
}

/**
 * Profiles of candidate foods, per food object and fractions object: the same foods come back as
 * candidates for every food of their group, and the tables' food objects are shared and never
 * changed. A WeakMap, so nothing outlives the foods.
 */
const profiles = new WeakMap<
  Food,
  { fractions: AbsorptionFractions | undefined; profile: PhosphorusProfile }
>();

function profileOf(food: Food, fractions: AbsorptionFractions | undefined): PhosphorusProfile {
  const hit = profiles.get(food);
  if (hit && hit.fractions === fractions) return hit.profile;
  const profile = profileFood(food, fractions);
  profiles.set(food, { fractions, profile });
  return profile;
}

/** `metric` from a profile already made. */
function metricOf(food: Food, profile: PhosphorusProfile, basis: SwapBasis): number | null {
  const abs = profile.absorbableMg;
  if (!abs) return null;
  if (basis === 'per-g-protein') {
    const prot = food.per100g.proteinG;
    return prot !== null && prot > 0 ? abs.typical / prot : null;
  }
  return (abs.typical * comparisonPortion(food).grams) / 100;
}

/** Smallest typical absorption fraction: bounds what any candidate can absorb, for SQL prefiltering. */
export function smallestTypicalFraction(f: AbsorptionFractions): number {
  return Math.min(
    f.animalOrganic.typical,
    f.plantOrganic.typical,
    f.phytate.typical,
    f.additive.typical,
    f.unknown.typical,
  );
}

/**
 * Foods that are no swap for a patient's food whatever their phosphorus: breast milk and foods
 * for infants (food-table names such as "Milk, human, ..." or "Infant formula, ...": common
 * practice, no source).
 */
const NOT_A_SWAP = /\b(human|infant|babyfood|baby food)\b/;

/** The first word of a food-table name, folded ("Cheese, cottage, ..." -> "cheese"). */
function kindWord(name: string): string {
  return nameWords(name)[0] ?? '';
}

/**
 * Ranks candidate swaps (pure): same food group, clearly less absorbable phosphorus per g
 * protein (or per portion for foods without protein), at most `limit` (<= 5). Foods of the same
 * kind come first (cheese for cheese, bread for bread: a swap the patient will make), then the
 * rest of the group; least absorbable phosphorus first within each.
 */
export function rankSwaps(
  original: Food,
  candidates: readonly Food[],
  opts: { fractions?: AbsorptionFractions; maxShare: number; limit: number },
): SwapResult {
  const basis = swapBasis(original);
  const orig = metric(original, basis, opts.fractions);
  const portion = basis === 'per-portion' ? comparisonPortion(original) : null;
  const rule =
    basis === 'per-g-protein'
      ? `same food group, at least ${SWAP_MIN_PROTEIN_G_PER_100G} g protein per 100 g and at least ${SWAP_MIN_PROTEIN_SHARE * 100}% of this food's protein density, and at most ${Math.round(opts.maxShare * 100)}% of its absorbable phosphorus per g protein; the same kind of food first`
      : `same food group, little or no protein, and at most ${Math.round(opts.maxShare * 100)}% of its absorbable phosphorus per portion; the same kind of food first`;
  const base = {
    foodId: original.id,
    name: original.name,
    group: original.group,
    basis,
    absorbableMg: orig === null ? null : Math.round(orig * 10) / 10,
    portion,
    rule,
  };
  if (orig === null || orig <= 0) return { ...base, swaps: [] };
  const prepared = preparedSwap(
    original,
    profileOf(original, opts.fractions),
    opts.fractions ?? DEFAULT_ABSORPTION_FRACTIONS,
    basis,
    orig,
    comparisonPortion(original).grams,
    opts.maxShare,
  );
  const limit = Math.max(0, Math.min(MAX_SWAPS, opts.limit));
  const origProt = original.per100g.proteinG ?? 0;
  const kind = kindWord(original.name);
  const out: SwapCandidate[] = [];
  for (const c of candidates) {
    if (c.id === original.id || c.group !== original.group) continue;
    if (NOT_A_SWAP.test(nameWords(c.name).join(' '))) continue;
    if (swapBasis(c) !== basis) continue;
    if (basis === 'per-g-protein' && (c.per100g.proteinG ?? 0) < SWAP_MIN_PROTEIN_SHARE * origProt)
      continue;
    const prof = profileOf(c, opts.fractions);
    const m = metricOf(c, prof, basis);
    if (m === null || m > opts.maxShare * orig) continue;
    out.push({
      foodId: c.id,
      name: c.name,
      code: c.code,
      source: c.source,
      group: c.group,
      basis,
      absorbableMg: Math.round(m * 10) / 10,
      shareOfOriginal: Math.round((m / orig) * 1000) / 1000,
      portion: basis === 'per-portion' ? comparisonPortion(c) : null,
      per100g: { phosphorusMg: c.per100g.phosphorusMg, proteinG: c.per100g.proteinG },
      additiveLikely: prof.additiveLikely || prof.additiveEvidentFromName,
      sameKind: kind !== '' && kindWord(c.name) === kind,
    });
  }
  out.sort(
    (a, b) =>
      Number(b.sameKind) - Number(a.sameKind) ||
      a.absorbableMg - b.absorbableMg ||
      a.name.localeCompare(b.name) ||
      a.foodId - b.foodId,
  );
  return { ...base, swaps: out.slice(0, limit), prepared };
}
