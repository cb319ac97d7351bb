import type { Food } from '../foods/food.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import { nameWords } from '../foods/text.js';
import { profileFood, type PhosphorusProfile } from '../phosphorus/profile.js';
import { preparedSwap, type PreparedSwap } from '../preparation/swap.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../phosphorus/absorption.js';
import { CLASS_ORIGIN, classifyFood, type Origin } from '../phosphorus/food-class.js';
import { PLANT_SWAP_POTASSIUM_CAUTION } from './cautions.js';

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
  /** Absorbable phosphorus (typical) saved per g protein kept (or per portion), mg. */
  savedAbsorbableMg: number;
  /** Potassium and sodium per g protein (or per portion) as a share of the original's; null = not given. */
  potassiumShare: number | null;
  sodiumShare: number | null;
  /** Where the protein comes from, and whether that changes from the original's. */
  proteinOrigin: Origin;
  proteinOriginChanged: boolean;
  /** Cautions shown with the swap (potassium, sodium, protein quality); empty when none. */
  cautions: string[];
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
  /** Swaps that pass on phosphorus but carry > 20% more potassium or sodium: shown only with their caution. */
  cautioned: SwapCandidate[];
  /** Said when a plant food is offered or a swap carries more potassium; null otherwise. */
  potassiumCaution: string | null;
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
 * Parts that are no protein swap a dietitian would offer: inedible or low-quality protein
 * (feet, skin on its own, rinds, gelatin, collagen) (common practice, no source).
 */
const LOW_QUALITY_PART =
  /\b(feet|paws?|skin only|skins|rinds?|cracklings|gelatins?|gelatine|collagen)\b/;

/**
 * Preparation state from a food-table name: 'dry' (dried, powder, dehydrated, concentrate,
 * dry mix, condensed), 'raw' (raw or uncooked meat, fish, egg, legumes and grains, which are
 * not eaten so), else 'ready'. Raw fruit, vegetables and nuts are ready to eat.
 */
export type PreparationState = 'ready' | 'raw' | 'dry';

const DRY_RE =
  /\b(dried|dehydrated|powder|powdered|concentrated?|condensed|freeze-dried|dry)\b|\bdry mix\b|\bmix, dry\b/;
const READY_OVERRIDE_RE = /\bprepared\b|\breconstituted\b|dry[- ]roasted|dry heat|\bdiluted\b/;
const RAW_RE = /\b(raw|uncooked|unprepared|unheated)\b/;
const COOKED_BEFORE_EATING = new Set([
  'meat',
  'fish',
  'egg',
  'legume',
  'grain-whole',
  'grain-refined',
]);

export function preparationState(food: Pick<Food, 'name' | 'group'>): PreparationState {
  const n = nameWords(food.name).join(' ');
  if (READY_OVERRIDE_RE.test(food.name.toLowerCase())) return 'ready';
  if (DRY_RE.test(n)) return 'dry';
  if (RAW_RE.test(n) && COOKED_BEFORE_EATING.has(classifyFood(food).foodClass)) return 'raw';
  return 'ready';
}

/** A swap's K or Na per g protein (or per portion) may be at most this share of the original's (common practice, no source). */
export const SWAP_MAX_POTASSIUM_SODIUM_SHARE = 1.2;

/**
 * Sodium below which differences are not judged: 5 mg per g protein (20 g protein = 100 mg) or
 * 20 mg per portion (common practice, no source).
 */
const SODIUM_FLOOR: Record<SwapBasis, number> = { 'per-g-protein': 5, 'per-portion': 20 };

export type SwapRejection =
  | 'same-food'
  | 'other-group'
  | 'not-a-swap'
  | 'low-quality-part'
  | 'preparation-state'
  | 'protein-basis'
  | 'too-little-protein'
  | 'no-phosphorus-value'
  | 'not-less-phosphorus';

export type SwapJudgement =
  | { verdict: 'accept' | 'caution'; candidate: SwapCandidate }
  | { verdict: 'reject'; reason: SwapRejection; detail: string };

interface OriginalFacts {
  food: Food;
  basis: SwapBasis;
  metric: number;
  kind: string;
  state: PreparationState;
  origin: Origin;
}

function perBasis(food: Food, basis: SwapBasis, per100g: number | null): number | null {
  if (per100g === null) return null;
  if (basis === 'per-portion') return (per100g * comparisonPortion(food).grams) / 100;
  const prot = food.per100g.proteinG;
  return prot !== null && prot > 0 ? per100g / prot : null;
}

function originOf(food: Food): Origin {
  return CLASS_ORIGIN[classifyFood(food).foodClass];
}

const r1 = (x: number) => Math.round(x * 10) / 10;

/** Potassium or sodium of a candidate against the original (share, and a caution when > 20% more or not given). */
function mineralCheck(
  label: 'potassium' | 'sodium',
  orig: OriginalFacts,
  c: Food,
): { share: number | null; caution: string | null } {
  const key = label === 'potassium' ? 'potassiumMg' : 'sodiumMg';
  const o = perBasis(orig.food, orig.basis, orig.food.per100g[key]);
  const v = perBasis(c, orig.basis, c.per100g[key]);
  if (o === null || o <= 0) return { share: null, caution: null };
  // A food with next to no sodium (unsalted legumes: 0.2 mg per g protein) makes any
  // percentage huge: below the floor the comparison is against the floor.
  const floor = label === 'sodium' ? SODIUM_FLOOR[orig.basis] : 0;
  if (v === null)
    return {
      share: null,
      caution: `${label} is not given for this food: check it before offering it.`,
    };
  const share = v / o;
  const judged = v / Math.max(o, floor);
  const unit = orig.basis === 'per-g-protein' ? 'per g protein' : 'per portion';
  return {
    share: Math.round(share * 1000) / 1000,
    caution:
      judged > SWAP_MAX_POTASSIUM_SODIUM_SHARE
        ? `${label} ${r1(v)} mg ${unit} against ${r1(o)} mg for the original (more than ${Math.round((SWAP_MAX_POTASSIUM_SODIUM_SHARE - 1) * 100)}% above): ${label === 'potassium' ? 'check against the potassium target, especially on dialysis' : 'check against the sodium target'}.`
        : null,
  };
}

/**
 * Whether one food is a swap a renal dietitian would offer for the original (pure): same
 * group, not an infant food or a low-quality part, the same preparation state, enough protein
 * and clearly less absorbable phosphorus; potassium or sodium over 20% more, per g protein,
 * makes it a 'caution' swap, shown only with the caution.
 */
export function judgeSwap(
  original: Food,
  c: Food,
  opts: { fractions?: AbsorptionFractions | undefined; maxShare: number },
): SwapJudgement {
  const basis = swapBasis(original);
  const metricO = metric(original, basis, opts.fractions);
  if (metricO === null || metricO <= 0)
    return {
      verdict: 'reject',
      reason: 'no-phosphorus-value',
      detail: 'the original has no absorbable phosphorus estimate',
    };
  return judgeAgainst(
    {
      food: original,
      basis,
      metric: metricO,
      kind: kindWord(original.name),
      state: preparationState(original),
      origin: originOf(original),
    },
    c,
    opts,
  );
}

function judgeAgainst(
  o: OriginalFacts,
  c: Food,
  opts: { fractions?: AbsorptionFractions | undefined; maxShare: number },
): SwapJudgement {
  const reject = (reason: SwapRejection, detail: string): SwapJudgement => ({
    verdict: 'reject',
    reason,
    detail,
  });
  const original = o.food;
  if (c.id === original.id) return reject('same-food', 'the same food');
  if (c.group !== original.group) return reject('other-group', `group ${c.group ?? 'none'}`);
  const words = nameWords(c.name).join(' ');
  if (NOT_A_SWAP.test(words)) return reject('not-a-swap', 'breast milk or a food for infants');
  if (LOW_QUALITY_PART.test(words) && !LOW_QUALITY_PART.test(nameWords(original.name).join(' ')))
    return reject('low-quality-part', 'an inedible or low-quality protein part');
  const state = preparationState(c);
  if (state !== o.state)
    return reject('preparation-state', `${state} where the original is ${o.state}`);
  if (swapBasis(c) !== o.basis) return reject('protein-basis', 'compared on another basis');
  const origProt = original.per100g.proteinG ?? 0;
  if (o.basis === 'per-g-protein' && (c.per100g.proteinG ?? 0) < SWAP_MIN_PROTEIN_SHARE * origProt)
    return reject(
      'too-little-protein',
      `under ${SWAP_MIN_PROTEIN_SHARE * 100}% of the original's protein per 100 g`,
    );
  const prof = profileOf(c, opts.fractions);
  const m = metricOf(c, prof, o.basis);
  if (m === null) return reject('no-phosphorus-value', 'no absorbable phosphorus estimate');
  if (m > opts.maxShare * o.metric)
    return reject(
      'not-less-phosphorus',
      `${Math.round((m / o.metric) * 100)}% of the original's absorbable phosphorus`,
    );
  const k = mineralCheck('potassium', o, c);
  const na = mineralCheck('sodium', o, c);
  const origin = originOf(c);
  const originChanged = origin !== o.origin;
  const cautions = [k.caution, na.caution].filter((x): x is string => x !== null);
  if (originChanged && o.origin === 'animal' && origin === 'plant')
    cautions.push(
      'Plant protein in place of animal protein: lower digestibility-corrected protein quality, so more of it may be needed (from memory).',
    );
  const candidate: SwapCandidate = {
    foodId: c.id,
    name: c.name,
    code: c.code,
    source: c.source,
    group: c.group,
    basis: o.basis,
    absorbableMg: Math.round(m * 10) / 10,
    shareOfOriginal: Math.round((m / o.metric) * 1000) / 1000,
    portion: o.basis === 'per-portion' ? comparisonPortion(c) : null,
    per100g: { phosphorusMg: c.per100g.phosphorusMg, proteinG: c.per100g.proteinG },
    additiveLikely: prof.additiveLikely || prof.additiveEvidentFromName,
    sameKind: o.kind !== '' && kindWord(c.name) === o.kind,
    savedAbsorbableMg: Math.round((o.metric - m) * 10) / 10,
    potassiumShare: k.share,
    sodiumShare: na.share,
    proteinOrigin: origin,
    proteinOriginChanged: originChanged,
    cautions,
  };
  return { verdict: k.caution || na.caution ? 'caution' : 'accept', candidate };
}

const bySwapOrder = (a: SwapCandidate, b: SwapCandidate) =>
  Number(b.sameKind) - Number(a.sameKind) ||
  b.savedAbsorbableMg - a.savedAbsorbableMg ||
  a.name.localeCompare(b.name) ||
  a.foodId - b.foodId;

/**
 * Ranks candidate swaps (pure): the ones `judgeSwap` accepts, at most `limit` (<= 5); the same
 * kind of food first (cheese for cheese: a swap the patient will make), then the most
 * absorbable phosphorus saved per g protein kept (or per portion for foods without protein).
 * Swaps with > 20% more potassium or sodium come separately, each with its caution.
 */
export function rankSwaps(
  original: Food,
  candidates: readonly Food[],
  opts: { fractions?: AbsorptionFractions; maxShare: number; limit: number },
): SwapResult {
  const basis = swapBasis(original);
  const orig = metric(original, basis, opts.fractions);
  const portion = basis === 'per-portion' ? comparisonPortion(original) : null;
  const pct = Math.round(opts.maxShare * 100);
  const common = `the same preparation state (nothing raw, dried or powdered for a ready-to-eat food), no feet, skin, rinds or gelatin, potassium and sodium at most ${Math.round((SWAP_MAX_POTASSIUM_SODIUM_SHARE - 1) * 100)}% above the original's (else shown only with a caution); the same kind of food first, then the most absorbable phosphorus saved`;
  const rule =
    basis === 'per-g-protein'
      ? `same food group, at least ${SWAP_MIN_PROTEIN_G_PER_100G} g protein per 100 g and at least ${SWAP_MIN_PROTEIN_SHARE * 100}% of this food's protein density, at most ${pct}% of its absorbable phosphorus per g protein; ${common} per g protein kept`
      : `same food group, little or no protein, at most ${pct}% of its absorbable phosphorus per portion; ${common} per portion`;
  const base = {
    foodId: original.id,
    name: original.name,
    group: original.group,
    basis,
    absorbableMg: orig === null ? null : Math.round(orig * 10) / 10,
    portion,
    rule,
  };
  if (orig === null || orig <= 0)
    return { ...base, swaps: [], cautioned: [], potassiumCaution: null };
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
  const facts: OriginalFacts = {
    food: original,
    basis,
    metric: orig,
    kind: kindWord(original.name),
    state: preparationState(original),
    origin: originOf(original),
  };
  const accepted: SwapCandidate[] = [];
  const cautioned: SwapCandidate[] = [];
  for (const c of candidates) {
    const j = judgeAgainst(facts, c, opts);
    if (j.verdict === 'accept') accepted.push(j.candidate);
    else if (j.verdict === 'caution') cautioned.push(j.candidate);
  }
  accepted.sort(bySwapOrder);
  cautioned.sort(bySwapOrder);
  const swaps = accepted.slice(0, limit);
  const shownCautioned = cautioned.slice(0, limit);
  const potassiumRisk = [...swaps, ...shownCautioned].some(
    (s) => s.proteinOrigin === 'plant' || (s.potassiumShare !== null && s.potassiumShare > 1),
  );
  return {
    ...base,
    swaps,
    cautioned: shownCautioned,
    potassiumCaution: potassiumRisk ? PLANT_SWAP_POTASSIUM_CAUTION : null,
    prepared,
  };
}
