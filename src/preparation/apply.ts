/**
 * A preparation method applied to one food and amount (pure): which grams are which, the
 * retained fractions for the food's class, and the amounts after preparation with their
 * low-high ranges. The additive part of a processed food's phosphorus is not assumed to leach
 * (no source says it does); the organic part gets the phosphorus factor.
 */
import type { Food } from '../foods/food.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import type { PhosphorusProfile } from '../phosphorus/profile.js';
import { cookedStateOf, prepClassOf, type CookedState } from './cooked-state.js';
import {
  PLATE_YIELD,
  PREPARATION_METHODS,
  PREP_NUTRIENTS,
  type Factor,
  type FactorRange,
  type FactorSet,
  type PrepClass,
  type PreparationMethodId,
} from './methods.js';
import { PREPARATION_SOURCES } from './sources.js';

/** Which weight a plan item's grams are: of the food as its table lists it, or cooked on the plate. */
export type WeightBasis = 'table' | 'plate';

export type Applicability =
  | { ok: true; prepClass: PrepClass; factors: FactorSet; yield: Factor }
  | { ok: false; reason: string };

/** Whether a method can be applied to a food, and its factors if so. */
export function applicability(
  food: Pick<Food, 'name' | 'group' | 'source'>,
  method: PreparationMethodId,
): Applicability {
  const state = cookedStateOf(food);
  if (state.state !== 'raw')
    return {
      ok: false,
      reason:
        state.state === 'cooked'
          ? `"${food.name}" is already cooked (${state.basis}): no second preparation factor`
          : `"${food.name}" may already be cooked (${state.basis}): choose a raw entry of the table`,
    };
  const prepClass = prepClassOf(food);
  if (prepClass === null)
    return { ok: false, reason: `no preparation factors for a food like "${food.name}"` };
  const factors = PREPARATION_METHODS[method].factors[prepClass];
  if (!factors)
    return {
      ok: false,
      reason: `"${PREPARATION_METHODS[method].label}" has no factors for ${prepClass} (only ${Object.keys(PREPARATION_METHODS[method].factors).join(', ')})`,
    };
  return { ok: true, prepClass, factors, yield: PLATE_YIELD[prepClass] };
}

/** Methods (other than 'as-listed') that apply to a food, in table order. */
export function applicableMethods(
  food: Pick<Food, 'name' | 'group' | 'source'>,
): { method: PreparationMethodId; prepClass: PrepClass; factors: FactorSet; yield: Factor }[] {
  const out = [];
  for (const m of Object.values(PREPARATION_METHODS)) {
    if (m.id === 'as-listed') continue;
    const a = applicability(food, m.id);
    if (a.ok)
      out.push({ method: m.id, prepClass: a.prepClass, factors: a.factors, yield: a.yield });
  }
  return out;
}

export function cookedState(food: Pick<Food, 'name' | 'group' | 'source'>): CookedState {
  return cookedStateOf(food).state;
}

/** One factor's sources as text; from-memory figures are shown as assumed. */
export function factorSourceText(nutrient: string, factor: Factor): string {
  const span = `${factor.low}-${factor.high}, typical ${factor.typical}`;
  if (factor.sources.length === 0) return `${nutrient} ${span}: assumed (no published figure)`;
  const cites = factor.sources.map((s) => PREPARATION_SOURCES[s].citation).join('; ');
  const note = factor.note.replaceAll('from memory', 'assumed (no published figure)');
  return `${nutrient} ${span}: ${note} (${cites})`;
}

/** The sources of a factor set, one text per nutrient (and the weight change). */
export function sourcesText(factors: FactorSet, yieldFactor?: Factor): string[] {
  const out = PREP_NUTRIENTS.map((n) => factorSourceText(n, factors[n]));
  if (yieldFactor) out.push(factorSourceText('weight change raw to plate', yieldFactor));
  return out;
}

/**
 * The default weight basis when an item does not say: the reading that gives the larger amounts,
 * so an unstated basis never under-states (meat shrinks: grams are taken as plate grams; pulses,
 * pasta and rice swell: grams are taken as the table's raw or dry grams).
 */
export function conservativeBasis(prepClass: PrepClass): WeightBasis {
  return PLATE_YIELD[prepClass].typical < 1 ? 'plate' : 'table';
}

export interface PreparedAmounts {
  method: PreparationMethodId;
  prepClass: PrepClass;
  weightBasis: WeightBasis;
  /** Grams of the food as its table lists it (raw), and on the plate (cooked). */
  tableGrams: FactorRange;
  plateGrams: FactorRange;
  factors: FactorSet;
  yield: Factor;
  phosphorusMg: FactorRange | null;
  absorbablePhosphorusMg: FactorRange | null;
  additivePhosphorusMg: number | null;
  proteinG: FactorRange | null;
  potassiumMg: FactorRange | null;
  sodiumMg: FactorRange | null;
  calciumMg: FactorRange | null;
  energyKcal: number | null;
  notes: string[];
}

const range = (low: number, typical: number, high: number): FactorRange => ({ low, typical, high });

/** Table grams for the item's grams on its basis (a plate weight divides by the yield). */
function tableGramsOf(grams: number, basis: WeightBasis, y: Factor): FactorRange {
  if (basis === 'table') return range(grams, grams, grams);
  // The most raw food behind a plate portion is at the lowest yield.
  return range(grams / y.high, grams / y.typical, grams / y.low);
}

/**
 * Amounts of an item after preparation (mg, g, kcal for the whole item). `low` uses the low
 * factors and the least raw food, `high` the high factors and the most raw food.
 */
export function prepareAmounts(
  food: Food,
  profile: PhosphorusProfile,
  fractions: AbsorptionFractions,
  grams: number,
  basis: WeightBasis,
  method: PreparationMethodId,
  a: Extract<Applicability, { ok: true }>,
): PreparedAmounts {
  const t = tableGramsOf(grams, basis, a.yield);
  const per = food.per100g;
  const scaled = (v: number | null, fac: Factor): FactorRange | null =>
    v === null
      ? null
      : range(
          (v * t.low * fac.low) / 100,
          (v * t.typical * fac.typical) / 100,
          (v * t.high * fac.high) / 100,
        );
  const notes: string[] = [];
  const fp = a.factors.phosphorus;
  let phosphorusMg: FactorRange | null = null;
  let absorbable: FactorRange | null = null;
  const add = profile.additiveMg;
  if (profile.totalMg !== null && profile.absorbableMg) {
    const abs = profile.absorbableMg;
    // Linear in the sources: the additive part keeps its factor 1, the rest gets the P factor.
    const addPart = add ?? 0;
    const pFac: FactorRange = add === null ? range(1, 1, 1) : fp;
    if (add === null)
      notes.push('the split of its phosphorus is not known, so no phosphorus is taken as leached');
    else if (add > 0)
      notes.push(`additive phosphorus (${round1(add)} mg per 100 g) is not assumed to leach`);
    const total = (k: keyof FactorRange) =>
      (addPart + ((profile.totalMg as number) - addPart) * pFac[k]) * (t[k] / 100);
    phosphorusMg = range(total('low'), total('typical'), total('high'));
    const absOf = (k: keyof FactorRange) => {
      const addAbs = addPart * fractions.additive[k];
      return (addAbs + (abs[k] - addAbs) * pFac[k]) * (t[k] / 100);
    };
    absorbable = range(absOf('low'), absOf('typical'), absOf('high'));
  }
  return {
    method,
    prepClass: a.prepClass,
    weightBasis: basis,
    tableGrams: t,
    plateGrams: range(t.low * a.yield.low, t.typical * a.yield.typical, t.high * a.yield.high),
    factors: a.factors,
    yield: a.yield,
    phosphorusMg,
    absorbablePhosphorusMg: absorbable,
    additivePhosphorusMg: add === null ? null : (add * t.typical) / 100,
    proteinG: scaled(per.proteinG, a.factors.protein),
    potassiumMg: scaled(per.potassiumMg, a.factors.potassium),
    sodiumMg: scaled(per.sodiumMg, a.factors.sodium),
    calciumMg: scaled(per.calciumMg, a.factors.calcium),
    energyKcal: per.energyKcal === null ? null : (per.energyKcal * t.typical) / 100,
    notes,
  };
}

const round1 = (x: number) => Math.round(x * 10) / 10;
