/**
 * The balancing programme (pure): one integer step variable per adjustable item and per
 * candidate food, linear day totals, the limits as rows, and the objective (absorbable
 * phosphorus plus a small closeness penalty). Amounts are grams; nutrients per gram come from
 * the same profile the summary uses.
 */
import type { BinderPrescription } from '../binders/binder.js';
import type { Food } from '../foods/food.js';
import type { Targets } from '../patients/targets.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import { profileFood } from '../phosphorus/profile.js';
import type { PlanContent } from '../plans/plan.js';
import { MAX_ITEM_GRAMS } from '../plans/plan.js';
import { binderCalciumMg } from '../plans/summary.js';
import { applicability, prepareAmounts, type WeightBasis } from '../preparation/apply.js';
import type { PreparationMethodId } from '../preparation/methods.js';
import { comparisonPortion } from '../plans/swaps.js';
import type { BalancingSettings, ItemChoice, LimitKey, PlacedCandidate } from './balance.js';
import { LpModel, type RowId, type VarId } from './lp-model.js';

/** Nutrients per gram of a food, as the model uses them (a missing value counts as 0, as in the summary). */
export interface PerGram {
  absorbable: number;
  phosphorusMg: number;
  proteinG: number;
  energyKcal: number;
  sodiumMg: number;
  potassiumMg: number;
  calciumMg: number;
}
type Nut = Exclude<keyof PerGram, 'absorbable'>;

/** Grams of one slot: constant + sum(coef x var). */
interface Expr {
  constant: number;
  terms: [VarId, number][];
}

/** One item of the plan or one candidate, with its variables. */
export interface Slot {
  day: number;
  occasion: number;
  /** Index of the item in its occasion, or null for a candidate. */
  item: number | null;
  foodId: number;
  gramsBefore: number;
  stepG: number;
  /** Units of the household measure per step (1 or 0.5), or null when the slot moves in grams. */
  stepUnits: number | null;
  measure: { portionId: number; countBefore: number; description: string } | null;
  grams: Expr;
  /** Integer step variable (items: change from now; candidates: steps added). */
  stepVar: VarId | null;
  /** Binary: item kept (removable items) or candidate added. */
  onVar: VarId | null;
  /** The item's preparation method and weight basis, when it is cooked by one (items only). */
  preparation?: { method: PreparationMethodId; basis: WeightBasis } | null;
}

export interface LimitRow {
  key: LimitKey;
  day: number;
  occasion: number | null;
  row: RowId;
  bound: number;
  unit: string;
  /** Slack variable in the elastic model. */
  slack: VarId | null;
}

export interface BalanceModel {
  lp: LpModel;
  slots: Slot[];
  limits: LimitRow[];
  notes: string[];
}

export interface ModelInput {
  plan: PlanContent;
  days: number[];
  foods: ReadonlyMap<number, Food>;
  targets: Targets;
  absorption: AbsorptionFractions;
  settings: BalancingSettings;
  robust: boolean;
  choices: readonly ItemChoice[];
  candidates: readonly PlacedCandidate[];
  /** The prescription, never changed: its calcium counts against the calcium target. */
  binder?: BinderPrescription | null;
  /** Add penalised slacks to every limit row (the elastic model)... */
  elastic: boolean;
  /** ...of these days only (0-based; all balanced days when absent). */
  elasticDays?: ReadonlySet<number>;
}

/** Limits sit this far inside their bound so rounding in the solver never tips the re-check. */
const MARGIN_REL = 1e-6;
const MARGIN_ABS = 1e-4;
/** Elastic penalty per 100% of a limit missed, in objective units (mg of absorbable P). */
export const SLACK_WEIGHT = 1e5;
/** The protein minimum is relaxed last: its slack costs this many times more. */
const PROTEIN_MIN_SLACK_FACTOR = 100;

/**
 * Per gram of an item cooked by a preparation method, as the summary counts it (typical
 * retained fractions; absorbable at its high end with `robust`): the amounts are linear in the
 * item's grams, so the values for 100 g divided by 100. Null when the method does not apply to
 * the food (the summary then shows it as listed).
 */
export function preparedPerGram(
  food: Food,
  absorption: AbsorptionFractions,
  robust: boolean,
  prep: { method: PreparationMethodId; basis: WeightBasis },
): PerGram | null {
  const a = applicability(food, prep.method);
  if (!a.ok) return null;
  const x = prepareAmounts(
    food,
    profileFood(food, absorption),
    absorption,
    100,
    prep.basis,
    prep.method,
    a,
  );
  const typ = (r: { typical: number } | null) => (r?.typical ?? 0) / 100;
  return {
    absorbable:
      ((robust ? x.absorbablePhosphorusMg?.high : x.absorbablePhosphorusMg?.typical) ?? 0) / 100,
    phosphorusMg: typ(x.phosphorusMg),
    proteinG: typ(x.proteinG),
    energyKcal: (x.energyKcal ?? 0) / 100,
    sodiumMg: typ(x.sodiumMg),
    potassiumMg: typ(x.potassiumMg),
    calciumMg: typ(x.calciumMg),
  };
}

export function perGram(food: Food, absorption: AbsorptionFractions, robust: boolean): PerGram {
  const abs = profileFood(food, absorption).absorbableMg;
  const p = food.per100g;
  return {
    absorbable: ((robust ? abs?.high : abs?.typical) ?? 0) / 100,
    phosphorusMg: (p.phosphorusMg ?? 0) / 100,
    proteinG: (p.proteinG ?? 0) / 100,
    energyKcal: (p.energyKcal ?? 0) / 100,
    sodiumMg: (p.sodiumMg ?? 0) / 100,
    potassiumMg: (p.potassiumMg ?? 0) / 100,
    calciumMg: (p.calciumMg ?? 0) / 100,
  };
}

function choiceFor(choices: readonly ItemChoice[], d: number, o: number, i: number) {
  return choices.find((c) => c.day === d + 1 && c.occasion === o + 1 && c.item === i + 1);
}

/** Adds the variables of one plan item and returns its slot. */
function itemSlot(
  lp: LpModel,
  input: ModelInput,
  at: { day: number; occasion: number; item: number },
  notes: string[],
): Slot {
  const it = input.plan.days[at.day]!.occasions[at.occasion]!.items[at.item]!;
  const food = input.foods.get(it.foodId) as Food;
  const s = input.settings;
  const choice = choiceFor(input.choices, at.day, at.occasion, at.item);
  const stepUnits = it.measure ? (s.measureStep === 'half' ? 0.5 : 1) : null;
  const stepG = it.measure ? it.measure.gramsPerUnit * (stepUnits as number) : s.gramStepG;
  const base: Slot = {
    ...at,
    foodId: it.foodId,
    gramsBefore: it.grams,
    stepG,
    stepUnits,
    measure: it.measure
      ? {
          portionId: it.measure.portionId,
          countBefore: it.measure.count,
          description: it.measure.description,
        }
      : null,
    grams: { constant: it.grams, terms: [] },
    stepVar: null,
    onVar: null,
    preparation:
      it.preparation && it.preparation !== 'as-listed'
        ? { method: it.preparation, basis: it.weightBasis ?? 'table' }
        : null,
  };
  const unknown = food.per100g.phosphorusMg === null || food.per100g.proteinG === null;
  if (unknown)
    notes.push(`${food.name} has no phosphorus or protein value in its table: kept as it is.`);
  if (choice?.mode === 'keep' || unknown || stepG <= 0) return base;
  const minShare = choice?.minShare ?? s.minShare;
  const maxShare = choice?.maxShare ?? s.maxShare;
  let maxG = Math.min(maxShare * it.grams, MAX_ITEM_GRAMS);
  if (it.measure) maxG = Math.min(maxG, 100 * it.measure.gramsPerUnit); // at most 100 units
  const zLo = Math.ceil(((minShare - 1) * it.grams) / stepG - 1e-9);
  const zHi = Math.max(0, Math.floor((maxG - it.grams) / stepG + 1e-9));
  const z = lp.addVar({ lower: Math.min(0, zLo), upper: zHi, integer: true });
  base.stepVar = z;
  if (!choice?.removable) {
    base.grams = { constant: it.grams, terms: [[z, stepG]] };
    return base;
  }
  const u = lp.addVar({ lower: 0, upper: 1, integer: true });
  base.onVar = u;
  // kept (u = 1): grams = now + step x z; removed (u = 0): z = 0 and grams = 0
  lp.addRow(
    [
      [z, 1],
      [u, -zHi],
    ],
    -Infinity,
    0,
  );
  lp.addRow(
    [
      [z, 1],
      [u, -Math.min(0, zLo)],
    ],
    0,
    Infinity,
  );
  base.grams = {
    constant: 0,
    terms: [
      [u, it.grams],
      [z, stepG],
    ],
  };
  return base;
}

/** Adds the variables of one candidate food (0 to n steps, with an "added" binary). */
function candidateSlot(lp: LpModel, input: ModelInput, c: PlacedCandidate): Slot | null {
  const food = input.foods.get(c.foodId);
  if (!food || food.per100g.phosphorusMg === null || food.per100g.proteinG === null) return null;
  const s = input.settings;
  const portion = food.portions.find((p) => p.grams > 0);
  const stepUnits = portion ? (s.measureStep === 'half' ? 0.5 : 1) : null;
  const gramsPerUnit = portion ? portion.grams / (portion.amount > 0 ? portion.amount : 1) : 0;
  const stepG = portion ? gramsPerUnit * (stepUnits as number) : s.gramStepG;
  const maxG = c.maxGrams ?? Math.min(s.candidateMaxGrams, 2 * comparisonPortion(food).grams);
  let nMax = Math.max(1, Math.floor(Math.min(maxG, MAX_ITEM_GRAMS) / stepG + 1e-9));
  if (stepUnits !== null) nMax = Math.min(nMax, Math.floor(100 / stepUnits)); // at most 100 units
  const n = lp.addVar({ lower: 0, upper: nMax, integer: true });
  const a = lp.addVar({ lower: 0, upper: 1, integer: true, cost: s.newFoodPenaltyMg });
  lp.addRow(
    [
      [n, 1],
      [a, -nMax],
    ],
    -Infinity,
    0,
  );
  lp.addRow(
    [
      [n, 1],
      [a, -1],
    ],
    0,
    Infinity,
  );
  return {
    day: c.day,
    occasion: c.occasion,
    item: null,
    foodId: food.id,
    gramsBefore: 0,
    stepG,
    stepUnits,
    measure: portion
      ? { portionId: portion.id, countBefore: 0, description: portion.description }
      : null,
    grams: { constant: 0, terms: [[n, stepG]] },
    stepVar: n,
    onVar: a,
  };
}

/** sum over slots of coef(slot) x grams(slot), as constant + terms. */
function sumOver(slots: readonly Slot[], coef: (s: Slot) => number): Expr {
  const e: Expr = { constant: 0, terms: [] };
  for (const s of slots) {
    const c = coef(s);
    if (c === 0) continue;
    e.constant += c * s.grams.constant;
    for (const [v, k] of s.grams.terms) e.terms.push([v, c * k]);
  }
  return e;
}

const margin = (bound: number) => Math.abs(bound) * MARGIN_REL + MARGIN_ABS;

/**
 * The day limits: [key, nutrient, bound, unit] for each limit that is set. Calcium has two: the
 * clinic's cap on calcium from food, and the patient's calcium target (diet and binder, as the
 * summary checks it), which leaves the food what the binder does not already bring.
 */
function dayLimits(
  targets: Targets,
  s: BalancingSettings,
  binderCalciumMgPerDay: number,
): [LimitKey, Nut, number, string][] {
  const out: [LimitKey, Nut, number, string][] = [];
  const t = targets;
  if (t.proteinG.min !== null) out.push(['proteinG.min', 'proteinG', t.proteinG.min, 'g']);
  if (t.proteinG.max !== null) out.push(['proteinG.max', 'proteinG', t.proteinG.max, 'g']);
  if (t.energyKcal.min !== null)
    out.push(['energyKcal.min', 'energyKcal', t.energyKcal.min, 'kcal']);
  if (t.energyKcal.max !== null)
    out.push(['energyKcal.max', 'energyKcal', t.energyKcal.max, 'kcal']);
  if (t.sodiumMg.max !== null) out.push(['sodiumMg.max', 'sodiumMg', t.sodiumMg.max, 'mg']);
  if (t.potassiumMg.max !== null)
    out.push(['potassiumMg.max', 'potassiumMg', t.potassiumMg.max, 'mg']);
  if (t.phosphorusMg.max !== null)
    out.push(['phosphorusMg.max', 'phosphorusMg', t.phosphorusMg.max, 'mg']);
  const targetCaMax = targets.calciumMg?.max ?? null;
  const foodCaMax = Math.min(
    s.calciumMaxMg ?? Infinity,
    targetCaMax === null ? Infinity : Math.max(0, targetCaMax - binderCalciumMgPerDay),
  );
  if (foodCaMax !== Infinity) out.push(['calciumMg.max', 'calciumMg', foodCaMax, 'mg']);
  return out;
}

/** Adds a limit row lower/upper on `expr` (with a slack in the elastic model). */
function addLimit(
  m: BalanceModel,
  elastic: boolean,
  spec: { key: LimitKey; day: number; occasion: number | null; bound: number; unit: string },
  expr: Expr,
): void {
  const isMin = spec.key.endsWith('.min');
  const terms: [VarId, number][] = [...expr.terms];
  let slack: VarId | null = null;
  if (elastic) {
    const scale = Math.max(Math.abs(spec.bound), 1);
    const factor = spec.key === 'proteinG.min' ? PROTEIN_MIN_SLACK_FACTOR : 1;
    slack = m.lp.addVar({ lower: 0, cost: (SLACK_WEIGHT * factor) / scale });
    terms.push([slack, isMin ? 1 : -1]);
  }
  const rhs = spec.bound - expr.constant;
  const row = isMin
    ? m.lp.addRow(terms, rhs + margin(spec.bound), Infinity)
    : m.lp.addRow(terms, -Infinity, rhs - margin(spec.bound));
  m.limits.push({ ...spec, row, slack });
}

/** Closeness: a deviation variable >= |grams - grams now|, costed per gram. */
function addDeviation(lp: LpModel, slot: Slot, mgPerG: number): void {
  if (slot.stepVar === null || mgPerG <= 0) return;
  if (slot.item === null) {
    for (const [v, k] of slot.grams.terms) lp.addCost(v, mgPerG * k); // grams >= 0 already
    return;
  }
  const dev = lp.addVar({ lower: 0, cost: mgPerG });
  const c = slot.grams.constant - slot.gramsBefore;
  lp.addRow([[dev, 1], ...slot.grams.terms.map(([v, k]): [VarId, number] => [v, -k])], c, Infinity);
  lp.addRow([[dev, 1], ...slot.grams.terms], -c, Infinity);
}

/**
 * Builds the programme for the chosen days: minimise absorbable phosphorus (typical, or high
 * when robust) + closeness penalty, subject to the day limits, the per-meal protein rule and
 * the limit on new foods per day.
 */
export function buildBalanceModel(input: ModelInput): BalanceModel {
  const lp = new LpModel();
  const m: BalanceModel = { lp, slots: [], limits: [], notes: [] };
  const coef = new Map<string, PerGram>();
  // Per gram of a slot's food as the summary counts it: as listed, or after its preparation.
  const per = (slot: Pick<Slot, 'foodId' | 'preparation'>) => {
    const prep = slot.preparation ?? null;
    const key = prep ? `${slot.foodId}|${prep.method}|${prep.basis}` : String(slot.foodId);
    let c = coef.get(key);
    if (!c) {
      const food = input.foods.get(slot.foodId) as Food;
      c =
        (prep && preparedPerGram(food, input.absorption, input.robust, prep)) ??
        perGram(food, input.absorption, input.robust);
      coef.set(key, c);
    }
    return c;
  };
  const mgPerG = input.settings.deviationPenaltyMgPer100g / 100;
  for (const d of input.days) {
    const day = input.plan.days[d]!;
    const daySlots: Slot[] = [];
    day.occasions.forEach((o, oi) =>
      o.items.forEach((_, ii) =>
        daySlots.push(itemSlot(lp, input, { day: d, occasion: oi, item: ii }, m.notes)),
      ),
    );
    const added: VarId[] = [];
    for (const c of input.candidates.filter((x) => x.day === d)) {
      const inOcc = day.occasions[c.occasion]?.items.some((it) => it.foodId === c.foodId);
      const slot = inOcc ? null : candidateSlot(lp, input, c);
      if (slot) {
        daySlots.push(slot);
        if (slot.onVar !== null) added.push(slot.onVar);
      }
    }
    if (added.length > 0)
      lp.addRow(
        added.map((v): [VarId, number] => [v, 1]),
        -Infinity,
        input.settings.maxNewFoodsPerDay,
      );
    const obj = sumOver(daySlots, (s) => per(s).absorbable);
    lp.objectiveOffset += obj.constant;
    for (const [v, k] of obj.terms) lp.addCost(v, k);
    for (const s of daySlots) addDeviation(lp, s, mgPerG);
    const elastic = input.elastic && (input.elasticDays?.has(d) ?? true);
    const binderCa = binderCalciumMg(input.binder ?? null, day.occasions);
    for (const [key, nut, bound, unit] of dayLimits(input.targets, input.settings, binderCa))
      addLimit(
        m,
        elastic,
        { key, day: d, occasion: null, bound, unit },
        sumOver(daySlots, (s) => per(s)[nut]),
      );
    addMealRules(m, { ...input, elastic }, d, daySlots, per);
    m.slots.push(...daySlots);
  }
  return m;
}

/** Each main meal carries at least `mealProteinMinShare` of the day's protein. */
function addMealRules(
  m: BalanceModel,
  input: ModelInput,
  d: number,
  daySlots: readonly Slot[],
  per: (slot: Slot) => PerGram,
): void {
  const share = input.settings.mealProteinMinShare;
  if (share === null || share <= 0) return;
  input.plan.days[d]!.occasions.forEach((o, oi) => {
    if (o.kind !== 'meal') return;
    // protein(meal) - share x protein(day) >= 0
    const e = sumOver(daySlots, (s) => per(s).proteinG * ((s.occasion === oi ? 1 : 0) - share));
    addLimit(
      m,
      input.elastic,
      { key: 'mealProtein.min', day: d, occasion: oi, bound: 0, unit: 'g' },
      e,
    );
  });
}
