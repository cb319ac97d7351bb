import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import Database from 'better-sqlite3';
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

/** Opens (creating the folder if needed) a SQLite file or ':memory:' with WAL and foreign keys. */
export function openDb(file: string): Db {
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true });
  const sqlite = new Database(file);
  if (file !== ':memory:') sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('synchronous = NORMAL');
  const kysely = new Kysely<DB>({ dialect: new SqliteDialect({ database: sqlite }) });
  return {
    kysely,
    sqlite,
    file,
    async close() {
      await kysely.destroy();
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
