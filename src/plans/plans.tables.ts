import type { Generated } from 'kysely';

export interface PlanTable {
  id: Generated<number>;
  patient_id: number;
  name: string;
  is_demo: Generated<number>;
  latest_version: number;
  day_count: number;
  created_at: string;
  updated_at: string;
}

export interface PlanVersionTable {
  id: Generated<number>;
  plan_id: number;
  version: number;
  name: string;
  content_json: string;
  foods_json: string;
  context_json: string;
  note: string | null;
  created_at: string;
}

export interface PlanTables {
  plan: PlanTable;
  plan_version: PlanVersionTable;
}
