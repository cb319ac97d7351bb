/** The shapes the screens read from the patients and plans API. */
export interface LabResult {
  analyte: string;
  value: number;
  unit: string;
  date: string;
  canonicalValue: number;
  canonicalUnit: string;
  source: string;
  mgPerDl?: number;
  mmolPerL?: number;
}
export interface BinderPrescription {
  ingredient: string;
  unitStrengthMg: number;
  schedule: 'per-day' | 'per-meal';
  units: number;
  otherMedicines?: string[];
}
export interface Patient {
  id: number;
  label: string;
  name: string | null;
  language: string;
  weightKg: number;
  ckdStage: string;
  dialysis: string;
  diabetes: boolean;
  labs: LabResult[];
  binder: BinderPrescription | null;
  targetOverrides?: Record<string, unknown>;
  identifier?: { system: string | null; value: string } | null;
  isDemo?: boolean;
}
export interface Target {
  min: number | null;
  max: number | null;
  unit: string;
  perKg: { min: number; max: number; unit: string } | null;
  setBy: 'default' | 'dietitian' | 'unset';
  source: string;
  defaultValue?: { min: number | null; max: number | null } | null;
  note?: string | null;
}
export type Targets = Record<string, Target>;

export const TARGET_NAMES: Record<string, string> = {
  proteinG: 'Protein',
  energyKcal: 'Energy',
  sodiumMg: 'Sodium',
  phosphorusMg: 'Phosphorus',
  potassiumMg: 'Potassium',
  calciumMg: 'Calcium (diet and binder)',
  fluidMl: 'Fluid allowance',
};

export function stageText(p: Pick<Patient, 'ckdStage' | 'dialysis'>): string {
  if (p.dialysis === 'hemodialysis') return 'CKD 5D, hemodialysis';
  if (p.dialysis === 'peritoneal-dialysis') return 'CKD 5D, peritoneal dialysis';
  return `CKD ${p.ckdStage}${p.ckdStage === '5' ? ', not on dialysis' : ''}`;
}

export function targetText(t: Target): string {
  const u = t.unit;
  if (t.min === null && t.max === null) return 'set by the dietitian';
  if (t.min !== null && t.max !== null) return `${fmt(t.min)}–${fmt(t.max)} ${u}`;
  if (t.max !== null) return `under ${fmt(t.max)} ${u}`;
  return `at least ${fmt(t.min ?? 0)} ${u}`;
}
function fmt(n: number): string {
  return new Intl.NumberFormat('en', { maximumFractionDigits: 1 }).format(n);
}

export const INGREDIENT_NAMES: Record<string, string> = {
  'calcium-acetate': 'Calcium acetate',
  'calcium-carbonate': 'Calcium carbonate',
  'sevelamer-carbonate': 'Sevelamer carbonate',
  'sevelamer-hydrochloride': 'Sevelamer hydrochloride',
  'lanthanum-carbonate': 'Lanthanum carbonate',
  'ferric-citrate': 'Ferric citrate',
  'sucroferric-oxyhydroxide': 'Sucroferric oxyhydroxide',
  'aluminium-hydroxide': 'Aluminium hydroxide',
  'magnesium-carbonate': 'Magnesium carbonate',
};
