/** The plan summary as the plans API returns it (`plan summary --json` contract). */
export interface AbsorbableRange {
  low: number;
  typical: number;
  high: number;
}
export interface Nutrients {
  phosphorusMg: number | null;
  absorbablePhosphorusMg: AbsorbableRange | null;
  additivePhosphorusMg: number | null;
  proteinG: number | null;
  phosphorusProteinRatioMgPerG: number | null;
  potassiumMg: number | null;
  sodiumMg: number | null;
  calciumMg: number | null;
  energyKcal: number | null;
}
export interface SummaryItem {
  foodId: number;
  grams: number;
  label?: string | null;
  name?: string;
  nutrients: Nutrients;
  flags?: unknown;
  additiveLikely?: boolean;
  additiveEvidence?: string[];
  evidence?: string[];
  highRatio?: boolean;
  [k: string]: unknown;
}
export interface SummaryOccasion {
  name: string;
  time?: string | null;
  items: SummaryItem[];
  nutrients: Nutrients;
}
export interface SummaryDay {
  label: string;
  occasions: SummaryOccasion[];
  nutrients: Nutrients;
  targets: Record<string, unknown>;
  status: unknown;
  [k: string]: unknown;
}
export interface BinderSlot {
  day: string | number;
  occasion: string;
  units: number;
  timing: string;
  reason?: string;
  [k: string]: unknown;
}
export interface PlanSummary {
  planId: number | null;
  patientId: number;
  days: SummaryDay[];
  binders: {
    prescription: unknown;
    perOccasion: BinderSlot[];
    elementalCalciumMgPerDay: number | null;
    [k: string]: unknown;
  } | null;
  [k: string]: unknown;
}
