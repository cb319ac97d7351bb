// Files on disk and restores, each attack repeated. Sources: 45 CFR 164.312(a)(1) access
// control and 164.312(c)(1) integrity; HMAC per RFC 2104 (from memory).
import {
  chmodSync,
  existsSync,
  mkdtempSync,
  readFileSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { backupDatabase, restoreDatabase } from '../../src/backup/backup.js';
import { schemaDifferences } from '../../src/backup/schema-check.js';
import {
  backupKeyFileOf,
  ensureBackupKey,
  signBackup,
  signatureFileOf,
} from '../../src/backup/signature.js';
import { fixedClock } from '../../src/clock.js';
import { loadConfig } from '../../src/config.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { acquireDbLock } from '../../src/server/db-lock.js';
import { exposedFileWarnings } from '../../src/server/private-files.js';
import { serve } from '../../src/server/serve.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed time
const modeOf = (file: string) => statSync(file).mode & 0o777;

let dir: string;
let savedUmask: number;
beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'phl-files-'));
  // the usual permissive umask, so only the code's own modes can make the files private
  savedUmask = process.umask(0o022);
});
afterEach(() => {
  process.umask(savedUmask);
  rmSync(dir, { recursive: true, force: true });
});

async function liveDb(name = 'main.sqlite') {
  const file = join(dir, name);
  const db = openDb(file);
  await migrateToLatest(db);
  db.sqlite
    .prepare(
      "INSERT INTO food_source(format, name, release, licence, imported_at) VALUES ('demo', 'Invented demo table', 'r1', 'invented demo data', '2026-03-05')",
    )
    .run();
  return { file, db };
}

/** The attack: the audit log's append-only triggers dropped, and a trigger that makes every
 *  user who signs in an admin. */
function tamper(file: string): void {
  const db = new Database(file);
  try {
    const triggers = db
      .prepare("SELECT name FROM sqlite_master WHERE type = 'trigger' AND tbl_name = 'audit_event'")
      .all() as Array<{ name: string }>;
    expect(triggers.length).toBeGreaterThan(0);
    for (const t of triggers) db.exec(`DROP TRIGGER "${t.name}"`);
    db.exec(`CREATE TRIGGER grant_admin AFTER UPDATE OF last_sign_in_at ON app_user
             BEGIN UPDATE app_user SET role = 'admin' WHERE id = NEW.id; END`);
  } finally {
    db.close();
  }
}

describe('restore refuses what it did not write', () => {
  it('refuses a tampered backup: the signature no longer matches', async () => {
    const { file, db } = await liveDb();
    const backup = join(dir, 'b.sqlite');
    await backupDatabase(db.sqlite, backup, { key: ensureBackupKey(file) });
    await db.close();
    tamper(backup);
    await expect(restoreDatabase(backup, file, clock)).rejects.toThrow(
      /not restored: the signature does not match/,
    );
  });

  it('refuses a tampered backup signed with the right key: the schema is not the migrations’ schema', async () => {
    const { file, db } = await liveDb();
    const backup = join(dir, 'b.sqlite');
    const key = ensureBackupKey(file);
    await backupDatabase(db.sqlite, backup, { key });
    await db.close();
    tamper(backup);
    await signBackup(backup, key); // as if the database itself had been tampered with before the backup
    const differences = await schemaDifferences(backup);
    expect(differences).toContain('missing trigger audit_event_no_update');
    expect(differences.some((d) => d.startsWith('unexpected trigger grant_admin'))).toBe(true);
    await expect(restoreDatabase(backup, file, clock)).rejects.toThrow(
      /not restored: its schema is not the one phosledger's migrations make/,
    );
    // the live database still has its triggers
    const live = new Database(file, { readonly: true });
    const n = live
      .prepare("SELECT count(*) AS n FROM sqlite_master WHERE name = 'grant_admin'")
      .get() as { n: number };
    live.close();
    expect(n.n).toBe(0);
  });

  it('refuses an unsigned backup and one signed by another installation', async () => {
    const { file, db } = await liveDb();
    ensureBackupKey(file);
    const unsigned = join(dir, 'unsigned.sqlite');
    await backupDatabase(db.sqlite, unsigned);
    const other = await liveDb('other.sqlite');
    const foreign = join(dir, 'foreign.sqlite');
    await backupDatabase(other.db.sqlite, foreign, { key: ensureBackupKey(other.file) });
    await db.close();
    await other.db.close();
    await expect(restoreDatabase(unsigned, file, clock)).rejects.toThrow(/no readable signature/);
    await expect(restoreDatabase(foreign, file, clock)).rejects.toThrow(/signature does not match/);
  });

  it('finds no difference on a database the migrations made', async () => {
    const { file, db } = await liveDb();
    await db.close();
    expect(await schemaDifferences(file)).toEqual([]);
  });

  it('refuses to restore while a server holds the database, and restores once it stopped', async () => {
    const file = join(dir, 'served.sqlite');
    const config = loadConfig(
      {},
      { dbFile: file, host: '127.0.0.1', port: 0, seedDemo: false, logLevel: 'silent' },
    );
    const sink = () => new PassThrough().resume();
    const server = await serve(config, clock, { stdout: sink(), stderr: sink() });
    let closed = false;
    try {
      const backup = join(dir, 'b.sqlite');
      await backupDatabase(server.db.sqlite, backup, { key: ensureBackupKey(file) });
      await expect(restoreDatabase(backup, file, clock)).rejects.toThrow(
        /is in use \(server, process \d+/,
      );
      // a second server on the same file is refused the same way
      expect(() => acquireDbLock(file, 'server', clock.now())).toThrow(/in use/);
      await server.close();
      closed = true;
      const r = await restoreDatabase(backup, file, clock);
      expect(r.safetyCopy).not.toBeNull();
      expect(existsSync(`${file}.lock`)).toBe(false);
    } finally {
      if (!closed) await server.close();
    }
  }, 60_000);

  it('takes over a lock left by a process that no longer runs', () => {
    const file = join(dir, 'stale.sqlite');
    const release = acquireDbLock(file, 'server', clock.now());
    // rewrite the lock as if a killed server (a pid that cannot exist) had left it
    const lock = JSON.parse(readFileSync(`${file}.lock`, 'utf8'));
    release();
    writeFileSync(`${file}.lock`, JSON.stringify({ ...lock, pid: 2 ** 22 + 1 }));
    const again = acquireDbLock(file, 'restore', clock.now());
    again();
    expect(existsSync(`${file}.lock`)).toBe(false);
  });
});

describe('private files on disk (0600 files, 0700 folders) under a permissive umask', () => {
  it('creates the database, its WAL and SHM, and a new folder private', async () => {
    const file = join(dir, 'new-folder', 'db.sqlite');
    const db = openDb(file);
    await migrateToLatest(db);
    try {
      expect(modeOf(join(dir, 'new-folder'))).toBe(0o700);
      expect(modeOf(file)).toBe(0o600);
      expect(modeOf(`${file}-wal`)).toBe(0o600);
      expect(modeOf(`${file}-shm`)).toBe(0o600);
    } finally {
      await db.close();
    }
  });

  it('creates backups, their signatures, the backup key and the pre-restore copy private', async () => {
    const { file, db } = await liveDb();
    const backup = join(dir, 'b.sqlite');
    await backupDatabase(db.sqlite, backup, { key: ensureBackupKey(file) });
    await db.close();
    expect(modeOf(backupKeyFileOf(file))).toBe(0o600);
    expect(modeOf(backup)).toBe(0o600);
    expect(modeOf(signatureFileOf(backup))).toBe(0o600);
    const r = await restoreDatabase(backup, file, clock);
    expect(modeOf(r.safetyCopy!)).toBe(0o600);
    expect(modeOf(file)).toBe(0o600);
  });

  it('warns at start about files of the database that others can read', async () => {
    const { file, db } = await liveDb();
    await db.close();
    expect(exposedFileWarnings(file)).toEqual([]);
    chmodSync(file, 0o644); // as older versions created it
    const warnings = exposedFileWarnings(file);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toMatch(/main\.sqlite is readable to other users .*mode 644.*chmod 600/);
    const config = loadConfig(
      {},
      { dbFile: file, host: '127.0.0.1', port: 0, seedDemo: false, logLevel: 'silent' },
    );
    let err = '';
    const stderr = new PassThrough();
    stderr.on('data', (c: Buffer) => (err += c));
    const server = await serve(config, clock, { stdout: new PassThrough().resume(), stderr });
    await server.close();
    expect(err).toMatch(/WARNING: .*main\.sqlite is readable to other users/);
  }, 60_000);
});
