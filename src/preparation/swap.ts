/**
 * "Same food, boiled and drained" as a swap (pure): the original food prepared by the simplest
 * method that applies, compared on the swap's own basis (absorbable phosphorus per g protein, or
 * per portion), offered when it clears the same share rule as any other swap.
 */
import type { Food } from '../foods/food.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import type { PhosphorusProfile } from '../phosphorus/profile.js';
import { applicability, sourcesText } from './apply.js';
import { PREPARATION_METHODS, type PreparationMethodId } from './methods.js';

export interface PreparedSwap {
  /** Always the original food: the swap is how it is cooked. */
  foodId: number;
  name: string;
  method: PreparationMethodId;
  label: string;
  /** Absorbable phosphorus (typical) after the method, mg per g protein or per portion. */
  absorbableMg: number;
  shareOfOriginal: number;
  sources: string[];
}

/** Methods tried, simplest first (the one a patient is most likely to keep doing). */
const ORDER: PreparationMethodId[] = ['boil-drain', 'slice-boil-drain', 'double-boil-drain'];

/**
 * The prepared swap for a food, or null when no method applies or none clears `maxShare`.
 * `origMetric` is the original's metric on `basis`; `portionGrams` the comparison portion.
 */
export function preparedSwap(
  food: Food,
  profile: PhosphorusProfile,
  fractions: AbsorptionFractions,
  basis: 'per-g-protein' | 'per-portion',
  origMetric: number,
  portionGrams: number,
  maxShare: number,
): PreparedSwap | null {
  const abs = profile.absorbableMg;
  if (!abs || origMetric <= 0 || profile.additiveMg === null) return null;
  for (const method of ORDER) {
    const a = applicability(food, method);
    if (!a.ok) continue;
    // Per 100 g as listed: the additive part keeps all of its phosphorus.
    const addAbs = profile.additiveMg * fractions.additive.typical;
    const absAfter = addAbs + (abs.typical - addAbs) * a.factors.phosphorus.typical;
    let metric: number;
    if (basis === 'per-g-protein') {
      const prot = (food.per100g.proteinG ?? 0) * a.factors.protein.typical;
      if (prot <= 0) continue;
      metric = absAfter / prot;
    } else metric = (absAfter * portionGrams) / 100;
    const share = metric / origMetric;
    if (share > maxShare) continue;
    return {
      foodId: food.id,
      name: food.name,
      method,
      label: PREPARATION_METHODS[method].label,
      absorbableMg: Math.round(metric * 10) / 10,
      shareOfOriginal: Math.round(share * 1000) / 1000,
      sources: sourcesText(a.factors),
    };
  }
  return null;
}
