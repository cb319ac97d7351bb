import type { BinderPrescription } from '../binders/binder.js';
import { BINDER_CATALOGUE } from '../binders/catalogue.js';
import type { MgRange } from '../plans/summary-types.js';
import { ANALYTES, ANALYTE_DEFINITIONS, type Analyte } from './analytes.js';
import { LAB_BAND_SOURCES, type LabBands } from './lab-bands.js';
import {
  CORRECTED_CALCIUM_CAUTION,
  CORRECTED_CALCIUM_SOURCE,
  correctedCalciumMgPerDl,
} from './lab-units.js';
import type { LabRecord, LabSource } from './lab-results.js';
import type { Dialysis } from './patient.js';

/**
 * Everything the trend view draws on one time axis: results per analyte with the clinic's band,
 * albumin-corrected calcium, plan versions with their planned daily absorbable phosphorus, and
 * binder prescription changes. Pure: plain data in, plain data out.
 */

export interface TrendPoint {
  date: string;
  value: number;
  unit: string;
  canonicalValue: number;
  source: LabSource;
}

export interface AnalyteTrend {
  analyte: Analyte;
  label: string;
  canonicalUnit: string;
  band: { min: number | null; max: number | null; source: string };
  /** Oldest first. */
  points: TrendPoint[];
}

export interface PlanVersionMark {
  planId: number;
  planName: string;
  version: number;
  savedAt: string;
  date: string;
  /** Planned average daily absorbable phosphorus of the version, mg/day (low, typical, high). */
  absorbablePhosphorusMgPerDay: MgRange;
}

export interface BinderMark {
  changedAt: string;
  date: string;
  text: string;
}

export interface Trends {
  analytes: AnalyteTrend[];
  correctedCalcium: {
    points: Array<{
      date: string;
      totalMgPerDl: number;
      albuminGPerDl: number;
      correctedMgPerDl: number;
    }>;
    formula: string;
    caution: string;
  };
  planVersions: PlanVersionMark[];
  binderChanges: BinderMark[];
  caution: string;
}

export const TRENDS_CAUTION =
  'Results, plans and binder changes are shown together to help the care team read them; a change in a result after a plan change does not show that the plan caused it. The care team interprets results and decides on treatment.';

export function binderText(b: BinderPrescription | null): string {
  if (!b) return 'no phosphate binder';
  const name = BINDER_CATALOGUE[b.ingredient]?.displayName ?? b.ingredient;
  return `${name} ${b.unitStrengthMg} mg, ${b.units} unit${b.units === 1 ? '' : 's'} ${b.schedule === 'per-meal' ? 'with each meal' : 'per day'}`;
}

function round(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}

/** Corrected calcium where calcium and albumin were taken on the same date (Payne 1973). */
function correctedCalciumPoints(labs: readonly LabRecord[]) {
  const albuminByDate = new Map<string, number>();
  for (const l of labs) if (l.analyte === 'albumin') albuminByDate.set(l.date, l.canonicalValue);
  return labs
    .filter((l) => l.analyte === 'calcium' && albuminByDate.has(l.date))
    .map((l) => {
      const albumin = albuminByDate.get(l.date) as number;
      return {
        date: l.date,
        totalMgPerDl: l.canonicalValue,
        albuminGPerDl: albumin,
        correctedMgPerDl: round(correctedCalciumMgPerDl(l.canonicalValue, albumin), 2),
      };
    });
}

export function buildTrends(input: {
  labs: readonly LabRecord[];
  bands: LabBands;
  defaultBands: LabBands;
  dialysis: Dialysis;
  planVersions: readonly PlanVersionMark[];
  binderChanges: ReadonlyArray<{ binder: BinderPrescription | null; changedAt: string }>;
}): Trends {
  const oldestFirst = [...input.labs].sort(
    (a, b) =>
      a.date.localeCompare(b.date) ||
      (a.takenAt ?? '').localeCompare(b.takenAt ?? '') ||
      a.id - b.id,
  );
  const side = input.dialysis === 'none' ? 'notOnDialysis' : 'onDialysis';
  const analytes = ANALYTES.map((a): AnalyteTrend => {
    const band = input.bands[a][side];
    const def = input.defaultBands[a][side];
    const isDefault = band.min === def.min && band.max === def.max;
    return {
      analyte: a,
      label: ANALYTE_DEFINITIONS[a].label,
      canonicalUnit: ANALYTE_DEFINITIONS[a].canonicalUnit,
      band: { ...band, source: isDefault ? LAB_BAND_SOURCES[a] : 'set by the clinic' },
      points: oldestFirst
        .filter((l) => l.analyte === a)
        .map((l) => ({
          date: l.date,
          value: l.value,
          unit: l.unit,
          canonicalValue: l.canonicalValue,
          source: l.source,
        })),
    };
  });
  return {
    analytes,
    correctedCalcium: {
      points: correctedCalciumPoints(oldestFirst),
      formula: CORRECTED_CALCIUM_SOURCE,
      caution: CORRECTED_CALCIUM_CAUTION,
    },
    planVersions: [...input.planVersions].sort((a, b) => a.savedAt.localeCompare(b.savedAt)),
    binderChanges: input.binderChanges.map((c) => ({
      changedAt: c.changedAt,
      date: c.changedAt.slice(0, 10),
      text: binderText(c.binder),
    })),
    caution: TRENDS_CAUTION,
  };
}
