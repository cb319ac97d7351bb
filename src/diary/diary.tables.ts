import type { Generated } from 'kysely';

export interface DiaryAuditTable {
  id: Generated<number>;
  patient_id: number | null;
  status: 'complete' | 'incomplete';
  source_format: string;
  entry_count: number;
  matched_count: number;
  entries_json: string;
  overrides_json: Generated<string>;
  report_json: string;
  created_by: number | null;
  created_at: string;
  updated_at: string;
}

export interface DiaryMatchMemoryTable {
  clinic: string;
  phrase_key: string;
  food_id: number;
  confirmed_by: number | null;
  times_confirmed: Generated<number>;
  updated_at: string;
}

export interface DiaryTables {
  diary_audit: DiaryAuditTable;
  diary_match_memory: DiaryMatchMemoryTable;
}
