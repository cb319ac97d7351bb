import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { AppError } from '../errors.js';
import { ensurePrivateDir, PRIVATE_FILE_MODE } from './private-files.js';

/** What the lock file beside the database holds. */
interface LockInfo {
  pid: number;
  purpose: string;
  since: string;
}

export function lockFileOf(dbFile: string): string {
  return `${dbFile}.lock`;
}

/** True when a process with this id runs (EPERM: it runs under another user). */
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readLock(file: string): LockInfo | null {
  try {
    const parsed = JSON.parse(readFileSync(file, 'utf8')) as Partial<LockInfo>;
    return typeof parsed.pid === 'number' ? (parsed as LockInfo) : null;
  } catch {
    return null;
  }
}

/**
 * Takes the database's lock file (`<db>.lock`, created exclusively): a running server holds it
 * for its whole life, a restore for its duration, so neither can replace a database the other
 * has open. A lock left by a process that no longer runs is taken over. Returns the release.
 */
export function acquireDbLock(dbFile: string, purpose: string, now: Date): () => void {
  if (dbFile === ':memory:') return () => undefined;
  const file = lockFileOf(dbFile);
  // A database in a folder that does not exist yet (a first start with PHOSLEDGER_DB or --db
  // pointing at a new folder): the folder is made private, as openDb would make it.
  ensurePrivateDir(dirname(file));
  const info: LockInfo = { pid: process.pid, purpose, since: now.toISOString() };
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      writeFileSync(file, JSON.stringify(info), { flag: 'wx', mode: PRIVATE_FILE_MODE });
      return () => {
        if (readLock(file)?.pid === process.pid) rmSync(file, { force: true });
      };
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
    const held = readLock(file);
    if (held && alive(held.pid)) {
      throw new AppError(
        'PHL_DB_IN_USE',
        409,
        `the database ${dbFile} is in use (${held.purpose}, process ${held.pid}, since ${held.since}): stop it first; if no such process runs, remove ${file}`,
      );
    }
    rmSync(file, { force: true }); // left behind by a process that ended without releasing it
  }
  throw new AppError('PHL_DB_IN_USE', 409, `could not take the lock ${file}`);
}
