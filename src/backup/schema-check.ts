import Database from 'better-sqlite3';
import { Migrator, type MigrationProvider } from 'kysely';
import { migrations } from '../../migrations/index.js';
import { openDb } from '../db/database.js';

/** One schema object as SQLite records it in `sqlite_master`. */
interface SchemaObject {
  type: string;
  name: string;
  tbl_name: string;
  sql: string | null;
}

/** SQLite's own bookkeeping, which differs between equal databases (statistics, sequences). */
const IGNORED = /^sqlite_(sequence|stat\d)$/;

function objectsOf(db: Database.Database): Map<string, string> {
  const rows = db
    .prepare('SELECT type, name, tbl_name, sql FROM sqlite_master ORDER BY type, name')
    .all() as SchemaObject[];
  const out = new Map<string, string>();
  for (const r of rows) {
    if (IGNORED.test(r.name)) continue;
    // Whitespace is not meaning: compare the statement with its runs of space folded.
    out.set(
      `${r.type} ${r.name}`,
      `on ${r.tbl_name}: ${(r.sql ?? '').replace(/\s+/g, ' ').trim()}`,
    );
  }
  return out;
}

const provider: MigrationProvider = { getMigrations: () => Promise.resolve(migrations) };

/** The schema this program's migrations produce, up to and including `lastMigration`. */
async function referenceSchema(lastMigration: string): Promise<Map<string, string>> {
  const db = openDb(':memory:');
  try {
    const { error } = await new Migrator({ db: db.kysely, provider }).migrateTo(lastMigration);
    if (error) throw new Error(`cannot build the reference schema: ${String(error)}`);
    return objectsOf(db.sqlite);
  } finally {
    await db.close();
  }
}

/**
 * Compares the whole schema of a database file (tables, columns, indexes, triggers, views:
 * every `sqlite_master` entry with its SQL) with the one the migrations it records produce.
 * Returns the differences: an object added (a trigger that grants roles), one missing (the audit
 * log's append-only triggers) or one changed. Empty when they are the same.
 */
export async function schemaDifferences(file: string): Promise<string[]> {
  const db = new Database(file, { readonly: true, fileMustExist: true });
  let actual: Map<string, string>;
  let recorded: string[];
  try {
    actual = objectsOf(db);
    recorded = (
      db.prepare('SELECT name FROM kysely_migration ORDER BY name').all() as Array<{ name: string }>
    ).map((r) => r.name);
  } finally {
    db.close();
  }
  const known = Object.keys(migrations).sort();
  const expectedOrder = known.slice(0, recorded.length);
  if (recorded.length === 0 || recorded.some((m, i) => m !== expectedOrder[i])) {
    return [`its migrations (${recorded.join(', ') || 'none'}) are not a prefix of this program's`];
  }
  const expected = await referenceSchema(recorded[recorded.length - 1]!);
  const problems: string[] = [];
  for (const [key, sql] of actual) {
    if (!expected.has(key)) problems.push(`unexpected ${key} (${sql.slice(0, 160)})`);
    else if (expected.get(key) !== sql) problems.push(`changed ${key}`);
  }
  for (const key of expected.keys()) if (!actual.has(key)) problems.push(`missing ${key}`);
  return problems;
}
