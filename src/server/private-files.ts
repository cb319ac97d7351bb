import {
  chmodSync,
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readdirSync,
  statSync,
} from 'node:fs';
import { basename, dirname, join } from 'node:path';

/**
 * The database, its WAL and SHM, backups, the copy kept before a restore and the backup key
 * hold health information or protect it: readable by the service's own user only (45 CFR
 * 164.312(a)(1) access control). SQLite gives the WAL and SHM the database file's own mode.
 */
export const PRIVATE_FILE_MODE = 0o600;
export const PRIVATE_DIR_MODE = 0o700;
/** New files and folders made by this process get no group or other permission bits. */
export const PRIVATE_UMASK = 0o077;

/** Sets the process umask so that whatever the process creates is private (serve, CLI). */
export function usePrivateUmask(): void {
  process.umask(PRIVATE_UMASK);
}

/** Creates the folder (and parents) 0700 if missing; an existing folder is left as it is. */
export function ensurePrivateDir(dir: string): void {
  if (!existsSync(dir)) mkdirSync(dir, { recursive: true, mode: PRIVATE_DIR_MODE });
}

/** Creates an empty file 0600 if missing (SQLite then opens it as a new database). */
export function ensurePrivateFile(file: string): void {
  ensurePrivateDir(dirname(file));
  if (existsSync(file)) return;
  try {
    closeSync(openSync(file, 'wx', PRIVATE_FILE_MODE));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
  }
  chmodSync(file, PRIVATE_FILE_MODE);
}

/** Files of this database: itself, -wal, -shm, copies, signatures, key and lock beside it. */
function databaseFiles(dbFile: string): string[] {
  const dir = dirname(dbFile);
  const base = basename(dbFile);
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((name) => name.startsWith(base))
    .map((name) => join(dir, name));
}

/**
 * Warnings for this database's files that other users of the machine can read or write, with
 * the command that fixes each. Empty when all are private. (A folder made by phosledger is
 * 0700; an existing one, such as the checkout's `db/`, only lets others see file names.)
 */
export function exposedFileWarnings(dbFile: string): string[] {
  const warnings: string[] = [];
  for (const path of databaseFiles(dbFile)) {
    let mode: number;
    try {
      const st = statSync(path);
      if (!st.isFile()) continue;
      mode = st.mode & 0o777;
    } catch {
      continue;
    }
    if ((mode & 0o077) === 0) continue;
    warnings.push(
      `WARNING: ${path} is readable to other users of this machine (mode ${mode.toString(8).padStart(3, '0')}); it holds health information: chmod 600 '${path}'`,
    );
  }
  return warnings;
}
