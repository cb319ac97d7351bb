import type { BinderPrescription } from '../binders/binder.js';
import type { Disagreement } from '../binders/distribution.js';
import type { SpacingNote } from '../binders/catalogue.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import type { LatestLabs } from '../patients/labs.js';
import type { ClinicalCaution } from './cautions.js';
import type { CkdStage, Dialysis } from '../patients/patient.js';
import type { TargetKey, Targets } from '../patients/targets.js';
import type { Thresholds } from './plan-settings.js';

/** What a version froze at save time besides its content and foods. */
export interface VersionContext {
  patient: { weightKg: number; ckdStage: CkdStage; dialysis: Dialysis; diabetes: boolean };
  targets: Targets;
  binder: BinderPrescription | null;
  absorption: AbsorptionFractions;
  thresholds: Thresholds;
  /** Latest phosphate, calcium and albumin at save time (absent in versions saved before). */
  labs?: LatestLabs;
}

/** The settings the summary reads. */
export interface SummarySettings {
  absorption: AbsorptionFractions;
  thresholds: Thresholds;
}

export interface MgRange {
  low: number;
  typical: number;
  high: number;
}

export type NutrientKey =
  | 'phosphorusMg'
  | 'absorbablePhosphorusMg'
  | 'proteinG'
  | 'potassiumMg'
  | 'sodiumMg'
  | 'calciumMg'
  | 'energyKcal';

/** Totals for an occasion, day or the plan average; `incomplete` lists nutrients some food lacked. */
export interface Nutrients {
  phosphorusMg: number;
  absorbablePhosphorusMg: MgRange;
  additivePhosphorusMg: number;
  proteinG: number;
  phosphorusProteinRatioMgPerG: number | null;
  potassiumMg: number;
  sodiumMg: number;
  calciumMg: number;
  energyKcal: number;
  incomplete: NutrientKey[];
  /**
   * Present only when some item in scope has a preparation method: the low-high range of each
   * amount the method changes (unprepared items count with their one value at both ends).
   */
  preparedRanges?: PreparedRanges;
}

export interface PreparedRanges {
  phosphorusMg: MgRange;
  proteinG: MgRange;
  potassiumMg: MgRange;
  sodiumMg: MgRange;
  calciumMg: MgRange;
}

/** The preparation applied to an item, with what it did and where the figures come from. */
export interface ItemPreparation {
  method: string;
  label: string;
  /** The food's preparation class; null for 'as-listed'. */
  prepClass: string | null;
  /** Which weight the item's grams are; null for 'as-listed'. */
  weightBasis: 'table' | 'plate' | null;
  /** Grams of the food as its table lists it (raw) and on the plate (cooked), typical. */
  tableGrams: number;
  plateGrams: number;
  /** Retained fractions applied (null for 'as-listed': none). */
  factors: Record<'phosphorus' | 'potassium' | 'sodium' | 'calcium' | 'protein', MgRange> | null;
  /** Plate grams per table gram. */
  yield: MgRange | null;
  ranges: PreparedRanges | null;
  sources: string[];
  notes: string[];
}

/** One item's amounts; null = the food table has no value. */
export interface ItemNutrients {
  phosphorusMg: number | null;
  absorbablePhosphorusMg: MgRange | null;
  additivePhosphorusMg: number | null;
  proteinG: number | null;
  phosphorusProteinRatioMgPerG: number | null;
  potassiumMg: number | null;
  sodiumMg: number | null;
  calciumMg: number | null;
  energyKcal: number | null;
}

export interface ItemSummary {
  foodId: number;
  foodName: string;
  foodCode: string;
  source: string;
  grams: number;
  measure: { portionId: number; count: number; description: string } | null;
  /** The patient's own words, or the food's name when none was given. */
  label: string;
  nutrients: ItemNutrients;
  splitMethod: string;
  flags: { additive: boolean; highRatio: boolean };
  /** Present only for items saved with a preparation method; nutrients are after it. */
  preparation?: ItemPreparation;
}

export interface OccasionSummary {
  name: string;
  kind: 'meal' | 'snack';
  time: string | null;
  items: ItemSummary[];
  nutrients: Nutrients;
}

export type CheckStatus = 'below' | 'within' | 'above' | 'not-set';

export interface TargetCheck {
  target: TargetKey;
  value: number;
  min: number | null;
  max: number | null;
  unit: string;
  status: CheckStatus;
  /** Some foods lacked this nutrient: the value is a lower bound. */
  incomplete: boolean;
  message: string;
}

export interface DayStatus {
  level: 'on-target' | 'attention';
  checks: TargetCheck[];
  messages: string[];
}

export interface Contributor {
  foodId: number;
  name: string;
  phosphorusMg: number;
  absorbablePhosphorusMgTypical: number;
  /** Share of the total phosphorus (of the day, or of the whole plan), 0-1. */
  share: number;
  occurrences: number;
  phosphorusProteinRatioMgPerG: number | null;
  flags: { additive: boolean; highRatio: boolean };
}

export interface DayRatioBand {
  ratioMgPerG: number;
  band: string;
  label: string;
  note: string;
}

export interface DaySummary {
  label: string;
  occasions: OccasionSummary[];
  nutrients: Nutrients;
  targets: Targets;
  status: DayStatus;
  /** The day's P:protein ratio in Noori 2010's whole-diet bands (null without protein). */
  ratioBand?: DayRatioBand | null;
  topContributors: Contributor[];
}

export interface BinderOccasionEntry {
  day: string;
  occasion: string;
  time: string | null;
  absorbablePhosphorusMgTypical: number;
  units: number;
  exactShare: number | null;
  reason: string;
  timing: string;
}

export interface BinderDayEntry {
  day: string;
  prescribedUnits: number;
  distributedUnits: number;
  pbedG: number | null;
  elementalCalciumMgFromBinders: number;
  elementalCalciumMgTotal: number;
  disagreements: Disagreement[];
}

export interface BinderSummary {
  prescription: BinderPrescription | null;
  ingredient: {
    displayName: string;
    timing: string;
    timingSource: string;
    warnings: string[];
    spacing: SpacingNote[];
    /** Spacing notes that mention one of the patient's other medicines. */
    spacingForListedMedicines: { medicine: string; notes: SpacingNote[] }[];
    pbedGPerUnit: number | null;
    pbedSource: string;
    elementalCalciumMgPerUnit: number;
  } | null;
  roundingRule: string;
  perOccasion: BinderOccasionEntry[];
  days: BinderDayEntry[];
  /** Elemental calcium from the prescribed binder, mg/day (the highest day when days differ). */
  elementalCalciumMgPerDay: number;
  limits: { fromBindersMaxMg: number; totalMaxMg: number; source: string };
  caution: string;
}

export interface PlanSummary {
  planId: number;
  patientId: number;
  version: number;
  name: string;
  days: DaySummary[];
  average: { nutrients: Nutrients; status: DayStatus };
  topContributors: Contributor[];
  flags: {
    additiveFoods: { foodId: number; name: string; evidence: string[] }[];
    highRatioFoods: {
      foodId: number;
      name: string;
      phosphorusProteinRatioMgPerG: number;
      /** 'absorbable-plant': a plant food judged on absorbable P per g protein; else total. */
      basis?: 'total' | 'absorbable-plant';
      /** The value the flag was judged on, mg per g protein. */
      flaggedValueMgPerG?: number;
    }[];
  };
  binders: BinderSummary;
  thresholds: Thresholds;
  caution: string;
  /** Clinical cautions for this plan (potassium on dialysis, protein under target, additive variability). */
  cautions?: ClinicalCaution[];
}
