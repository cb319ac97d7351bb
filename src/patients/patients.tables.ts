import type { Generated } from 'kysely';

export interface PatientTable {
  id: Generated<number>;
  label: string;
  name: string | null;
  language: string;
  weight_kg: number;
  ckd_stage: string;
  dialysis: string;
  diabetes: number;
  binder_json: string | null;
  target_overrides_json: Generated<string>;
  /** The identifier the clinic's record system knows the patient by (FHIR Identifier). */
  identifier_system: string | null;
  identifier_value: string | null;
  urine_output_ml_per_day: number | null;
  pd_glucose_g_per_day: number | null;
  is_demo: Generated<number>;
  created_at: string;
  updated_at: string;
}

/** One serum result: as entered and in the analyte's canonical unit (migration 202612060800). */
export interface LabResultTable {
  id: Generated<number>;
  patient_id: number;
  analyte: string;
  value: number;
  unit: string;
  canonical_value: number;
  canonical_unit: string;
  taken_on: string;
  taken_at: string | null;
  source: 'typed' | 'file' | 'fhir';
  source_ref: string | null;
  loinc_code: string | null;
  entered_by: string | null;
  created_at: string;
}

/** A binder prescription from `changed_at` on (null JSON = no binder). */
export interface BinderChangeTable {
  id: Generated<number>;
  patient_id: number;
  binder_json: string | null;
  changed_at: string;
  changed_by: string | null;
  source: string;
}

export interface PatientTables {
  patient: PatientTable;
  lab_result: LabResultTable;
  binder_change: BinderChangeTable;
}
