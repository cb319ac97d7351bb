import { z } from 'zod';
import { binderPrescriptionSchema, type BinderPrescription } from '../binders/binder.js';
import { labResultInputSchema, type LabRecord, type LabSource } from './lab-results.js';
import { convertLab } from './labs.js';

export { labResultInputSchema, type LabResultInput } from './lab-results.js';

export const CKD_STAGES = ['3a', '3b', '4', '5'] as const;
export type CkdStage = (typeof CKD_STAGES)[number];
export const DIALYSIS_MODALITIES = ['none', 'hemodialysis', 'peritoneal-dialysis'] as const;
export type Dialysis = (typeof DIALYSIS_MODALITIES)[number];

const rangeOverride = z
  .object({
    min: z.number().nonnegative().nullable(),
    max: z.number().positive().nullable(),
  })
  .strict()
  .refine((r) => r.min === null || r.max === null || r.min <= r.max, {
    message: 'min must not be greater than max',
    path: ['min'],
  });

/** Dietitian's values replacing a computed default (absolute amounts per day). */
export const targetOverridesSchema = z
  .object({
    proteinG: rangeOverride.optional(),
    energyKcal: rangeOverride.optional(),
    sodiumMg: rangeOverride.optional(),
    phosphorusMg: rangeOverride.optional(),
    potassiumMg: rangeOverride.optional(),
    calciumMg: rangeOverride.optional(),
    fluidMl: rangeOverride.optional(),
  })
  .strict();
export type TargetOverrides = z.infer<typeof targetOverridesSchema>;

const languageTag = z
  .string()
  .regex(
    /^[a-z]{2,3}(-[A-Za-z0-9]{2,8})*$/,
    "language must be a BCP-47 tag such as 'es' or 'pt-BR'",
  );

/**
 * The identifier the clinic's record system knows the patient by (a FHIR Identifier: the
 * system URI the clinic chose, and the value); FHIR results are matched to patients by it.
 */
export const identifierSchema = z
  .object({
    system: z.string().trim().min(1).max(300).nullable().default(null),
    value: z.string().trim().min(1, 'identifier value is required').max(100),
  })
  .strict();
export type PatientIdentifier = z.infer<typeof identifierSchema>;

const patientFields = {
  label: z.string().trim().min(1, 'label (clinic label or pseudonym) is required').max(80),
  name: z.string().trim().min(1).max(200).nullable().default(null),
  language: languageTag.default('en'),
  weightKg: z
    .number({ error: 'weightKg must be a number (kg)' })
    .min(20, 'weightKg must be between 20 and 300 kg')
    .max(300, 'weightKg must be between 20 and 300 kg'),
  ckdStage: z.enum(CKD_STAGES, { error: "ckdStage must be one of '3a', '3b', '4', '5'" }),
  dialysis: z.enum(DIALYSIS_MODALITIES).default('none'),
  diabetes: z.boolean(),
  labs: z.array(labResultInputSchema).max(200).default([]),
  binder: binderPrescriptionSchema.nullable().default(null),
  targetOverrides: targetOverridesSchema.default({}),
  identifier: identifierSchema.nullable().default(null),
  /** 24-h urine output, mL/day (dialysis fluid allowance); null = not recorded. */
  urineOutputMlPerDay: z
    .number({ error: 'urineOutputMlPerDay must be a number (mL/day)' })
    .min(0, 'urineOutputMlPerDay must be between 0 and 5000 mL/day')
    .max(5000, 'urineOutputMlPerDay must be between 0 and 5000 mL/day')
    .nullable()
    .optional(),
  /** Peritoneal dialysis: glucose instilled with the dialysate, g/day; null = not recorded. */
  pdDialysateGlucoseGPerDay: z
    .number({ error: 'pdDialysateGlucoseGPerDay must be a number (g/day)' })
    .min(0, 'pdDialysateGlucoseGPerDay must be between 0 and 1000 g/day')
    .max(1000, 'pdDialysateGlucoseGPerDay must be between 0 and 1000 g/day')
    .nullable()
    .optional(),
};

/** Dialysis means stage 5D: a stage 3a-4 record on dialysis is a contradiction. */
function checkStageModality(
  p: { ckdStage?: CkdStage | undefined; dialysis?: Dialysis | undefined },
  ctx: z.RefinementCtx,
) {
  if (p.dialysis && p.dialysis !== 'none' && p.ckdStage && p.ckdStage !== '5') {
    ctx.addIssue({
      code: 'custom',
      path: ['ckdStage'],
      message: `ckdStage '${p.ckdStage}' conflicts with dialysis '${p.dialysis}': a patient on dialysis is stage 5 (5D)`,
    });
  }
}

export const patientInputSchema = z.object(patientFields).strict().superRefine(checkStageModality);
export type PatientInput = z.infer<typeof patientInputSchema>;

/** A patient as the domain sees it. */
export interface Patient {
  id: number;
  label: string;
  name: string | null;
  language: string;
  /** The weight the clinician chose for targets (actual, ideal or adjusted), kg. */
  weightKg: number;
  ckdStage: CkdStage;
  dialysis: Dialysis;
  diabetes: boolean;
  /** Results newest first (stored as rows in `lab_result`). */
  labs: LabResult[];
  binder: BinderPrescription | null;
  targetOverrides: TargetOverrides;
  identifier: PatientIdentifier | null;
  urineOutputMlPerDay: number | null;
  pdDialysateGlucoseGPerDay: number | null;
  isDemo: boolean;
  createdAt: string;
  updatedAt: string;
}

/** A result as the record shows it: as entered, canonical, and phosphate/calcium in both units. */
export interface LabResult {
  analyte: LabRecord['analyte'];
  value: number;
  unit: string;
  date: string;
  canonicalValue: number;
  canonicalUnit: string;
  source: LabSource;
  /** Phosphate and calcium only: both units the clinics use. */
  mgPerDl?: number;
  mmolPerL?: number;
}

/** The record's view of stored results (already newest first). */
export function toPatientLabs(records: readonly LabRecord[]): LabResult[] {
  return records.map((r) => {
    const base = {
      analyte: r.analyte,
      value: r.value,
      unit: r.unit,
      date: r.date,
      canonicalValue: r.canonicalValue,
      canonicalUnit: r.canonicalUnit,
      source: r.source,
    };
    return r.analyte === 'phosphate' || r.analyte === 'calcium'
      ? { ...base, ...convertLab(r.analyte, r.canonicalValue, 'mg/dL') }
      : base;
  });
}

export const patientUpdateSchema = z
  .object({
    label: patientFields.label.optional(),
    name: z.string().trim().min(1).max(200).nullable().optional(),
    // No default here: an update that leaves the language out keeps the stored one.
    language: languageTag.optional(),
    weightKg: patientFields.weightKg.optional(),
    ckdStage: patientFields.ckdStage.optional(),
    dialysis: z.enum(DIALYSIS_MODALITIES).optional(),
    diabetes: z.boolean().optional(),
    // Results are added through /api/patients/:id/labs (rows of their own), not here.
    binder: binderPrescriptionSchema.nullable().optional(),
    targetOverrides: targetOverridesSchema.optional(),
    identifier: identifierSchema.nullable().optional(),
    urineOutputMlPerDay: patientFields.urineOutputMlPerDay,
    pdDialysateGlucoseGPerDay: patientFields.pdDialysateGlucoseGPerDay,
  })
  .strict()
  .superRefine(checkStageModality);
export type PatientUpdate = z.infer<typeof patientUpdateSchema>;

/** The input shape of a stored patient (to re-validate a merged update). */
export function patientToInput(p: Patient): PatientInput {
  return {
    label: p.label,
    name: p.name,
    language: p.language,
    weightKg: p.weightKg,
    ckdStage: p.ckdStage,
    dialysis: p.dialysis,
    diabetes: p.diabetes,
    // results live in rows of their own: a merged update does not write them again
    labs: [],
    binder: p.binder,
    targetOverrides: p.targetOverrides,
    identifier: p.identifier,
    urineOutputMlPerDay: p.urineOutputMlPerDay,
    pdDialysateGlucoseGPerDay: p.pdDialysateGlucoseGPerDay,
  };
}
