import type { CkdStage, Dialysis, TargetOverrides } from './patient.js';

export type TargetKey = 'proteinG' | 'energyKcal' | 'sodiumMg' | 'phosphorusMg' | 'potassiumMg';

/** One daily target: a range (either end may be open), its unit and where it came from. */
export interface Target {
  min: number | null;
  max: number | null;
  unit: 'g/day' | 'kcal/day' | 'mg/day';
  /** Per-kg range behind the numbers, when the default is per kg of body weight. */
  perKg: { min: number; max: number; unit: string } | null;
  /** 'default' = computed from the record; 'dietitian' = overridden; 'unset' = awaiting the dietitian. */
  setBy: 'default' | 'dietitian' | 'unset';
  /** Where the default comes from (kept when overridden, so the screen can show both). */
  source: string;
  /** The default the override replaced (null when not overridden or no default exists). */
  defaultValue: { min: number | null; max: number | null } | null;
  note: string | null;
}

export type Targets = Record<TargetKey, Target>;

/** What `computeTargets` needs from a patient. */
export interface TargetInputs {
  weightKg: number;
  ckdStage: CkdStage;
  dialysis: Dialysis;
  diabetes: boolean;
  targetOverrides: TargetOverrides;
}

const KDOQI_2020 =
  'KDOQI Clinical Practice Guideline for Nutrition in CKD: 2020 Update (Ikizler TA et al., Am J Kidney Dis 2020;76(3 Suppl 1):S1-S107)';

/**
 * KDOQI 2020 protein, g/kg body weight/day, for metabolically stable adults:
 * CKD 3-5 not on dialysis without diabetes 0.55-0.60 (1A);
 * CKD 3-5 not on dialysis with diabetes 0.6-0.8 (OPINION);
 * maintenance hemodialysis or peritoneal dialysis, with or without diabetes, 1.0-1.2 (OPINION).
 * (Grades as quoted by the Academy's evidence library and PMC8045140 Table 1.)
 */
export function kdoqi2020ProteinGPerKg(
  dialysis: Dialysis,
  diabetes: boolean,
): { min: number; max: number; statement: string } {
  if (dialysis !== 'none')
    return {
      min: 1.0,
      max: 1.2,
      statement: `${KDOQI_2020}: maintenance ${dialysis === 'hemodialysis' ? 'hemodialysis' : 'peritoneal dialysis'}${diabetes ? ' with diabetes' : ''}, metabolically stable: 1.0-1.2 g/kg/day (OPINION)`,
    };
  if (diabetes)
    return {
      min: 0.6,
      max: 0.8,
      statement: `${KDOQI_2020}: CKD 3-5 not on dialysis with diabetes: 0.6-0.8 g/kg/day (OPINION)`,
    };
  return {
    min: 0.55,
    max: 0.6,
    statement: `${KDOQI_2020}: CKD 3-5 not on dialysis, metabolically stable, without diabetes: 0.55-0.60 g/kg/day (1A)`,
  };
}

const round1 = (x: number) => Math.round(x * 10) / 10;

/** Shown wherever targets are: they are starting points from guidelines, not prescriptions. */
export const TARGETS_CAUTION =
  'Targets are guideline starting points computed from the record; the dietitian and the care team set the ones that apply to this patient.';

/**
 * Daily targets from the record, each with its source; dietitian overrides replace defaults.
 * Amounts are per day; protein and energy scale with the weight the clinician chose.
 */
export function computeTargets(p: TargetInputs): Targets {
  const protein = kdoqi2020ProteinGPerKg(p.dialysis, p.diabetes);
  const o = p.targetOverrides;

  const defaults: Targets = {
    proteinG: {
      min: round1(protein.min * p.weightKg),
      max: round1(protein.max * p.weightKg),
      unit: 'g/day',
      perKg: { min: protein.min, max: protein.max, unit: 'g/kg/day' },
      setBy: 'default',
      source: protein.statement,
      defaultValue: null,
      note:
        p.dialysis === 'none' && !p.diabetes
          ? 'Or a very-low-protein diet of 0.28-0.43 g/kg/day with keto-acid analogues (KDOQI 2020), under close supervision.'
          : null,
    },
    energyKcal: {
      min: Math.round(25 * p.weightKg),
      max: Math.round(35 * p.weightKg),
      unit: 'kcal/day',
      perKg: { min: 25, max: 35, unit: 'kcal/kg/day' },
      setBy: 'default',
      source: `${KDOQI_2020}: CKD 1-5D, metabolically stable: 25-35 kcal/kg/day (1C)`,
      defaultValue: null,
      note: 'Choose within the range by age, sex, activity, body composition, weight goals, CKD stage and illness (KDOQI 2020).',
    },
    sodiumMg: {
      min: null,
      max: 2300,
      unit: 'mg/day',
      perKg: null,
      setBy: 'default',
      source: `${KDOQI_2020}: limit sodium to < 100 mmol/day (< 2.3 g/day) (1B in CKD 3-5, 1C in 5D)`,
      defaultValue: null,
      note: null,
    },
    phosphorusMg: {
      min: 800,
      max: 1000,
      unit: 'mg/day',
      perKg: null,
      setBy: 'default',
      source:
        'KDOQI Clinical Practice Guidelines for Bone Metabolism and Disease in CKD (Am J Kidney Dis 2003;42(4 Suppl 3)), Guideline 4.1: 800-1,000 mg/day, adjusted for protein needs, when serum phosphorus is raised',
      defaultValue: null,
      note: 'Offered as a starting point for the dietitian to confirm: KDOQI 2020 gives no mg/day figure and individualises phosphorus intake to keep serum phosphate in the normal range (1B).',
    },
    potassiumMg: {
      min: null,
      max: null,
      unit: 'mg/day',
      perKg: null,
      setBy: 'unset',
      source: `${KDOQI_2020}: adjust dietary potassium to keep serum potassium in the normal range (OPINION); no mg/day figure is given`,
      defaultValue: null,
      note: 'Set by the dietitian.',
    },
  };

  for (const key of Object.keys(defaults) as TargetKey[]) {
    const ov = o[key];
    if (!ov) continue;
    const d = defaults[key];
    defaults[key] = {
      ...d,
      min: ov.min,
      max: ov.max,
      setBy: 'dietitian',
      defaultValue: d.setBy === 'unset' ? null : { min: d.min, max: d.max },
    };
  }
  return defaults;
}
