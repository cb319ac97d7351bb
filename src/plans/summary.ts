import type { BinderPrescription } from '../binders/binder.js';
import {
  BINDER_CATALOGUE,
  KDOQI_2003_CALCIUM_LIMITS,
  elementalCalciumMgPerUnit,
  pbedGPerUnit,
} from '../binders/catalogue.js';
import {
  ROUNDING_RULE,
  distributeBinder,
  type CalciumContext,
  type CalciumLimits,
} from '../binders/distribution.js';
import type { LatestLabs } from '../patients/labs.js';
import { clinicalCautions } from './cautions.js';
import type { Food } from '../foods/food.js';
import type { TargetKey, Targets } from '../patients/targets.js';
import { profileFood, scaleProfile, type PhosphorusProfile } from '../phosphorus/profile.js';
import type { PlanContent, PlanItem } from './plan.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import { applicability, prepareAmounts, sourcesText } from '../preparation/apply.js';
import { PREPARATION_METHODS, PREP_NUTRIENTS } from '../preparation/methods.js';
import {
  RATIO_BANDS,
  highRatioFlag,
  ratioBandFor,
  type RatioFlagBasis,
} from '../phosphorus/ratio.js';
import type {
  BinderSummary,
  Contributor,
  DayStatus,
  DayRatioBand,
  DaySummary,
  ItemNutrients,
  ItemPreparation,
  ItemSummary,
  MgRange,
  PreparedRanges,
  Nutrients,
  NutrientKey,
  OccasionSummary,
  PlanSummary,
  SummarySettings,
  TargetCheck,
} from './summary-types.js';

export const SUMMARY_CAUTION =
  'Estimates from food-table values and assumed absorption fractions, for the care team: they do not replace clinical judgement, laboratory results or the prescriber.';

/** The plan as the summary sees it: one version's content and who it belongs to. */
export interface PlanForSummary extends PlanContent {
  planId: number;
  patientId: number;
  version: number;
}

/** Running sums in full precision (rounded only on output). */
interface Acc {
  p: number;
  aLow: number;
  aTyp: number;
  aHigh: number;
  add: number;
  prot: number;
  k: number;
  na: number;
  ca: number;
  kcal: number;
  /** Elemental calcium from the prescribed binder, mg (days only). */
  binderCa: number;
  missing: Set<NutrientKey>;
  /** Low and high ends of the amounts a preparation changes; set once any item is prepared. */
  ranges: { low: RangeSums; high: RangeSums } | null;
}

interface RangeSums {
  p: number;
  prot: number;
  k: number;
  na: number;
  ca: number;
}

const sums = (a: Acc): RangeSums => ({ p: a.p, prot: a.prot, k: a.k, na: a.na, ca: a.ca });

const newAcc = (): Acc => ({
  p: 0,
  aLow: 0,
  aTyp: 0,
  aHigh: 0,
  add: 0,
  prot: 0,
  k: 0,
  na: 0,
  ca: 0,
  kcal: 0,
  binderCa: 0,
  missing: new Set(),
  ranges: null,
});

function addTo(acc: Acc, from: Acc): void {
  if (from.ranges || acc.ranges) {
    // Amounts without a preparation count with their one value at both ends of the range.
    acc.ranges ??= { low: sums(acc), high: sums(acc) };
    const add = from.ranges ?? { low: sums(from), high: sums(from) };
    for (const end of ['low', 'high'] as const)
      for (const k of ['p', 'prot', 'k', 'na', 'ca'] as const) acc.ranges[end][k] += add[end][k];
  }
  acc.p += from.p;
  acc.aLow += from.aLow;
  acc.aTyp += from.aTyp;
  acc.aHigh += from.aHigh;
  acc.add += from.add;
  acc.prot += from.prot;
  acc.k += from.k;
  acc.na += from.na;
  acc.ca += from.ca;
  acc.kcal += from.kcal;
  acc.binderCa += from.binderCa;
  for (const m of from.missing) acc.missing.add(m);
}

const r1 = (x: number) => Math.round(x * 10) / 10;
const r2 = (x: number) => Math.round(x * 100) / 100;
const rn = (x: number | null, f: (v: number) => number) => (x === null ? null : f(x));

const NUTRIENT_ORDER: NutrientKey[] = [
  'phosphorusMg',
  'absorbablePhosphorusMg',
  'proteinG',
  'potassiumMg',
  'sodiumMg',
  'calciumMg',
  'energyKcal',
];

function accToNutrients(a: Acc, divisor = 1): Nutrients {
  const d = (x: number) => x / divisor;
  return {
    phosphorusMg: r1(d(a.p)),
    absorbablePhosphorusMg: { low: r1(d(a.aLow)), typical: r1(d(a.aTyp)), high: r1(d(a.aHigh)) },
    additivePhosphorusMg: r1(d(a.add)),
    proteinG: r2(d(a.prot)),
    phosphorusProteinRatioMgPerG: a.prot > 0 ? r1(a.p / a.prot) : null,
    potassiumMg: r1(d(a.k)),
    sodiumMg: r1(d(a.na)),
    calciumMg: r1(d(a.ca)),
    energyKcal: r1(d(a.kcal)),
    incomplete: NUTRIENT_ORDER.filter((k) => a.missing.has(k)),
    // Only when something is prepared, so summaries of plans without methods stay as they were.
    ...(a.ranges ? { preparedRanges: rangesOut(a, divisor) } : {}),
  };
}

function rangesOut(a: Acc, divisor: number): PreparedRanges {
  const r = a.ranges as NonNullable<Acc['ranges']>;
  const m = (k: keyof RangeSums, f: (x: number) => number): MgRange => ({
    low: f(r.low[k] / divisor),
    typical: f(a[k] / divisor),
    high: f(r.high[k] / divisor),
  });
  return {
    phosphorusMg: m('p', r1),
    proteinG: m('prot', r2),
    potassiumMg: m('k', r1),
    sodiumMg: m('na', r1),
    calciumMg: m('ca', r1),
  };
}

/** Targets a plan's days are checked against (fluid is advice only: foods carry no drink volume). */
const TARGET_FIELD: Partial<
  Record<
    TargetKey,
    { label: string; unit: string; value: (n: Acc) => number; nutrient: NutrientKey }
  >
> = {
  proteinG: { label: 'protein', unit: 'g', value: (a) => a.prot, nutrient: 'proteinG' },
  energyKcal: { label: 'energy', unit: 'kcal', value: (a) => a.kcal, nutrient: 'energyKcal' },
  sodiumMg: { label: 'sodium', unit: 'mg', value: (a) => a.na, nutrient: 'sodiumMg' },
  phosphorusMg: { label: 'phosphorus', unit: 'mg', value: (a) => a.p, nutrient: 'phosphorusMg' },
  potassiumMg: { label: 'potassium', unit: 'mg', value: (a) => a.k, nutrient: 'potassiumMg' },
  // Diet calcium plus the elemental calcium of calcium-based binders (KDOQI 2020 6.2.1 counts both).
  calciumMg: {
    label: 'calcium (diet and binder)',
    unit: 'mg',
    value: (a) => a.ca + a.binderCa,
    nutrient: 'calciumMg',
  },
};

function rangeText(min: number | null, max: number | null, unit: string): string {
  if (min !== null && max !== null) return `${min}-${max} ${unit}`;
  if (max !== null) return `at most ${max} ${unit}`;
  return `at least ${min} ${unit}`;
}

/** Status of a day (or the plan average) against each target. */
function checkTargets(a: Acc, targets: Targets, divisor = 1): DayStatus {
  const checks: TargetCheck[] = [];
  const messages: string[] = [];
  for (const key of Object.keys(TARGET_FIELD) as TargetKey[]) {
    const f = TARGET_FIELD[key];
    // Versions saved before a target existed do not carry it: nothing to check.
    const t = targets[key] as Targets[TargetKey] | undefined;
    if (!f || !t) continue;
    const value = f.value(a) / divisor;
    const shown = key === 'proteinG' ? r1(value) : Math.round(value);
    const incomplete = a.missing.has(f.nutrient);
    let status: TargetCheck['status'];
    let message: string;
    if (t.min === null && t.max === null) {
      status = 'not-set';
      message = `${f.label} ${shown} ${f.unit}: no target set`;
      if (t.unsetAttention) messages.push(t.unsetAttention);
    } else if (t.min !== null && value < t.min) {
      status = 'below';
      message = `${f.label} ${shown} ${f.unit} is below the target ${rangeText(t.min, t.max, f.unit)}`;
    } else if (t.max !== null && value > t.max) {
      status = 'above';
      message = `${f.label} ${shown} ${f.unit} is above the target ${rangeText(t.min, t.max, f.unit)}`;
    } else {
      status = 'within';
      message = `${f.label} ${shown} ${f.unit} is within the target ${rangeText(t.min, t.max, f.unit)}`;
    }
    if (incomplete) message += ' (some foods have no value for it: a lower bound)';
    if (status === 'below' || status === 'above') messages.push(message);
    checks.push({
      target: key,
      value: key === 'proteinG' ? r2(value) : r1(value),
      min: t.min,
      max: t.max,
      unit: t.unit,
      status,
      incomplete,
      message,
    });
  }
  return { level: messages.length > 0 ? 'attention' : 'on-target', checks, messages };
}

interface FoodFacts {
  food: Food;
  profile: PhosphorusProfile;
  additive: boolean;
  highRatio: boolean;
  ratioBasis: RatioFlagBasis;
  ratioValueMgPerG: number | null;
}

interface ContributorAcc {
  facts: FoodFacts;
  p: number;
  aTyp: number;
  occurrences: number;
}

function contributors(map: Map<number, ContributorAcc>, totalP: number, n: number): Contributor[] {
  return [...map.values()]
    .sort((a, b) => b.aTyp - a.aTyp || b.p - a.p || a.facts.food.id - b.facts.food.id)
    .slice(0, n)
    .map((c) => ({
      foodId: c.facts.food.id,
      name: c.facts.food.name,
      phosphorusMg: r1(c.p),
      absorbablePhosphorusMgTypical: r1(c.aTyp),
      share: totalP > 0 ? Math.round((c.p / totalP) * 1000) / 1000 : 0,
      occurrences: c.occurrences,
      phosphorusProteinRatioMgPerG: rn(c.facts.profile.ratioMgPerG, r1),
      flags: { additive: c.facts.additive, highRatio: c.facts.highRatio },
    }));
}

function addContributor(
  map: Map<number, ContributorAcc>,
  facts: FoodFacts,
  p: number,
  aTyp: number,
) {
  const c = map.get(facts.food.id);
  if (c) {
    c.p += p;
    c.aTyp += aTyp;
    c.occurrences++;
  } else map.set(facts.food.id, { facts, p, aTyp, occurrences: 1 });
}

/** One item's amounts and summary, after its preparation method when it has one. */
function summarizeItem(
  facts: FoodFacts,
  it: PlanItem,
  absorption: AbsorptionFractions,
): { itemAcc: Acc; summary: ItemSummary } {
  const { food } = facts;
  const prepared = preparedItem(facts, it, absorption);
  if (prepared) return prepared;
  const scaled = scaleProfile(facts.profile, it.grams);
  const f = it.grams / 100;
  const per = food.per100g;
  const itemAcc = newAcc();
  const val = (v: number | null, key: NutrientKey): number | null => {
    if (v === null) {
      itemAcc.missing.add(key);
      return null;
    }
    return v * f;
  };
  const p = scaled.totalMg;
  if (p === null) itemAcc.missing.add('phosphorusMg');
  const abs = scaled.absorbableMg;
  if (abs === null) itemAcc.missing.add('absorbablePhosphorusMg');
  const nutrients = fillAcc(itemAcc, {
    p,
    abs,
    add: scaled.additiveMg,
    prot: val(per.proteinG, 'proteinG'),
    k: val(per.potassiumMg, 'potassiumMg'),
    na: val(per.sodiumMg, 'sodiumMg'),
    ca: val(per.calciumMg, 'calciumMg'),
    kcal: val(per.energyKcal, 'energyKcal'),
    ratio: facts.profile.ratioMgPerG,
  });
  const summary = itemSummary(facts, it, nutrients);
  // 'as-listed' is said, with no factor, so the reader sees the choice was made.
  if (it.preparation === 'as-listed') summary.preparation = asListedPreparation(it.grams);
  return { itemAcc, summary };
}

interface ItemValues {
  p: number | null;
  abs: MgRange | null;
  add: number | null;
  prot: number | null;
  k: number | null;
  na: number | null;
  ca: number | null;
  kcal: number | null;
  ratio: number | null;
}

/** Puts an item's values into its accumulator and returns them rounded for output. */
function fillAcc(itemAcc: Acc, v: ItemValues): ItemNutrients {
  itemAcc.p = v.p ?? 0;
  itemAcc.aLow = v.abs?.low ?? 0;
  itemAcc.aTyp = v.abs?.typical ?? 0;
  itemAcc.aHigh = v.abs?.high ?? 0;
  itemAcc.add = v.add ?? 0;
  itemAcc.prot = v.prot ?? 0;
  itemAcc.k = v.k ?? 0;
  itemAcc.na = v.na ?? 0;
  itemAcc.ca = v.ca ?? 0;
  itemAcc.kcal = v.kcal ?? 0;
  return {
    phosphorusMg: rn(v.p, r1),
    absorbablePhosphorusMg: v.abs
      ? { low: r1(v.abs.low), typical: r1(v.abs.typical), high: r1(v.abs.high) }
      : null,
    additivePhosphorusMg: rn(v.add, r1),
    proteinG: rn(v.prot, r2),
    phosphorusProteinRatioMgPerG: rn(v.ratio, r1),
    potassiumMg: rn(v.k, r1),
    sodiumMg: rn(v.na, r1),
    calciumMg: rn(v.ca, r1),
    energyKcal: rn(v.kcal, r1),
  };
}

function itemSummary(facts: FoodFacts, it: PlanItem, nutrients: ItemNutrients): ItemSummary {
  const { food } = facts;
  return {
    foodId: food.id,
    foodName: food.name,
    foodCode: food.code,
    source: food.source,
    grams: r1(it.grams),
    measure: it.measure
      ? {
          portionId: it.measure.portionId,
          count: it.measure.count,
          description: it.measure.description,
        }
      : null,
    label: it.label ?? food.name,
    nutrients,
    splitMethod: facts.profile.method,
    flags: { additive: facts.additive, highRatio: facts.highRatio },
  };
}

function asListedPreparation(grams: number): ItemPreparation {
  return {
    method: 'as-listed',
    label: PREPARATION_METHODS['as-listed'].label,
    prepClass: null,
    weightBasis: null,
    tableGrams: r1(grams),
    plateGrams: r1(grams),
    factors: null,
    yield: null,
    ranges: null,
    sources: ['as listed in the food table: no factor applied'],
    notes: [],
  };
}

/** An item with a preparation method (other than 'as-listed'), or null when it has none. */
function preparedItem(
  facts: FoodFacts,
  it: PlanItem,
  absorption: AbsorptionFractions,
): { itemAcc: Acc; summary: ItemSummary } | null {
  if (!it.preparation || it.preparation === 'as-listed') return null;
  const a = applicability(facts.food, it.preparation);
  // resolvePlan refused such items; a stored one means the rule changed since: shown as listed.
  if (!a.ok) return null;
  const basis = it.weightBasis ?? 'table';
  const x = prepareAmounts(
    facts.food,
    facts.profile,
    absorption,
    it.grams,
    basis,
    it.preparation,
    a,
  );
  const itemAcc = newAcc();
  const typ = (r: MgRange | null, key: NutrientKey) => {
    if (r === null) itemAcc.missing.add(key);
    return r === null ? null : r.typical;
  };
  const p = typ(x.phosphorusMg, 'phosphorusMg');
  if (x.absorbablePhosphorusMg === null) itemAcc.missing.add('absorbablePhosphorusMg');
  const prot = typ(x.proteinG, 'proteinG');
  const nutrients = fillAcc(itemAcc, {
    p,
    abs: x.absorbablePhosphorusMg,
    add: x.additivePhosphorusMg,
    prot,
    k: typ(x.potassiumMg, 'potassiumMg'),
    na: typ(x.sodiumMg, 'sodiumMg'),
    ca: typ(x.calciumMg, 'calciumMg'),
    kcal: x.energyKcal === null ? (itemAcc.missing.add('energyKcal'), null) : x.energyKcal,
    ratio: facts.profile.ratioMgPerG !== null && p !== null && prot ? p / prot : null,
  });
  const end = (k: 'low' | 'high') => ({
    p: x.phosphorusMg?.[k] ?? 0,
    prot: x.proteinG?.[k] ?? 0,
    k: x.potassiumMg?.[k] ?? 0,
    na: x.sodiumMg?.[k] ?? 0,
    ca: x.calciumMg?.[k] ?? 0,
  });
  itemAcc.ranges = { low: end('low'), high: end('high') };
  const summary = itemSummary(facts, it, nutrients);
  const fr = (r: MgRange): MgRange => ({ low: r.low, typical: r.typical, high: r.high });
  summary.preparation = {
    method: x.method,
    label: PREPARATION_METHODS[x.method].label,
    prepClass: x.prepClass,
    weightBasis: x.weightBasis,
    tableGrams: r1(x.tableGrams.typical),
    plateGrams: r1(x.plateGrams.typical),
    factors: Object.fromEntries(PREP_NUTRIENTS.map((n) => [n, fr(x.factors[n])])) as NonNullable<
      ItemPreparation['factors']
    >,
    yield: fr(x.yield),
    ranges: rangesOut(itemAcc, 1),
    sources: sourcesText(x.factors, x.yield),
    notes: x.notes,
  };
  return { itemAcc, summary };
}

/**
 * The plan summary (pure): per item, occasion, day and plan average, each day against the
 * targets, the top phosphorus contributors, additive and high-ratio flags, and the binder
 * schedule for the prescription. Amounts in mg, g and kcal; ratios in mg phosphorus per g protein.
 * Throws only for a bug (a food missing from `foods`).
 */
export function summarizePlan(
  plan: PlanForSummary,
  foods: ReadonlyMap<number, Food>,
  targets: Targets,
  settings: SummarySettings,
  binder: BinderPrescription | null = null,
  labs: LatestLabs | null = null,
): PlanSummary {
  const { thresholds, absorption } = settings;
  const calcium = calciumContext(targets, labs);
  const factsCache = new Map<number, FoodFacts>();
  const factsOf = (foodId: number): FoodFacts => {
    let f = factsCache.get(foodId);
    if (!f) {
      const food = foods.get(foodId);
      if (!food) throw new Error(`food ${foodId} missing from the summary's food map`);
      const profile = profileFood(food, absorption);
      const flag = highRatioFlag(
        { ...profile, absorbableTypicalMg: profile.absorbableMg?.typical ?? null },
        food.per100g.proteinG,
        {
          highRatioMgPerG: thresholds.highRatioMgPerG,
          minProteinGPer100g: thresholds.highRatioMinProteinGPer100g,
          animalOrganicTypical: absorption.animalOrganic.typical,
        },
      );
      f = {
        food,
        profile,
        additive: profile.additiveLikely || profile.additiveEvidentFromName,
        highRatio: flag.flagged,
        ratioBasis: flag.basis,
        ratioValueMgPerG: flag.valueMgPerG,
      };
      factsCache.set(foodId, f);
    }
    return f;
  };

  const planAcc = newAcc();
  const planContrib = new Map<number, ContributorAcc>();
  const days: DaySummary[] = [];
  const dayAccs: Acc[] = [];
  const loadsByDay: number[][] = [];

  for (const day of plan.days) {
    const dayAcc = newAcc();
    const dayContrib = new Map<number, ContributorAcc>();
    const occasions: OccasionSummary[] = [];
    const occLoads: number[] = [];
    for (const occ of day.occasions) {
      const occAcc = newAcc();
      const items: ItemSummary[] = [];
      for (const it of occ.items) {
        const facts = factsOf(it.foodId);
        const { itemAcc, summary } = summarizeItem(facts, it, absorption);
        addTo(occAcc, itemAcc);
        addContributor(dayContrib, facts, itemAcc.p, itemAcc.aTyp);
        addContributor(planContrib, facts, itemAcc.p, itemAcc.aTyp);
        items.push(summary);
      }
      addTo(dayAcc, occAcc);
      occasions.push({
        name: occ.name,
        kind: occ.kind,
        time: occ.time,
        items,
        nutrients: accToNutrients(occAcc),
      });
      occLoads.push(occAcc.aTyp); // unrounded, for the binder distribution
    }
    dayAcc.binderCa = binderCalciumMg(binder, day.occasions);
    addTo(planAcc, dayAcc);
    dayAccs.push(dayAcc);
    loadsByDay.push(occLoads);
    days.push({
      label: day.label,
      occasions,
      nutrients: accToNutrients(dayAcc),
      targets,
      status: checkTargets(dayAcc, targets),
      ratioBand: dayRatioBand(dayAcc),
      topContributors: contributors(dayContrib, dayAcc.p, Math.min(3, thresholds.topContributors)),
    });
  }

  const n = Math.max(1, plan.days.length);
  const additiveFoods: PlanSummary['flags']['additiveFoods'] = [];
  const highRatioFoods: PlanSummary['flags']['highRatioFoods'] = [];
  for (const f of factsCache.values()) {
    if (f.additive)
      additiveFoods.push({ foodId: f.food.id, name: f.food.name, evidence: f.profile.evidence });
    if (f.highRatio)
      highRatioFoods.push({
        foodId: f.food.id,
        name: f.food.name,
        phosphorusProteinRatioMgPerG: r1(f.profile.ratioMgPerG as number),
        basis: f.ratioBasis,
        flaggedValueMgPerG: r1(f.ratioValueMgPerG as number),
      });
  }

  return {
    planId: plan.planId,
    patientId: plan.patientId,
    version: plan.version,
    name: plan.name,
    days,
    average: { nutrients: accToNutrients(planAcc, n), status: checkTargets(planAcc, targets, n) },
    topContributors: contributors(planContrib, planAcc.p, thresholds.topContributors),
    flags: { additiveFoods, highRatioFoods },
    binders: summarizeBinders(binder, days, dayAccs, loadsByDay, settings, calcium),
    thresholds,
    caution: SUMMARY_CAUTION,
    cautions: clinicalCautions({
      targets,
      proteinBelowTarget: days.some((d) =>
        d.status.checks.some((c) => c.target === 'proteinG' && c.status === 'below'),
      ),
    }),
  };
}

function summarizeBinders(
  binder: BinderPrescription | null,
  days: readonly DaySummary[],
  dayAccs: readonly Acc[],
  loadsByDay: readonly number[][],
  settings: SummarySettings,
  calcium: CalciumContext,
): BinderSummary {
  const stage = calcium.limits ?? null;
  const limits =
    stage === null
      ? {
          ...KDOQI_2003_CALCIUM_LIMITS,
          source: 'KDOQI 2003 (Am J Kidney Dis 2003;42(4 Suppl 3)) Guideline 5',
        }
      : {
          // Without a binder-only limit, binder calcium is bounded by the total limit itself.
          fromBindersMaxMg: stage.fromBindersMaxMg ?? stage.totalMaxMg ?? 0,
          totalMaxMg: stage.totalMaxMg ?? 0,
          source: stage.source,
        };
  const caution =
    'The product spreads the prescribed binder over the meals; it does not set or change the dose. Disagreements are for the prescriber to review.';
  if (!binder) {
    return {
      prescription: null,
      ingredient: null,
      roundingRule: ROUNDING_RULE,
      perOccasion: [],
      days: [],
      elementalCalciumMgPerDay: 0,
      limits,
      caution,
    };
  }
  const info = BINDER_CATALOGUE[binder.ingredient];
  const perOccasion: BinderSummary['perOccasion'] = [];
  const dayEntries: BinderSummary['days'] = [];
  let maxCa = 0;
  days.forEach((day, di) => {
    const s = distributeBinder(
      binder,
      day.occasions.map((o, oi) => ({
        name: o.name,
        kind: o.kind,
        time: o.time ?? undefined,
        absorbableMg: loadsByDay[di]?.[oi] ?? o.nutrients.absorbablePhosphorusMg.typical,
      })),
      {
        minAbsorbableMgPerOccasion: settings.thresholds.binderMinAbsorbableMgPerOccasion,
        highLoadOccasionMg: settings.thresholds.highLoadOccasionMg,
      },
      (dayAccs[di] as Acc).ca,
      calcium,
    );
    for (const o of s.occasions) {
      perOccasion.push({
        day: day.label,
        occasion: o.occasion,
        time: o.time,
        absorbablePhosphorusMgTypical: r1(o.absorbableMg),
        units: o.units,
        exactShare: o.exactShare,
        reason: o.reason,
        timing: o.timing,
      });
    }
    maxCa = Math.max(maxCa, s.elementalCalciumMgFromBinders);
    dayEntries.push({
      day: day.label,
      prescribedUnits: s.prescribedUnits,
      distributedUnits: s.distributedUnits,
      pbedG: s.pbedGPerDay,
      elementalCalciumMgFromBinders: r1(s.elementalCalciumMgFromBinders),
      elementalCalciumMgTotal: r1(s.elementalCalciumMgTotal),
      disagreements: s.disagreements,
    });
  });
  const meds = binder.otherMedicines ?? [];
  return {
    prescription: binder,
    ingredient: {
      displayName: info.displayName,
      timing: info.timing,
      timingSource: info.timingSource,
      warnings: info.warnings,
      spacing: info.spacing,
      spacingForListedMedicines: meds
        .map((m) => ({
          medicine: m,
          notes: info.spacing.filter((s) =>
            s.medicines.toLowerCase().includes(m.toLowerCase().split(/\s+/)[0] ?? ''),
          ),
        }))
        .filter((x) => x.notes.length > 0),
      pbedGPerUnit: pbedGPerUnit(binder.ingredient, binder.unitStrengthMg),
      pbedSource:
        info.rpbcPerG === null
          ? 'no phosphate-binder equivalent published for this ingredient (Daugirdas 2011 covers calcium, sevelamer, lanthanum, magnesium and aluminium binders)'
          : `Daugirdas JT et al., Semin Dial 2011;24(1):41-49: ${info.rpbcPerG} g calcium carbonate per g`,
      elementalCalciumMgPerUnit: r1(
        elementalCalciumMgPerUnit(binder.ingredient, binder.unitStrengthMg),
      ),
    },
    roundingRule: ROUNDING_RULE,
    perOccasion,
    days: dayEntries,
    elementalCalciumMgPerDay: r1(maxCa),
    limits,
    caution,
  };
}

/** Elemental calcium from the prescribed binder on one day, mg (per-meal: units x the meals). */
export function binderCalciumMg(
  binder: BinderPrescription | null,
  occasions: readonly { kind: 'meal' | 'snack' }[],
): number {
  if (!binder) return 0;
  const units =
    binder.schedule === 'per-day'
      ? binder.units
      : binder.units * occasions.filter((o) => o.kind === 'meal').length;
  return units * elementalCalciumMgPerUnit(binder.ingredient, binder.unitStrengthMg);
}

/** The stage's calcium limits from the calcium target (older versions: KDOQI 2003) and the latest serum calcium. */
function calciumContext(targets: Targets, labs: LatestLabs | null): CalciumContext {
  const t = targets.calciumMg as Targets['calciumMg'] | undefined;
  const source =
    t?.setBy === 'dietitian'
      ? "the dietitian's calcium target"
      : t?.fromBindersMaxMg
        ? 'KDOQI 2003 Guideline 5'
        : 'KDOQI 2020 6.2.1 (CKD 3-4, binders included)';
  const limits: CalciumLimits | undefined =
    t && t.setBy !== 'unset'
      ? { fromBindersMaxMg: t.fromBindersMaxMg ?? null, totalMaxMg: t.max, source }
      : undefined;
  const ca = labs?.calcium ?? null;
  return {
    ...(limits ? { limits } : {}),
    latestCalcium: ca
      ? {
          mgPerDl: ca.correctedMgPerDl ?? ca.mgPerDl,
          corrected: ca.correctedMgPerDl !== null,
          date: ca.date,
        }
      : null,
  };
}

/**
 * The day's phosphorus-to-protein ratio in Noori 2010's bands: the evidence was gathered on
 * whole-diet intakes, so the band belongs to day totals, not to single foods.
 */
function dayRatioBand(a: Acc): DayRatioBand | null {
  if (a.prot <= 0) return null;
  const ratio = a.p / a.prot;
  const band = ratioBandFor(ratio, RATIO_BANDS);
  return { ratioMgPerG: r1(ratio), band: band.id, label: band.label, note: band.note };
}
