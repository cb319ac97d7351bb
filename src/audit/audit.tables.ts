import type { Generated } from 'kysely';

export interface AuditEventTable {
  id: Generated<number>;
  at: string;
  user_id: number | null;
  username: string | null;
  action: string;
  entity: string;
  entity_id: string | null;
  patient_id: string | null;
  patient_ref: string | null;
  outcome: Generated<string>;
  status_code: number | null;
  details_json: string | null;
}

/** Marks a patient whose rows are being erased (only inside the erasing transaction). */
export interface PatientErasureTable {
  patient_id: number;
  started_at: string;
}

export interface AuditTables {
  audit_event: AuditEventTable;
  patient_erasure: PatientErasureTable;
}
