import type { BinderPrescription } from './binder.js';
import {
  BINDER_CATALOGUE,
  BOUND_MG_P_PER_PBED_G,
  KDOQI_2003_CALCIUM_LIMITS,
  elementalCalciumMgPerUnit,
  pbedGPerUnit,
} from './catalogue.js';

/** One eating occasion of one day, with its estimated absorbable phosphorus (typical, mg). */
export interface OccasionLoad {
  name: string;
  kind: 'meal' | 'snack';
  time?: string | undefined;
  absorbableMg: number;
}

/** Clinic thresholds the distribution obeys (from the `thresholds` setting). */
export interface BinderThresholds {
  /** Occasions under this absorbable phosphorus (mg, typical) get no binder. */
  minAbsorbableMgPerOccasion: number;
  /** Occasions at or over this absorbable phosphorus (mg) with no binder are pointed out. */
  highLoadOccasionMg: number;
}

export type DisagreementCode =
  | 'high-load-no-binder'
  | 'binder-exceeds-load'
  | 'no-occasion-over-threshold'
  | 'meal-under-threshold'
  | 'calcium-from-binders-over-limit'
  | 'calcium-total-over-limit'
  | 'calcium-binder-with-high-serum-calcium';

export interface Disagreement {
  code: DisagreementCode;
  occasion: string | null;
  message: string;
}

export interface OccasionBinder {
  occasion: string;
  time: string | null;
  absorbableMg: number;
  units: number;
  /** The exact proportional share before rounding (per-day prescriptions), else null. */
  exactShare: number | null;
  reason: string;
  timing: string;
}

export interface DayBinderSchedule {
  prescribedUnits: number;
  distributedUnits: number;
  occasions: OccasionBinder[];
  pbedGPerDay: number | null;
  elementalCalciumMgFromBinders: number;
  elementalCalciumMgTotal: number;
  disagreements: Disagreement[];
}

/** Stated rounding rule, shown with every schedule. */
export const ROUNDING_RULE =
  'Whole units by largest remainder: each occasion at or over the threshold gets the whole part ' +
  'of its share (units x its absorbable phosphorus / the day total of eligible occasions); the ' +
  'units left go one each to the largest fractional parts. Ties go to the occasion with more ' +
  'absorbable phosphorus, then to the earlier occasion of the day. When no occasion reaches ' +
  'the threshold the meals share the units by load (every occasion when the day has no meal). ' +
  'The total always equals the prescription; a per-meal prescription is shown whole with every meal.';

/** Said where an occasion has no binder: never "not needed", always "ask the care team". */
export const NONE_PRESCRIBED_TIMING =
  'None prescribed with this occasion; if unsure, ask the care team.';

const r0 = (x: number) => Math.round(x);

/**
 * Which occasions share a per-day prescription: those at or over the threshold; when none is,
 * the meals, else every occasion (so the whole prescription is always shown, never less).
 */
function perDayRecipients(
  occasions: readonly OccasionLoad[],
  eligible: (o: OccasionLoad) => boolean,
): { idx: number[]; fallback: 'meals' | 'occasions' | null } {
  const all = occasions.map((_, i) => i);
  const over = all.filter((i) => eligible(occasions[i] as OccasionLoad));
  if (over.length > 0) return { idx: over, fallback: null };
  const meals = all.filter((i) => (occasions[i] as OccasionLoad).kind === 'meal');
  if (meals.length > 0) return { idx: meals, fallback: 'meals' };
  return { idx: all, fallback: 'occasions' };
}

/**
 * Largest-remainder split of `prescribedUnits` over the occasions `idx`, in proportion to their
 * absorbable phosphorus (equal shares when all of them carry none). Fills units, shares, reasons.
 */
function spreadByLoad(
  prescribedUnits: number,
  occasions: readonly OccasionLoad[],
  idx: readonly number[],
  units: number[],
  shares: (number | null)[],
  reasons: string[],
): void {
  if (idx.length === 0) return;
  const loadSum = idx.reduce(
    (s, i) => s + Math.max(0, (occasions[i] as OccasionLoad).absorbableMg),
    0,
  );
  const weight = (i: number) =>
    loadSum > 0 ? Math.max(0, (occasions[i] as OccasionLoad).absorbableMg) : 1;
  const totalMg = loadSum > 0 ? loadSum : idx.length;
  const floors = new Map<number, number>();
  for (const i of idx) {
    const share = (prescribedUnits * weight(i)) / totalMg;
    shares[i] = share;
    floors.set(i, Math.floor(share));
  }
  let left = prescribedUnits - [...floors.values()].reduce((a, b) => a + b, 0);
  const order = [...idx].sort((a, b) => {
    const fa = (shares[a] as number) - Math.floor(shares[a] as number);
    const fb = (shares[b] as number) - Math.floor(shares[b] as number);
    // Fractions equal to 1e-9 count as ties (floating point of equal loads).
    if (Math.abs(fa - fb) > 1e-9) return fb - fa;
    const la = (occasions[a] as OccasionLoad).absorbableMg;
    const lb = (occasions[b] as OccasionLoad).absorbableMg;
    if (la !== lb) return lb - la;
    return a - b;
  });
  const extra = new Set<number>();
  for (const i of order) {
    if (left <= 0) break;
    extra.add(i);
    left--;
  }
  for (const i of idx) {
    const o = occasions[i] as OccasionLoad;
    const share = shares[i] as number;
    const whole = floors.get(i) as number;
    units[i] = whole + (extra.has(i) ? 1 : 0);
    const pct = ((100 * weight(i)) / totalMg).toFixed(1);
    const frac = (share - whole).toFixed(2);
    const basis =
      loadSum > 0
        ? `${r0(o.absorbableMg)} of ${r0(totalMg)} mg absorbable phosphorus in the occasions sharing the prescription (${pct}%)`
        : `1 of ${idx.length} occasions sharing the prescription equally (${pct}%)`;
    reasons[i] =
      `${basis} x ${prescribedUnits} units = ${share.toFixed(2)}: ${whole} whole` +
      (extra.has(i)
        ? ` + 1 of the remaining units (remainder ${frac} is among the largest).`
        : whole === share
          ? '.'
          : ` (remainder ${frac} too small for one of the remaining units).`);
  }
}
const r2 = (x: number) => Math.round(x * 100) / 100;

/** Calcium limits for the stage (mg/day; null = none) and where they come from. */
export interface CalciumLimits {
  fromBindersMaxMg: number | null;
  totalMaxMg: number | null;
  source: string;
}

export const KDOQI_2003_CALCIUM_CHECK: CalciumLimits = {
  ...KDOQI_2003_CALCIUM_LIMITS,
  source: 'KDOQI 2003 Guideline 5',
};

/**
 * KDOQI 2003 Guideline 5: no calcium-based binder when corrected serum calcium is above
 * 10.2 mg/dL (2.54 mmol/L).
 */
export const CALCIUM_BINDER_MAX_SERUM_MG_PER_DL = 10.2;

export interface CalciumContext {
  limits?: CalciumLimits;
  /** Latest serum calcium, albumin-corrected when albumin exists, mg/dL. */
  latestCalcium?: { mgPerDl: number; corrected: boolean; date: string } | null;
}

/**
 * Spreads one day's prescribed binder units over its occasions (pure; no dose is invented).
 * `dietCalciumMg` is the day's calcium from food, for the total-calcium check against the
 * stage's limits (KDOQI 2003 Guideline 5 when none are given).
 */
export function distributeBinder(
  prescription: BinderPrescription,
  occasions: readonly OccasionLoad[],
  thresholds: BinderThresholds,
  dietCalciumMg: number,
  calcium: CalciumContext = {},
): DayBinderSchedule {
  const info = BINDER_CATALOGUE[prescription.ingredient];
  const minMg = thresholds.minAbsorbableMgPerOccasion;
  const eligible = (o: OccasionLoad) => o.absorbableMg >= minMg && o.absorbableMg > 0;
  const disagreements: Disagreement[] = [];
  const units = new Array<number>(occasions.length).fill(0);
  const shares = new Array<number | null>(occasions.length).fill(null);
  const reasons = new Array<string>(occasions.length).fill('');
  let prescribedUnits: number;

  const underText = (o: OccasionLoad) =>
    `${r0(o.absorbableMg)} mg absorbable phosphorus is under the clinic threshold of ${minMg} mg: the prescribed units go to the other occasions.`;

  if (prescription.schedule === 'per-day') {
    prescribedUnits = prescription.units;
    const { idx, fallback } = perDayRecipients(occasions, eligible);
    if (fallback && occasions.length > 0)
      disagreements.push({
        code: 'no-occasion-over-threshold',
        occasion: null,
        message: `${prescribedUnits} units a day are prescribed but no occasion of this day reaches the ${minMg} mg threshold: they are spread over the ${fallback} by load so the whole prescription is shown; confirm with the prescriber how to take them with this plan.`,
      });
    spreadByLoad(prescribedUnits, occasions, idx, units, shares, reasons);
    occasions.forEach((o, i) => {
      if (!idx.includes(i)) reasons[i] = underText(o);
    });
  } else {
    const meals = occasions.filter((o) => o.kind === 'meal');
    prescribedUnits = prescription.units * meals.length;
    occasions.forEach((o, i) => {
      if (o.kind !== 'meal') {
        reasons[i] =
          `The prescription says ${prescription.units} with each meal; this is a snack: none is prescribed with it.`;
        return;
      }
      // A per-meal prescription is given whole with every meal, whatever the estimate says.
      units[i] = prescription.units;
      if (!eligible(o)) {
        reasons[i] =
          `The prescription says ${prescription.units} with each meal: all ${prescription.units} are shown, although this meal's estimated ${r0(o.absorbableMg)} mg absorbable phosphorus is under the ${minMg} mg threshold.`;
        disagreements.push({
          code: 'meal-under-threshold',
          occasion: o.name,
          message: `${o.name}: the prescription says ${prescription.units} with each meal, but this meal's estimated ${r0(o.absorbableMg)} mg absorbable phosphorus is under the ${minMg} mg threshold: confirm with the prescriber.`,
        });
      } else {
        reasons[i] =
          `The prescription says ${prescription.units} with each meal; ${r0(o.absorbableMg)} mg absorbable phosphorus is at or over the ${minMg} mg threshold.`;
      }
    });
  }

  const pbedUnit = pbedGPerUnit(prescription.ingredient, prescription.unitStrengthMg);
  occasions.forEach((o, i) => {
    const n = units[i] as number;
    if (n === 0 && o.absorbableMg >= thresholds.highLoadOccasionMg) {
      disagreements.push({
        code: 'high-load-no-binder',
        occasion: o.name,
        message: `${o.name}: an estimated ${r0(o.absorbableMg)} mg absorbable phosphorus (at or over ${thresholds.highLoadOccasionMg} mg) but no binder in the prescription for it.`,
      });
    }
    if (n > 0 && pbedUnit !== null) {
      const bindsMg = n * pbedUnit * BOUND_MG_P_PER_PBED_G;
      if (bindsMg > o.absorbableMg) {
        disagreements.push({
          code: 'binder-exceeds-load',
          occasion: o.name,
          message: `${o.name}: ${n} unit(s) could bind about ${r0(bindsMg)} mg phosphorus, more than the estimated ${r0(o.absorbableMg)} mg absorbable here.`,
        });
      }
    }
  });

  const distributedUnits = units.reduce((a, b) => a + b, 0);
  const caFromBinders =
    prescribedUnits *
    elementalCalciumMgPerUnit(prescription.ingredient, prescription.unitStrengthMg);
  const caTotal = caFromBinders + dietCalciumMg;
  disagreements.push(...calciumDisagreements(caFromBinders, caTotal, calcium));
  return {
    prescribedUnits,
    distributedUnits,
    occasions: occasions.map((o, i) => ({
      occasion: o.name,
      time: o.time ?? null,
      absorbableMg: r2(o.absorbableMg),
      units: units[i] as number,
      exactShare: shares[i] === null ? null : r2(shares[i] as number),
      reason: reasons[i] as string,
      timing: (units[i] as number) > 0 ? info.timing : NONE_PRESCRIBED_TIMING,
    })),
    pbedGPerDay: pbedUnit === null ? null : r2(pbedUnit * prescribedUnits),
    elementalCalciumMgFromBinders: r2(caFromBinders),
    elementalCalciumMgTotal: r2(caTotal),
    disagreements,
  };
}

function calciumDisagreements(
  caFromBinders: number,
  caTotal: number,
  calcium: CalciumContext,
): Disagreement[] {
  const limits = calcium.limits ?? KDOQI_2003_CALCIUM_CHECK;
  const out: Disagreement[] = [];
  if (limits.fromBindersMaxMg !== null && caFromBinders > limits.fromBindersMaxMg)
    out.push({
      code: 'calcium-from-binders-over-limit',
      occasion: null,
      message: `Elemental calcium from the binder is ${r0(caFromBinders)} mg/day, over the ${limits.source} limit of ${limits.fromBindersMaxMg} mg/day: for the care team to review.`,
    });
  if (caFromBinders > 0 && limits.totalMaxMg !== null && caTotal > limits.totalMaxMg)
    out.push({
      code: 'calcium-total-over-limit',
      occasion: null,
      message: `Elemental calcium from binder and diet is ${r0(caTotal)} mg/day, over the ${limits.source} limit of ${limits.totalMaxMg} mg/day: for the care team to review.`,
    });
  const serum = calcium.latestCalcium;
  if (caFromBinders > 0 && serum && serum.mgPerDl > CALCIUM_BINDER_MAX_SERUM_MG_PER_DL)
    out.push({
      code: 'calcium-binder-with-high-serum-calcium',
      occasion: null,
      message: `Latest ${serum.corrected ? 'albumin-corrected ' : ''}serum calcium ${serum.mgPerDl} mg/dL (${serum.date}) is above ${CALCIUM_BINDER_MAX_SERUM_MG_PER_DL} mg/dL, where KDOQI 2003 Guideline 5 advises against calcium-based binders: for the prescriber to review.`,
    });
  return out;
}
