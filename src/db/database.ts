import { closeSync, mkdirSync, openSync } from 'node:fs';
import { dirname } from 'node:path';
import Database from 'better-sqlite3';
import { LRUCache } from 'lru-cache';
import { Kysely, Migrator, SqliteDialect, type MigrationProvider } from 'kysely';
import { migrations } from '../../migrations/index.js';
import type { DB } from './schema.js';

/** An open database: Kysely for queries, the raw handle for bulk import and backups. */
export interface Db {
  readonly kysely: Kysely<DB>;
  readonly sqlite: Database.Database;
  readonly file: string;
  close(): Promise<void>;
}

/**
 * Opens (creating the folder if needed) a SQLite file or ':memory:' with WAL and foreign keys.
 * A new folder is made 0700 and a new file 0600 (health information); SQLite gives the WAL and
 * SHM the database file's mode.
 */
export function openDb(file: string): Db {
  if (file !== ':memory:') {
    mkdirSync(dirname(file), { recursive: true, mode: 0o700 });
    closeSync(openSync(file, 'a', 0o600)); // the mode applies only when the file is created
  }
  const sqlite = new Database(file);
  if (file !== ':memory:') sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('synchronous = NORMAL');
  const kysely = new Kysely<DB>({
    dialect: new SqliteDialect({ database: withStatementCache(sqlite) }),
  });
  return {
    kysely,
    sqlite,
    file,
    async close() {
      await kysely.destroy();
    },
  };
}

/** How many compiled statements Kysely's handle keeps (common practice, no source). */
const STATEMENT_CACHE_SIZE = 256;
/** Longer SQL (bulk inserts, long IN lists) is prepared afresh each time and not kept. */
const STATEMENT_CACHE_MAX_SQL = 4000;

/**
 * The handle Kysely queries through: `prepare` returns a kept statement for SQL it has compiled
 * before (least recently used dropped first). Kysely prepares every query afresh, which was ~8% of
 * a food search; SQLite re-compiles a kept statement by itself after a schema change, and Kysely
 * runs one query at a time on its single connection, so a kept statement is never busy.
 */
function withStatementCache(sqlite: Database.Database) {
  const kept = new LRUCache<string, Database.Statement>({ max: STATEMENT_CACHE_SIZE });
  return {
    close: () => {
      kept.clear();
      sqlite.close();
    },
    prepare: (sql: string): Database.Statement => {
      const hit = kept.get(sql);
      if (hit) return hit;
      const stmt = sqlite.prepare(sql);
      if (sql.length <= STATEMENT_CACHE_MAX_SQL) kept.set(sql, stmt);
      return stmt;
    },
  };
}

const provider: MigrationProvider = {
  getMigrations: () => Promise.resolve(migrations),
};

/** Applies every pending migration; throws with the failing migration's name. */
export async function migrateToLatest(db: Db): Promise<string[]> {
  const migrator = new Migrator({ db: db.kysely, provider });
  const { error, results } = await migrator.migrateToLatest();
  const failed = results?.find((r) => r.status === 'Error');
  if (error) {
    const where = failed ? ` (migration ${failed.migrationName})` : '';
    throw new Error(`database migration failed${where}: ${String(error)}`, { cause: error });
  }
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName);
}

/** A fresh migrated in-memory database, for tests and tools. */
export async function openMemoryDb(): Promise<Db> {
  const db = openDb(':memory:');
  await migrateToLatest(db);
  return db;
}
