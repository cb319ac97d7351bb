import { latestLabs, type LabLike, type LatestLabs } from './labs.js';
import type { CkdStage, Dialysis, TargetOverrides } from './patient.js';

export type TargetKey =
  'proteinG' | 'energyKcal' | 'sodiumMg' | 'phosphorusMg' | 'potassiumMg' | 'calciumMg' | 'fluidMl';

/** One daily target: a range (either end may be open), its unit and where it came from. */
export interface Target {
  min: number | null;
  max: number | null;
  unit: 'g/day' | 'kcal/day' | 'mg/day' | 'mL/day';
  /** Per-kg range behind the numbers, when the default is per kg of body weight. */
  perKg: { min: number; max: number; unit: string } | null;
  /** 'default' = computed from the record; 'dietitian' = overridden; 'unset' = awaiting the dietitian. */
  setBy: 'default' | 'dietitian' | 'unset';
  /** Where the default comes from (kept when overridden, so the screen can show both). */
  source: string;
  /** The default the override replaced (null when not overridden or no default exists). */
  defaultValue: { min: number | null; max: number | null } | null;
  note: string | null;
  /** Another guideline's figure shown beside the default (protein: KDIGO 2024), when there is one. */
  alongside?: { min: number; max: number; perKg: number; source: string } | null;
  /** Calcium only: the most elemental calcium from binders, mg/day, when a limit exists. */
  fromBindersMaxMg?: number | null;
  /** When the target is not set, this is said as needing attention (potassium on dialysis). */
  unsetAttention?: string | null;
  /** Potassium only: the record is on dialysis (potassium cautions are shown). */
  onDialysis?: boolean;
}

export type Targets = Record<TargetKey, Target>;

/** What `computeTargets` needs from a patient. */
export interface TargetInputs {
  weightKg: number;
  ckdStage: CkdStage;
  dialysis: Dialysis;
  diabetes: boolean;
  targetOverrides: TargetOverrides;
  /** Lab results (any representation); the latest phosphate decides the phosphorus default. */
  labs?: readonly LabLike[];
  /** 24-h urine output, mL/day, for the dialysis fluid allowance; null = not recorded. */
  urineOutputMlPerDay?: number | null;
  /** Peritoneal dialysis: glucose instilled with the dialysate, g/day; null = not recorded. */
  pdDialysateGlucoseGPerDay?: number | null;
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

const KDOQI_2003_BONE =
  'KDOQI Clinical Practice Guidelines for Bone Metabolism and Disease in CKD (Am J Kidney Dis 2003;42(4 Suppl 3))';

/**
 * Serum phosphorus above which KDOQI 2003 Guideline 4.1 restricts dietary phosphorus to
 * 800-1,000 mg/day: > 4.6 mg/dL (1.49 mmol/L) in CKD 3-4, > 5.5 mg/dL (1.78 mmol/L) in CKD 5
 * and on dialysis. KDOQI 2020 6.3.1 and KDIGO 2017 4.1.8 also tie restriction to raised phosphate.
 */
export function phosphateThresholdMgPerDl(stage: CkdStage): number {
  return stage === '5' ? 5.5 : 4.6;
}

/**
 * Protein quality floor for the phosphorus arithmetic: 12 mg phosphorus per g protein, the lower
 * limit of the reference category (12-<14 mg/g) of Noori N et al., CJASN 2010;5:683-692. A day
 * that meets the protein minimum with foods at this ratio already carries protein x 12 mg.
 */
export const PROTEIN_PHOSPHORUS_FLOOR_MG_PER_G = 12;

/**
 * Potassium offered on hemodialysis: 50-70 mmol/day (x 39.098 mg/mmol, IUPAC) = 1,955-2,737 mg,
 * EBPG guideline on nutrition (Fouque D et al., Nephrol Dial Transplant 2007;22 Suppl 2:ii45-ii87),
 * for pre-dialysis hyperkalaemia (from memory). KDOQI 2020 gives no mg/day figure.
 */
const HD_POTASSIUM_MAX_MG = Math.round(70 * 39.098);

/** Fluid allowance on hemodialysis: urine output + 500 mL/day (common practice, no source). */
export const HD_FLUID_ALLOWANCE_ML = 500;

/**
 * Energy from peritoneal dialysate glucose: about 60% of the instilled glucose is absorbed
 * (Grodstein GP et al., Kidney Int 1981;19:564-567, from memory) at 3.4 kcal per g (dextrose
 * monohydrate, in which PD fluids are labelled; from memory).
 */
export const PD_GLUCOSE_ABSORBED_SHARE = 0.6;
export const DEXTROSE_MONOHYDRATE_KCAL_PER_G = 3.4;

/** KDIGO 2024 CKD guideline (Kidney Int 2024;105(4S):S117-S314) 3.3.1: 0.8 g/kg/day in CKD G3-G5 not on dialysis (2C; from memory). */
const KDIGO_2024_PROTEIN_G_PER_KG = 0.8;
const KDIGO_2024 =
  'KDIGO 2024 Clinical Practice Guideline for the Evaluation and Management of CKD (Kidney Int 2024;105(4S):S117-S314), 3.3.1: 0.8 g/kg/day for adults with CKD G3-G5 (2C)';

function phosphorusTarget(p: TargetInputs, labs: LatestLabs, proteinMinG: number): Target {
  const threshold = phosphateThresholdMgPerDl(p.ckdStage);
  const stageText = p.dialysis === 'none' ? `CKD ${p.ckdStage}` : 'CKD 5 on dialysis';
  const latest = labs.phosphate;
  const source = `${KDOQI_2003_BONE}, Guideline 4.1: 800-1,000 mg/day, adjusted for protein needs, when serum phosphorus is above ${threshold} mg/dL in ${p.ckdStage === '5' ? 'CKD 5' : 'CKD 3-4'}; KDOQI 2020 6.3.1 (keep serum phosphate in the normal range, 1B) and KDIGO 2017 4.1.8 (limit dietary phosphate when treating hyperphosphataemia, 2D)`;
  const raised = latest !== null && latest.mgPerDl > threshold;
  if (!raised) {
    return {
      min: null,
      max: null,
      unit: 'mg/day',
      perKg: null,
      setBy: 'unset',
      source,
      defaultValue: null,
      note:
        latest === null
          ? `No phosphorus restriction by default: no serum phosphate result is on record (restriction applies above ${threshold} mg/dL for ${stageText}). Set by the dietitian if needed.`
          : `No phosphorus restriction by default: the latest serum phosphate, ${latest.mgPerDl} mg/dL on ${latest.date}, is not above ${threshold} mg/dL for ${stageText}. Set by the dietitian if needed.`,
    };
  }
  const proteinFloorMg = Math.round(proteinMinG * PROTEIN_PHOSPHORUS_FLOOR_MG_PER_G);
  const notes = [
    `Applies because the latest serum phosphate, ${latest.mgPerDl} mg/dL on ${latest.date}, is above ${threshold} mg/dL for ${stageText}.`,
    'KDOQI 2020 gives no mg/day figure: a starting point for the dietitian to confirm.',
  ];
  if (proteinFloorMg > 1000)
    notes.push(
      `Protein minimum ${proteinMinG} g x ${PROTEIN_PHOSPHORUS_FLOOR_MG_PER_G} mg/g = ${proteinFloorMg} mg is above the 1,000 mg target: do not meet phosphorus by cutting protein; choose lower-ratio sources and pair the binder with meals.`,
    );
  return {
    min: 800,
    max: 1000,
    unit: 'mg/day',
    perKg: null,
    setBy: 'default',
    source,
    defaultValue: null,
    note: notes.join(' '),
  };
}

function calciumTarget(p: TargetInputs, labs: LatestLabs): Target {
  const ca = labs.calcium;
  const shown = ca ? (ca.correctedMgPerDl ?? ca.mgPerDl) : null;
  const high =
    ca && shown !== null && shown > 10.2
      ? ` Latest ${ca.correctedMgPerDl !== null ? 'albumin-corrected ' : ''}calcium ${shown} mg/dL (${ca.date}) is above 10.2 mg/dL: KDOQI 2003 Guideline 5 advises against calcium-based binders.`
      : '';
  if (p.dialysis === 'none' && p.ckdStage !== '5') {
    return {
      min: 800,
      max: 1000,
      unit: 'mg/day',
      perKg: null,
      setBy: 'default',
      source: `${KDOQI_2020}, 6.2.1: CKD 3-4 not taking active vitamin D analogues: total elemental calcium 800-1,000 mg/day including diet, supplements and calcium-based binders (2B)`,
      defaultValue: null,
      note: `Counts food and the calcium in calcium-based binders.${high}`,
      fromBindersMaxMg: null,
    };
  }
  return {
    min: null,
    max: 2000,
    unit: 'mg/day',
    perKg: null,
    setBy: 'default',
    source: `${KDOQI_2003_BONE}, Guideline 5: CKD 5 and dialysis: elemental calcium from calcium-based binders at most 1,500 mg/day, total with diet at most 2,000 mg/day`,
    defaultValue: null,
    note: `Counts food and the calcium in calcium-based binders.${high}`,
    fromBindersMaxMg: 1500,
  };
}

function potassiumTarget(p: TargetInputs): Target {
  const kdoqi = `${KDOQI_2020}: adjust dietary potassium to keep serum potassium in the normal range (OPINION); no mg/day figure is given`;
  if (p.dialysis === 'hemodialysis')
    return {
      min: null,
      max: HD_POTASSIUM_MAX_MG,
      unit: 'mg/day',
      perKg: null,
      setBy: 'default',
      source: `EBPG guideline on nutrition (Fouque D et al., Nephrol Dial Transplant 2007;22 Suppl 2:ii45-ii87): 50-70 mmol/day (1,955-2,737 mg) on hemodialysis with pre-dialysis hyperkalaemia; ${kdoqi}`,
      defaultValue: null,
      note: 'Offered for hemodialysis for the care team to confirm against serum potassium.',
    };
  return {
    min: null,
    max: null,
    unit: 'mg/day',
    perKg: null,
    setBy: 'unset',
    source: kdoqi,
    defaultValue: null,
    note:
      p.dialysis === 'peritoneal-dialysis'
        ? 'Set by the dietitian: on peritoneal dialysis low serum potassium is common and potassium is often not restricted (from memory).'
        : 'Set by the dietitian.',
  };
}

function fluidTarget(p: TargetInputs): Target {
  const base = { unit: 'mL/day' as const, perKg: null, defaultValue: null };
  const urine = p.urineOutputMlPerDay ?? null;
  if (p.dialysis === 'hemodialysis' && urine !== null)
    return {
      ...base,
      min: null,
      max: urine + HD_FLUID_ALLOWANCE_ML,
      setBy: 'default',
      source: `urine output plus ${HD_FLUID_ALLOWANCE_ML} mL/day: common practice, no source`,
      note: `${urine} mL urine + ${HD_FLUID_ALLOWANCE_ML} mL = ${urine + HD_FLUID_ALLOWANCE_ML} mL/day, all drinks and fluid foods.`,
    };
  return {
    ...base,
    min: null,
    max: null,
    setBy: 'unset',
    source: `urine output plus a stated allowance (${HD_FLUID_ALLOWANCE_ML} mL/day on hemodialysis): common practice, no source`,
    note:
      p.dialysis === 'none'
        ? 'No fluid allowance by default before dialysis.'
        : p.dialysis === 'peritoneal-dialysis'
          ? 'Set by the dietitian from urine output and the daily ultrafiltration volume.'
          : 'Record the 24-h urine output to compute the allowance.',
  };
}

/** Energy from PD dialysate glucose, kcal/day (null when not on PD or not recorded). */
export function dialysateGlucoseKcal(p: TargetInputs): number | null {
  const g = p.pdDialysateGlucoseGPerDay ?? null;
  if (p.dialysis !== 'peritoneal-dialysis' || g === null) return null;
  return Math.round(g * PD_GLUCOSE_ABSORBED_SHARE * DEXTROSE_MONOHYDRATE_KCAL_PER_G);
}

function energyTarget(p: TargetInputs): Target {
  const minKcal = Math.round(25 * p.weightKg);
  const maxKcal = Math.round(35 * p.weightKg);
  const fromDialysate = dialysateGlucoseKcal(p);
  const note =
    'Choose within the range by age, sex, activity, body composition, weight goals, CKD stage and illness (KDOQI 2020).';
  return {
    min: fromDialysate === null ? minKcal : Math.max(0, minKcal - fromDialysate),
    max: fromDialysate === null ? maxKcal : Math.max(0, maxKcal - fromDialysate),
    unit: 'kcal/day',
    perKg: { min: 25, max: 35, unit: 'kcal/kg/day' },
    setBy: 'default',
    source: `${KDOQI_2020}: CKD 1-5D, metabolically stable: 25-35 kcal/kg/day (1C)`,
    defaultValue: null,
    note:
      fromDialysate === null
        ? note
        : `${note} From food: ${minKcal}-${maxKcal} kcal less about ${fromDialysate} kcal absorbed from the dialysate (${p.pdDialysateGlucoseGPerDay} g glucose x ${PD_GLUCOSE_ABSORBED_SHARE} absorbed x ${DEXTROSE_MONOHYDRATE_KCAL_PER_G} kcal/g; absorbed share from Grodstein 1981, from memory).`,
  };
}

function proteinTarget(p: TargetInputs): Target {
  const protein = kdoqi2020ProteinGPerKg(p.dialysis, p.diabetes);
  const notDialysis = p.dialysis === 'none';
  const notes: string[] = [];
  if (notDialysis && !p.diabetes)
    notes.push(
      '0.55-0.60 g/kg/day only in metabolically stable patients under close supervision by a renal dietitian (KDOQI 2020); or a very-low-protein diet of 0.28-0.43 g/kg/day with keto-acid analogues (KDOQI 2020), under close supervision.',
    );
  if (notDialysis)
    notes.push(
      `KDIGO 2024 suggests ${KDIGO_2024_PROTEIN_G_PER_KG} g/kg/day (${round1(KDIGO_2024_PROTEIN_G_PER_KG * p.weightKg)} g) for CKD G3-G5: shown beside the KDOQI 2020 default.`,
    );
  return {
    min: round1(protein.min * p.weightKg),
    max: round1(protein.max * p.weightKg),
    unit: 'g/day',
    perKg: { min: protein.min, max: protein.max, unit: 'g/kg/day' },
    setBy: 'default',
    source: protein.statement,
    defaultValue: null,
    note: notes.length > 0 ? notes.join(' ') : null,
    alongside: notDialysis
      ? {
          min: round1(KDIGO_2024_PROTEIN_G_PER_KG * p.weightKg),
          max: round1(KDIGO_2024_PROTEIN_G_PER_KG * p.weightKg),
          perKg: KDIGO_2024_PROTEIN_G_PER_KG,
          source: KDIGO_2024,
        }
      : null,
  };
}

/**
 * Daily targets from the record, each with its source; dietitian overrides replace defaults.
 * Amounts are per day; protein and energy scale with the weight the clinician chose; the
 * phosphorus default follows the latest serum phosphate and the stage.
 */
export function computeTargets(p: TargetInputs): Targets {
  const o = p.targetOverrides;
  const labs = latestLabs(p.labs ?? []);
  const protein = proteinTarget(p);

  const defaults: Targets = {
    proteinG: protein,
    energyKcal: energyTarget(p),
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
    phosphorusMg: phosphorusTarget(p, labs, protein.min ?? 0),
    potassiumMg: potassiumTarget(p),
    calciumMg: calciumTarget(p, labs),
    fluidMl: fluidTarget(p),
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
  const k = defaults.potassiumMg;
  k.onDialysis = p.dialysis !== 'none';
  if (p.dialysis !== 'none' && k.min === null && k.max === null)
    k.unsetAttention =
      'No potassium target is set for a patient on dialysis: set one with the care team.';
  return defaults;
}
