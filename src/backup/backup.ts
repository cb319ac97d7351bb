import { chmodSync, closeSync, existsSync, openSync, renameSync, rmSync, statSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import Database from 'better-sqlite3';
import { migrations } from '../../migrations/index.js';
import type { Clock } from '../clock.js';
import { migrateToLatest, openDb } from '../db/database.js';
import { acquireDbLock } from '../server/db-lock.js';
import { PRIVATE_FILE_MODE, ensurePrivateFile } from '../server/private-files.js';
import { schemaDifferences } from './schema-check.js';
import { readBackupKey, signBackup, verifyBackup } from './signature.js';

/** What a check of a database file found: usable, or why not. */
export type DatabaseCheck =
  | { ok: true; migrations: string[]; pendingMigrations: string[]; bytes: number }
  | { ok: false; problems: string[] };

/** Tables every phosledger database has once its first migration ran. */
const CORE_TABLES = ['food_source', 'food', 'nutrient_value', 'setting', 'kysely_migration'];

/**
 * Checks a file before it may replace the live database: it opens as SQLite, passes
 * `PRAGMA integrity_check` and `foreign_key_check`, and holds a phosledger schema no newer
 * than this program (every migration it records is one this program knows).
 */
export function checkDatabaseFile(file: string): DatabaseCheck {
  if (!existsSync(file)) return { ok: false, problems: [`${file}: no such file`] };
  let db: Database.Database | undefined;
  try {
    db = new Database(file, { readonly: true, fileMustExist: true });
    const integrity = db.pragma('integrity_check') as Array<{ integrity_check: string }>;
    const problems = integrity
      .map((r) => r.integrity_check)
      .filter((m) => m !== 'ok')
      .slice(0, 10)
      .map((m) => `integrity_check: ${m}`);
    if (problems.length > 0) return { ok: false, problems };
    const fk = db.pragma('foreign_key_check') as unknown[];
    if (fk.length > 0)
      return { ok: false, problems: [`foreign_key_check: ${fk.length} broken references`] };
    const tables = new Set(
      (
        db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as Array<{
          name: string;
        }>
      ).map((r) => r.name),
    );
    const missing = CORE_TABLES.filter((t) => !tables.has(t));
    if (missing.length > 0) {
      return { ok: false, problems: [`not a phosledger database: no table ${missing.join(', ')}`] };
    }
    const recorded = (
      db.prepare('SELECT name FROM kysely_migration ORDER BY name').all() as Array<{ name: string }>
    ).map((r) => r.name);
    const known = Object.keys(migrations);
    const unknown = recorded.filter((m) => !known.includes(m));
    if (unknown.length > 0) {
      return {
        ok: false,
        problems: [
          `made by a newer phosledger (unknown migrations: ${unknown.join(', ')}): upgrade first`,
        ],
      };
    }
    return {
      ok: true,
      migrations: recorded,
      pendingMigrations: known.filter((m) => !recorded.includes(m)),
      bytes: statSync(file).size,
    };
  } catch (err) {
    return { ok: false, problems: [`${basename(file)}: ${(err as Error).message}`] };
  } finally {
    db?.close();
  }
}

/** The subset of better-sqlite3 a backup needs (the live handle of a `Db`). */
interface BackupSource {
  backup(
    file: string,
    options?: { progress?: (p: { totalPages: number; remainingPages: number }) => number | void },
  ): Promise<{ totalPages: number; remainingPages: number }>;
}

/**
 * Copies a database with SQLite's online backup API (safe while the server keeps writing: the
 * copy is one consistent snapshot). Writes `<file>.partial` first and renames it when the copy
 * passes its checks, so a failed backup never leaves a file that looks complete. The copy is
 * 0600 and, given the installation's key, signed (`<file>.sig`) so a restore can trust it.
 */
export async function backupDatabase(
  source: BackupSource,
  file: string,
  opts: { overwrite?: boolean; key?: Buffer } = {},
): Promise<{ pages: number; bytes: number; signature: string | null }> {
  if (existsSync(file) && !opts.overwrite) {
    throw new Error(`${file} exists: choose a new name (backups are never overwritten silently)`);
  }
  if (!existsSync(dirname(file) || '.')) throw new Error(`folder ${dirname(file)} does not exist`);
  const partial = `${file}.partial`;
  rmSync(partial, { force: true });
  // SQLite writes into the empty file and keeps its mode: private from the first byte.
  closeSync(openSync(partial, 'wx', PRIVATE_FILE_MODE));
  chmodSync(partial, PRIVATE_FILE_MODE);
  try {
    // After the first small steps, copy everything in one step: one read snapshot, so a
    // busy server cannot keep restarting the copy.
    const result = await source.backup(partial, { progress: () => 0x7fffffff });
    // The copy inherits WAL mode; a backup should be one self-contained file.
    const copy = new Database(partial, { fileMustExist: true });
    try {
      copy.pragma('journal_mode = DELETE');
    } finally {
      copy.close();
    }
    const check = checkDatabaseFile(partial);
    if (!check.ok) throw new Error(`the copy failed its check: ${check.problems.join('; ')}`);
    renameSync(partial, file);
    const signature = opts.key ? await signBackup(file, opts.key) : null;
    return { pages: result.totalPages, bytes: statSync(file).size, signature };
  } finally {
    rmSync(partial, { force: true });
  }
}

export interface RestoreResult {
  /** Where the database as it was before the restore was kept (null if there was none). */
  safetyCopy: string | null;
  migrated: string[];
  bytes: number;
}

/** Every reason to refuse a backup before touching the live database, or none. */
export async function restoreProblems(file: string, target: string): Promise<string[]> {
  if (!existsSync(file)) return [`${file}: no such file`];
  const key = readBackupKey(target);
  const unsigned = await verifyBackup(file, key);
  if (unsigned) return [unsigned];
  const check = checkDatabaseFile(file);
  if (!check.ok) return check.problems;
  const schema = await schemaDifferences(file);
  if (schema.length > 0) {
    return [
      `its schema is not the one phosledger's migrations make: ${schema.slice(0, 10).join('; ')}`,
    ];
  }
  return [];
}

/**
 * Replaces the database at `target` with the backup `file`, which must carry a valid signature
 * under this installation's key, pass the integrity checks and hold exactly the schema the
 * migrations make. Refused while a server (or another restore) holds the database's lock. The
 * current database is first copied aside (`<target>.before-restore-<time>`, signed, 0600); the
 * backup is then written into the target with the backup API and brought up to this program's
 * schema.
 */
export async function restoreDatabase(
  file: string,
  target: string,
  clock: Clock,
): Promise<RestoreResult> {
  const refused = (why: string) => new Error(`${file} was not restored: ${why}`);
  let problems: string[];
  try {
    problems = await restoreProblems(file, target);
  } catch (err) {
    problems = [(err as Error).message];
  }
  if (problems.length > 0) throw refused(problems.join('; '));
  const release = acquireDbLock(target, 'restore', clock.now());
  try {
    return await replaceDatabase(file, target, clock);
  } finally {
    release();
  }
}

async function replaceDatabase(file: string, target: string, clock: Clock): Promise<RestoreResult> {
  let safetyCopy: string | null = null;
  if (existsSync(target)) {
    const stamp = clock.now().toISOString().replace(/[:.]/g, '-');
    safetyCopy = join(dirname(target), `${basename(target)}.before-restore-${stamp}`);
    const live = new Database(target, { fileMustExist: true });
    try {
      await backupDatabase(live, safetyCopy, { key: readBackupKey(target) });
    } finally {
      live.close();
    }
  }
  ensurePrivateFile(target);
  const source = new Database(file, { readonly: true, fileMustExist: true });
  try {
    await source.backup(target, { progress: () => 0x7fffffff });
  } finally {
    source.close();
  }
  const db = openDb(target);
  let migrated: string[];
  try {
    migrated = await migrateToLatest(db);
  } finally {
    await db.close();
  }
  const after = checkDatabaseFile(target);
  if (!after.ok) {
    throw new Error(
      `the restored database failed its check (${after.problems.join('; ')}); the previous one is in ${safetyCopy ?? 'nowhere: there was none'}`,
    );
  }
  return { safetyCopy, migrated, bytes: after.bytes };
}
