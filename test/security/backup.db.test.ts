import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough, Readable } from 'node:stream';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { backupDatabase, checkDatabaseFile, restoreDatabase } from '../../src/backup/backup.js';
import { ensureBackupKey, signBackup } from '../../src/backup/signature.js';
import { runCli } from '../../src/cli/main.js';
import { fixedClock } from '../../src/clock.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed time

async function cli(argv: string[], dbFile: string, stdin = '') {
  const out = new PassThrough();
  const err = new PassThrough();
  let o = '';
  let e = '';
  out.on('data', (c: Buffer) => (o += c));
  err.on('data', (c: Buffer) => (e += c));
  const code = await runCli(argv, {
    stdout: out,
    stderr: err,
    stdin: Readable.from([Buffer.from(stdin)]),
    env: { PHOSLEDGER_DB: dbFile },
  });
  return { code, out: o, err: e };
}

function sourceCount(file: string): number {
  const db = new Database(file, { readonly: true });
  try {
    return (db.prepare('SELECT count(*) AS n FROM food_source').get() as { n: number }).n;
  } finally {
    db.close();
  }
}

function addSource(db: ReturnType<typeof openDb>, release: string) {
  db.sqlite
    .prepare(
      "INSERT INTO food_source(format, name, release, licence, imported_at) VALUES ('demo', 'Invented demo table', ?, 'invented demo data', '2026-03-05')",
    )
    .run(release);
}

describe('db backup / db restore (SQLite online backup API, integrity checked first)', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'phl-backup-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('copies a live database while another connection keeps writing', async () => {
    const file = join(dir, 'live.sqlite');
    const db = openDb(file);
    await migrateToLatest(db);
    addSource(db, 'r1');
    // a second writer, as a running server would be
    const writer = new Database(file);
    let n = 0;
    const timer = setInterval(() => {
      n += 1;
      writer
        .prepare(
          "INSERT INTO food_source(format, name, release, licence, imported_at) VALUES ('demo', 'x', ?, 'invented demo data', 'now')",
        )
        .run(`w${n}`);
    }, 1);
    try {
      const r = await backupDatabase(db.sqlite, join(dir, 'copy.sqlite'));
      expect(r.bytes).toBeGreaterThan(0);
    } finally {
      clearInterval(timer);
      writer.close();
      await db.close();
    }
    const check = checkDatabaseFile(join(dir, 'copy.sqlite'));
    expect(check.ok).toBe(true);
    expect(sourceCount(join(dir, 'copy.sqlite'))).toBeGreaterThanOrEqual(1);
    await expect(backupDatabase(openDb(file).sqlite, join(dir, 'copy.sqlite'))).rejects.toThrow(
      /exists/,
    );
  });

  it('restores a backup, keeping the replaced database aside', async () => {
    const file = join(dir, 'main.sqlite');
    const db = openDb(file);
    await migrateToLatest(db);
    addSource(db, 'r1');
    await backupDatabase(db.sqlite, join(dir, 'b1.sqlite'), { key: ensureBackupKey(file) });
    addSource(db, 'r2'); // after the backup
    await db.close();
    expect(sourceCount(file)).toBe(2);

    const r = await restoreDatabase(join(dir, 'b1.sqlite'), file, clock);
    expect(sourceCount(file)).toBe(1);
    expect(r.safetyCopy).toMatch(/main\.sqlite\.before-restore-2026-03-05T09-30-00-000Z$/);
    expect(sourceCount(r.safetyCopy!)).toBe(2);
  });

  it('refuses a file that is not a database, a corrupt one, or a foreign schema, and changes nothing', async () => {
    const file = join(dir, 'main.sqlite');
    const db = openDb(file);
    await migrateToLatest(db);
    addSource(db, 'r1');
    await backupDatabase(db.sqlite, join(dir, 'good.sqlite'));
    await db.close();

    writeFileSync(join(dir, 'junk.sqlite'), 'not a database at all');
    const foreign = new Database(join(dir, 'foreign.sqlite'));
    foreign.exec('CREATE TABLE t(x)');
    foreign.close();
    // Corrupt one page in the middle of a good copy (the header stays valid).
    const bytes = readFileSync(join(dir, 'good.sqlite'));
    for (let i = 4096 * 3; i < 4096 * 3 + 2000; i++) bytes[i] = 0x5a;
    writeFileSync(join(dir, 'corrupt.sqlite'), bytes);

    // signed with the installation's own key, so the checks after the signature are what refuse them
    const key = ensureBackupKey(file);
    for (const bad of ['junk.sqlite', 'foreign.sqlite', 'corrupt.sqlite']) {
      await signBackup(join(dir, bad), key);
    }
    for (const bad of ['junk.sqlite', 'foreign.sqlite', 'corrupt.sqlite', 'missing.sqlite']) {
      const check = checkDatabaseFile(join(dir, bad));
      expect(check.ok, bad).toBe(false);
      await expect(restoreDatabase(join(dir, bad), file, clock)).rejects.toThrow(/not restored/);
      expect(sourceCount(file)).toBe(1);
    }
  });

  it('refuses a backup made by a newer program (unknown migration)', async () => {
    const file = join(dir, 'new.sqlite');
    const db = openDb(file);
    await migrateToLatest(db);
    db.sqlite
      .prepare("INSERT INTO kysely_migration(name, timestamp) VALUES ('209912312359_future', 'x')")
      .run();
    await db.close();
    const check = checkDatabaseFile(file);
    expect(check.ok).toBe(false);
    expect(!check.ok && check.problems[0]).toMatch(/newer phosledger/);
  });

  it('works from the command line: users add reads stdin, db backup, db restore', async () => {
    const file = join(dir, 'cli.sqlite');
    const add = await cli(
      ['users', 'add', 'Dana', '--role', 'dietitian'],
      file,
      'a long enough secret\n',
    );
    expect(add).toMatchObject({ code: 0, out: 'created dietitian dana (id 1)\n' });
    const weak = await cli(['users', 'add', 'sam', '--role', 'dietitian'], file, 'short\n');
    expect(weak.code).toBe(1);
    expect(weak.err).toMatch(/at least 12 characters/);
    const badRole = await cli(
      ['users', 'add', 'sam', '--role', 'nurse'],
      file,
      'a long enough secret\n',
    );
    expect(badRole.code).toBe(2);

    const b = await cli(['db', 'backup', join(dir, 'cli-backup.sqlite')], file);
    expect(b.code).toBe(0);
    expect(b.out).toMatch(/integrity ok/);
    await cli(['users', 'add', 'sam', '--role', 'admin'], file, 'another long secret\n');
    const r = await cli(['db', 'restore', join(dir, 'cli-backup.sqlite')], file);
    expect(r.code).toBe(0);
    const list = await cli(['users', 'list', '--json'], file);
    expect(JSON.parse(list.out).map((u: { username: string }) => u.username)).toEqual(['dana']);
    // command-line account changes, backups and restores are audited under the OS account
    const db = new Database(file, { readonly: true });
    const actions = db
      .prepare('SELECT action, username FROM audit_event ORDER BY id')
      .all() as Array<{
      action: string;
      username: string;
    }>;
    db.close();
    // the backup holds the log as it was when copied: dana's creation; the restore adds its own
    // event (the db.backup event and sam's creation stay in the kept copy of the replaced file)
    expect(actions.map((a) => a.action)).toEqual(['user.create', 'db.restore']);
    expect(actions.every((a) => a.username.startsWith('cli:'))).toBe(true);
  });
});
