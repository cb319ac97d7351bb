import type { AuditTables } from '../audit/audit.tables.js';
import type { AuthTables } from '../auth/auth.tables.js';
import type { FoodTables } from './food.tables.js';

/**
 * The whole database as Kysely sees it. Each area declares its tables in its own
 * `*.tables.ts` and adds them here.
 */
export type DB = FoodTables & AuthTables & AuditTables;
