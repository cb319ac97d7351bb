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
  labs_json: Generated<string>;
  binder_json: string | null;
  target_overrides_json: Generated<string>;
  urine_output_ml_per_day: number | null;
  pd_glucose_g_per_day: number | null;
  is_demo: Generated<number>;
  created_at: string;
  updated_at: string;
}

export interface PatientTables {
  patient: PatientTable;
}
