import type { Migration } from 'kysely';
import * as foodTables from './202612012000_food_tables.js';
import * as accountsAudit from './202612012040_accounts_audit.js';
import * as patientsPlans from './202612012050_patients_plans.js';
import * as patientErasure from './202612012100_patient_erasure.js';
import * as diaryAudits from './202612012110_diary_audits.js';
import * as foodSearchPrefix from './202612012120_food_search_prefix.js';
import * as foodNameStart from './202612012130_food_name_start_index.js';
import * as patientDialysisDetails from './202612060100_patient_dialysis_details.js';
import * as foodReleaseLinks from './202612060400_food_release_links.js';
import * as glossaryDrafts from './202612060500_glossary_drafts.js';
import * as labResults from './202612060800_lab_results.js';

/**
 * Every migration, by name (no extension, so the same database works from any runner).
 * Add new migrations here in name order; never edit or remove a landed one.
 */
export const migrations: Record<string, Migration> = {
  '202612012000_food_tables': foodTables,
  '202612012040_accounts_audit': accountsAudit,
  '202612012050_patients_plans': patientsPlans,
  '202612012100_patient_erasure': patientErasure,
  '202612012110_diary_audits': diaryAudits,
  '202612012120_food_search_prefix': foodSearchPrefix,
  '202612012130_food_name_start_index': foodNameStart,
  '202612060100_patient_dialysis_details': patientDialysisDetails,
  '202612060400_food_release_links': foodReleaseLinks,
  '202612060500_glossary_drafts': glossaryDrafts,
  '202612060800_lab_results': labResults,
};
