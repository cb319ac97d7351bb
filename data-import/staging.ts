import { closeSync, openSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import Database from 'better-sqlite3';
import type { Db } from '../src/db/database.js';

/**
 * The staging database an import writes into: a private SQLite file beside the database (same
 * disk), created 0600, removed when the import ends. The clinic's database is not touched
 * until the publish step, so the long part of an import (reading, checking, scanning) never
 * holds its write lock.
 */
export interface StagingFile {
  path: string;
  sqlite: Database.Database;
  remove(): void;
}

const PREFIX = '.phosledger-staging-';

/** Where staging files of `db` go: beside a file database, else the temp folder. */
export function stagingDir(db: Db): string {
  return db.file === ':memory:' ? tmpdir() : dirname(db.file);
}

/** True when a process with this id runs (a reservation or staging file of a live import). */
export function pidAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as { code?: string }).code === 'EPERM';
  }
}

/** Removes staging files left by an import whose process died (kill -9, power cut). */
export function removeStaleStaging(dir: string): void {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return;
  }
  for (const name of names) {
    const m = name.startsWith(PREFIX) ? /^(\d+)-/.exec(name.slice(PREFIX.length)) : null;
    if (!m || pidAlive(Number(m[1]))) continue;
    rmSync(join(dir, name), { force: true });
  }
}

const SCHEMA = `
  create table s_food (
    id integer primary key, code text not null unique, name text not null,
    alt_names text not null, food_group text, kind text not null, brand_owner text, gtin text,
    ingredients text, ingredients_lang text, serving_g real, serving_ml real, serving_text text,
    additive_scan text, additive_scan_version text, ndb_number text,
    phosphorus_mg real, protein_g real, energy_kcal real, potassium_mg real, sodium_mg real,
    calcium_mg real, water_g real, phytate_mg real,
    -- filled before publishing: the earlier release's id of the same code (null: a new food)
    main_id integer
  );
  create table s_def (
    id integer primary key, code text not null unique, name text not null, unit text not null,
    tag text, sort_order integer
  );
  create table s_value (
    food_id integer not null, def_id integer not null, value real not null,
    derivation_code text, source_code text, primary key (food_id, def_id)
  ) without rowid;
  create table s_portion (
    food_id integer not null, seq integer not null, amount real not null,
    description text not null, grams real not null
  );
  create table s_local_name (
    food_id integer not null, language text not null, name text not null,
    primary key (food_id, language)
  ) without rowid;
`;

/** Creates a fresh staging file (mode 0600) with the staging tables. */
export function createStaging(dir: string): StagingFile {
  removeStaleStaging(dir);
  const path = join(
    dir,
    `${PREFIX}${process.pid}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}.sqlite`,
  );
  // Created empty with owner-only permissions before SQLite opens it (food tables only, but the
  // folder is the service's private one).
  closeSync(openSync(path, 'wx', 0o600));
  const sqlite = new Database(path);
  // A throw-away file: no journal, no syncs (a crash loses only the staging file).
  sqlite.pragma('journal_mode = OFF');
  sqlite.pragma('synchronous = OFF');
  sqlite.pragma('cache_size = -32768'); // 32 MiB page cache (common practice, no source)
  sqlite.exec(SCHEMA);
  return {
    path,
    sqlite,
    remove() {
      if (sqlite.open) sqlite.close();
      for (const f of [path, `${path}-journal`, `${path}-wal`, `${path}-shm`]) {
        rmSync(f, { force: true });
      }
    },
  };
}
