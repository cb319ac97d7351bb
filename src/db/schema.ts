import type { AuditTables } from '../audit/audit.tables.js';
import type { AuthTables } from '../auth/auth.tables.js';
import type { DiaryTables } from '../diary/diary.tables.js';
import type { FoodTables } from './food.tables.js';
import type { GlossaryTables } from '../glossary/glossary.tables.js';
import type { PatientTables } from '../patients/patients.tables.js';
import type { PlanTables } from '../plans/plans.tables.js';

/**
 * The whole database as Kysely sees it. Each area declares its tables in its own
 * `*.tables.ts` and adds them here.
 */
export type DB = FoodTables &
  AuthTables &
  AuditTables &
  PatientTables &
  PlanTables &
  DiaryTables &
  GlossaryTables;
