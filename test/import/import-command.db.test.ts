import { spawn } from 'node:child_process';
import { existsSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { importDefaultFoodTable } from '../../data-import/first-start.js';
import { productsCsv } from '../../data-import/products-csv.js';
import { removeDeadReservations } from '../../data-import/writer.js';
import { runCli } from '../../src/cli/main.js';
import { fixedClock } from '../../src/clock.js';
import { openDb, openMemoryDb } from '../../src/db/database.js';
import { loadConfig } from '../../src/config.js';
import { FIXTURES, copyFixture, tempDir } from './helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time
const BIN = fileURLToPath(new URL('../../src/cli/dev-bin.js', import.meta.url));

async function cli(args: string[], dbFile: string) {
  const stdout = new PassThrough();
  const stderr = new PassThrough();
  let out = '';
  let err = '';
  stdout.on('data', (d: Buffer) => (out += d.toString()));
  stderr.on('data', (d: Buffer) => (err += d.toString()));
  const code = await runCli(args, {
    stdout,
    stderr,
    stdin: new PassThrough(),
    env: { PHOSLEDGER_DB: dbFile },
  });
  return { code, out, err };
}

describe('phosledger import <format> <path>', () => {
  it('imports and prints one count line; problems go to stderr with file and line', async () => {
    const t = tempDir();
    try {
      const db = join(t.dir, 'cli.sqlite');
      const ok = await cli(['import', 'usda-sr28', copyFixture('sr28-mini', t.dir)], db);
      expect(ok.code).toBe(0);
      // Invented mini release: 2 foods, 11 values, 3 measures.
      expect(ok.out).toBe(
        'imported usda-sr28 SR28: 2 foods, 11 values, 3 portions; 0 rows skipped\n',
      );
      const bad = join(t.dir, 'clinic.csv');
      writeFileSync(bad, 'name,phosphorus_mg_100g,protein_g_100g\nGood,10,1\nBad,-1,1\n');
      const r = await cli(['import', 'products-csv', bad], db);
      expect(r.code).toBe(0);
      expect(r.out).toBe(
        'imported products-csv clinic: 1 foods, 2 values, 0 portions; 1 rows skipped\n',
      );
      expect(r.err).toContain('clinic.csv:3  PHL_IMPORT_ROW_NEGATIVE');
      // Not a terminal: progress lines on stderr (the first report and each phase).
      expect(r.err).toMatch(/^import products-csv: 0% of \d+ KiB read .*reading clinic\.csv$/m);
      expect(r.err).toMatch(/^import products-csv: 100% .*publishing into the database/m);
      const json = await cli(['import', 'products-csv', bad, '--json', '--release', 'v2'], db);
      const lines = json.err
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l));
      expect(lines.at(-1)).toMatchObject({
        progress: { format: 'products-csv', phase: 'publishing', fraction: 1, rows: 1 },
      });
      expect(JSON.parse(json.out)).toMatchObject({
        ok: true,
        release: 'v2',
        imported: 1,
        skipped: 1,
      });
    } finally {
      t.cleanup();
    }
  });

  it('answers usage errors with exit code 2 and a failed import with 1 and the reason', async () => {
    const t = tempDir();
    try {
      const db = join(t.dir, 'cli.sqlite');
      const unknown = await cli(['import', 'nope', 'x'], db);
      expect(unknown.code).toBe(2);
      expect(unknown.err).toMatch(
        /unknown format 'nope'; the formats are:[\s\S]*usda-sr28[\s\S]*products-csv/,
      );
      const noPath = await cli(['import', 'usda-sr28'], db);
      expect(noPath.code).toBe(2);
      expect(noPath.err).toMatch(/usda-sr28 needs a path/);
      expect((await cli(['import'], db)).code).toBe(2);
      const missing = await cli(['import', 'off-csv', join(t.dir, 'nope.csv')], db);
      expect(missing.code).toBe(1);
      expect(missing.err).toMatch(
        /import stopped at .*nope\.csv: .* does not exist \[PHL_IMPORT_PATH_NOT_FOUND\]\nthe database was not changed/,
      );
    } finally {
      t.cleanup();
    }
  });
});

describe('first start: the embedded default table (IFCT 2017) is imported into an empty database', () => {
  it('imports once, then leaves the database alone', async () => {
    const db = await openMemoryDb();
    const out = new PassThrough();
    let text = '';
    out.on('data', (d: Buffer) => (text += d.toString()));
    const ctx = { db, config: loadConfig({}), clock, io: { stdout: out, stderr: out } };
    await importDefaultFoodTable(ctx);
    expect(text).toMatch(/first start: importing Indian Food Composition Tables 2017/);
    expect(text).toMatch(/first start: imported 542 foods/);
    const n = () => db.sqlite.prepare('select count(*) as n from food').get();
    expect(n()).toEqual({ n: 542 });
    text = '';
    await importDefaultFoodTable(ctx);
    expect(text).toBe('');
    expect(n()).toEqual({ n: 542 });
    await db.close();
  });
});

describe('an import killed halfway leaves the earlier data intact', () => {
  it('SIGKILL during a long import: the database holds exactly what it held before', async () => {
    const t = tempDir();
    try {
      const file = join(t.dir, 'kill.sqlite');
      const seeded = openDb(file);
      const { migrateToLatest } = await import('../../src/db/database.js');
      await migrateToLatest(seeded);
      expect(
        (await productsCsv.run(seeded, join(FIXTURES, 'products-mini.csv'), { clock })).ok,
      ).toBe(true);
      const counts = (d: typeof seeded) =>
        ['food', 'nutrient_value', 'portion', 'nutrient_def', 'food_fts'].map(
          (t) => (d.sqlite.prepare(`select count(*) as n from ${t}`).get() as { n: number }).n,
        );
      const before = counts(seeded);
      await seeded.close();
      // A clinic file of 200,000 invented products: long enough to be killed mid-way.
      const big = join(t.dir, 'big.csv');
      const rows = ['name,phosphorus_mg_100g,protein_g_100g,code'];
      for (let i = 0; i < 200_000; i++)
        rows.push(`Invented product ${i},${i % 900},${(i % 40) + 1},K${i}`);
      writeFileSync(big, rows.join('\n') + '\n');
      const child = spawn(process.execPath, [BIN, 'import', 'products-csv', big], {
        env: { ...process.env, PHOSLEDGER_DB: file },
        stdio: 'ignore',
      });
      // Kill once the import has written into the write-ahead log (its transaction is open).
      const wal = `${file}-wal`;
      const started = Date.now();
      while (Date.now() - started < 60_000) {
        if (existsSync(wal) && statSync(wal).size > 200_000) break;
        if (child.exitCode !== null) break;
        await new Promise((r) => setTimeout(r, 20));
      }
      expect(child.exitCode).toBeNull(); // still importing when killed
      child.kill('SIGKILL');
      await new Promise((r) => child.once('exit', r));
      const after = openDb(file);
      expect(
        after.sqlite.prepare('select format, release, food_count from food_source').all(),
      ).toEqual([{ format: 'products-csv', release: 'products-mini', food_count: 3 }]);
      expect(after.sqlite.prepare('select count(*) as n from food').get()).toEqual({ n: 3 });
      // Killed while publishing in steps: rows written under the ids it had reserved are not
      // seen by any query (search joins food, and no food row has those ids) ...
      expect(
        after.sqlite
          .prepare('select count(*) as n from food_fts join food on food.id = food_fts.rowid')
          .get(),
      ).toEqual({ n: 3 });
      expect(after.sqlite.pragma('integrity_check', { simple: true })).toBe('ok');
      // ... and the next import's first step removes them: the tables are as before.
      removeDeadReservations(after);
      expect(counts(after)).toEqual(before);
      expect(after.sqlite.prepare('select count(*) as n from import_reservation').get()).toEqual({
        n: 0,
      });
      expect(after.sqlite.pragma('foreign_key_check')).toEqual([]);
      await after.close();
    } finally {
      t.cleanup();
    }
  }, 120_000);
});
