import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findImporter } from '../../data-import/registry.js';
import { removeDeadReservations } from '../../data-import/writer.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { hasSr28, SR28_DIR, SR28_MISSING } from '../helpers/shared.js';

/**
 * Faults (45 CFR 164.312(c)(1) integrity): an import killed with SIGKILL at any point leaves a
 * database that passes `PRAGMA integrity_check`, shows the earlier release exactly as it was and
 * no part of the killed one; rows the killed import had written under its reserved food ids
 * (reached by no query) are gone after the next import's first step. Uses the complete USDA SR28 release beside the checkout.
 */
const BIN = fileURLToPath(new URL('../../src/cli/dev-bin.js', import.meta.url));
const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const t = (name: string) =>
  hasSr28 ? `${name} (USDA SR28, full release)` : `${name} (${SR28_MISSING})`;

interface Snapshot {
  releases: string[];
  foods: number;
  values: number;
  portions: number;
  fts: number;
  phosphorusSumMg: number;
  integrity: string;
  foreignKeyProblems: number;
}

function snapshot(file: string): Snapshot {
  const db = new Database(file); // opening replays or discards what the WAL holds
  try {
    const one = <T>(q: string) => Object.values(db.prepare(q).get() as object)[0] as T;
    return {
      releases: (
        db.prepare('SELECT format, release FROM food_source ORDER BY id').all() as Array<{
          format: string;
          release: string;
        }>
      ).map((r) => `${r.format}:${r.release}`),
      foods: one<number>('SELECT count(*) FROM food'),
      values: one<number>('SELECT count(*) FROM nutrient_value'),
      portions: one<number>('SELECT count(*) FROM portion'),
      fts: one<number>('SELECT count(*) FROM food_fts'),
      phosphorusSumMg:
        Math.round(one<number>('SELECT total(phosphorus_mg) FROM food') * 1000) / 1000,
      integrity: (db.pragma('integrity_check') as Array<{ integrity_check: string }>)
        .map((r) => r.integrity_check)
        .join('; '),
      foreignKeyProblems: (db.pragma('foreign_key_check') as unknown[]).length,
    };
  } finally {
    db.close();
  }
}

/** Search rows that reach a food (as every search query joins them). */
function visibleFts(file: string): number {
  const db = new Database(file, { readonly: true });
  try {
    return (
      db
        .prepare('SELECT count(*) AS n FROM food_fts JOIN food ON food.id = food_fts.rowid')
        .get() as {
        n: number;
      }
    ).n;
  } finally {
    db.close();
  }
}

function walBytes(file: string): number {
  try {
    return statSync(`${file}-wal`).size;
  } catch {
    return 0;
  }
}

function spawnCli(args: string[], dbFile: string): ChildProcess & { output: () => string } {
  const child = spawn(process.execPath, [BIN, ...args], {
    cwd: ROOT,
    env: {
      ...process.env,
      PHOSLEDGER_DB: dbFile,
      PHOSLEDGER_NO_DEMO: '1',
      PHOSLEDGER_LOG_LEVEL: 'silent',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout!.on('data', (c: Buffer) => (out += c.toString()));
  child.stderr!.on('data', (c: Buffer) => (out += c.toString()));
  return Object.assign(child, { output: () => out });
}

const exited = (child: ChildProcess) =>
  new Promise<{ code: number | null; signal: string | null }>((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) {
      resolve({ code: child.exitCode, signal: child.signalCode });
      return;
    }
    child.once('exit', (code, signal) => resolve({ code, signal }));
  });

/** Polls until `ready()` or the child exits or the time runs out; says which happened. */
async function waitFor(child: ChildProcess, ready: () => boolean, timeoutMs: number) {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    if (child.exitCode !== null || child.signalCode !== null) return 'exited';
    if (ready()) return 'ready';
    await new Promise((r) => setTimeout(r, 10)); // polling a child process, not a sleep in logic
  }
  return 'timeout';
}

const MiB = 1024 * 1024;

describe.skipIf(!hasSr28)('imports killed with SIGKILL', () => {
  let dir: string;
  let file: string;
  let baseline: Snapshot;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'phl-kill-'));
    file = join(dir, 'db.sqlite');
    const db = openDb(file);
    await migrateToLatest(db);
    const result = await findImporter('usda-sr28')!.run(db, SR28_DIR, { release: 'r1' });
    expect(result.ok).toBe(true);
    await db.close();
    baseline = snapshot(file);
  }, 240_000);
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it(t('the earlier release is complete before the faults'), () => {
    // USDA SR28 documentation (sr28_doc.pdf, record counts per file): FOOD_DES 8,789,
    // NUT_DATA 679,045, WEIGHT 15,438
    expect(baseline).toMatchObject({
      releases: ['usda-sr28:r1'],
      foods: 8789,
      values: 679045,
      portions: 15438,
      integrity: 'ok',
      foreignKeyProblems: 0,
    });
  });

  // An import reads into a staging file (the database untouched), then publishes in steps: the
  // new foods' values under reserved ids (invisible), then one transaction with the food rows.
  const points: Array<{ name: string; release: string; walAtLeast: number }> = [
    { name: 'while reading into staging (WAL empty)', release: 'r2', walAtLeast: 0 },
    { name: 'early in publishing (WAL >= 256 KiB)', release: 'r2', walAtLeast: 256 * 1024 },
    { name: 'while publishing the values (WAL >= 4 MiB)', release: 'r2', walAtLeast: 4 * MiB },
    { name: 're-importing the same release r1 (WAL >= 8 MiB)', release: 'r1', walAtLeast: 8 * MiB },
  ];

  for (const point of points) {
    it(
      t(`leaves the database intact when killed ${point.name}`),
      async () => {
        const child = spawnCli(['import', 'usda-sr28', SR28_DIR, '--release', point.release], file);
        const started = Date.now();
        const state = await waitFor(
          child,
          () =>
            point.walAtLeast === 0
              ? Date.now() - started > 400
              : walBytes(file) >= point.walAtLeast,
          120_000,
        );
        expect(state, child.output()).toBe('ready');
        child.kill('SIGKILL');
        expect((await exited(child)).signal).toBe('SIGKILL');
        // What every query sees is the earlier release exactly: rows written under reserved
        // ids have no food row, so search (joined to food) and every lookup miss them ...
        const seen = snapshot(file);
        expect({ ...seen, values: 0, portions: 0, fts: 0, foreignKeyProblems: 0 }).toEqual({
          ...baseline,
          values: 0,
          portions: 0,
          fts: 0,
          foreignKeyProblems: 0,
        });
        expect(visibleFts(file)).toBe(baseline.fts);
        // ... and the next import's first step removes them: then nothing of it is left.
        const db = openDb(file);
        removeDeadReservations(db);
        await db.close();
        expect(snapshot(file)).toEqual(baseline);
      },
      180_000,
    );
  }

  it(
    t('then imports a second release completely, beside the first'),
    async () => {
      const child = spawnCli(['import', 'usda-sr28', SR28_DIR, '--release', 'r2'], file);
      let maxWal = 0;
      await waitFor(child, () => ((maxWal = Math.max(maxWal, walBytes(file))), false), 180_000);
      const { code } = await exited(child);
      expect(code, child.output()).toBe(0);
      // the kill points above must lie inside a real import: its WAL grew past the last one
      expect(maxWal).toBeGreaterThan(4 * MiB);
      const after = snapshot(file);
      expect(after.releases).toEqual(['usda-sr28:r1', 'usda-sr28:r2']);
      expect(after.foods).toBe(2 * 8789);
      expect(after.values).toBe(2 * 679045);
      expect(after.integrity).toBe('ok');
    },
    240_000,
  );

  it(
    t('lets plans be written while an import runs (the import does not lock them out)'),
    async () => {
      const child = spawnCli(['import', 'usda-sr28', SR28_DIR, '--release', 'r3'], file);
      try {
        expect(await waitFor(child, () => walBytes(file) >= 2 * MiB, 120_000)).toBe('ready');
        const { createTestContext } = await import('../helpers/context.js');
        const db = openDb(file);
        const ctx = await createTestContext({ db });
        const food = db.sqlite.prepare("SELECT id FROM food WHERE code = '01123'").get() as {
          id: number;
        };
        const saved: number[] = [];
        const statuses: number[] = [];
        for (let i = 0; i < 3; i++) {
          const p = await ctx.inject({
            method: 'POST',
            url: '/api/patients',
            payload: {
              label: `DURING-IMPORT-${i} (invented)`,
              language: 'en',
              weightKg: 70,
              ckdStage: '4',
              dialysis: 'none',
              diabetes: false,
              labs: [],
            },
          });
          statuses.push(p.statusCode);
          if (p.statusCode !== 201) continue;
          const plan = await ctx.inject({
            method: 'POST',
            url: `/api/patients/${p.json().id}/plans`,
            payload: {
              name: 'During import',
              days: [
                {
                  label: 'Monday',
                  occasions: [{ name: 'Breakfast', items: [{ foodId: food.id, grams: 100 }] }],
                },
              ],
            },
          });
          statuses.push(plan.statusCode);
          if (plan.statusCode === 201) saved.push(p.json().id as number);
        }
        await ctx.close();
        // every save either landed or was refused with a clear 503 (nothing half-written)
        expect(
          statuses.every((s) => s === 201 || s === 503),
          JSON.stringify(statuses),
        ).toBe(true);
        const { code } = await exited(child);
        expect(code, child.output()).toBe(0);
        const check = new Database(file, { readonly: true });
        const n = (
          check
            .prepare("SELECT count(*) AS n FROM patient WHERE label LIKE 'DURING-IMPORT-%'")
            .get() as { n: number }
        ).n;
        check.close();
        expect(n).toBeGreaterThanOrEqual(saved.length);
        expect(saved.length).toBe(3);
      } finally {
        if (child.exitCode === null) child.kill('SIGKILL');
      }
    },
    240_000,
  );

  it(
    t('restarts the server cleanly after it was killed'),
    async () => {
      for (let round = 0; round < 2; round++) {
        const server = spawnCli(['serve', '--port', '0', '--no-demo'], file);
        try {
          const state = await waitFor(
            server,
            () => /listening on http:\/\/127\.0\.0\.1:\d+/.test(server.output()),
            120_000,
          );
          expect(state, server.output()).toBe('ready');
          const address = /listening on (http:\/\/127\.0\.0\.1:\d+)/.exec(server.output())![1]!;
          const health = await fetch(`${address}/api/health`);
          expect(health.status).toBe(200);
          expect((await fetch(`${address}/api/patients`)).status).toBe(401);
        } finally {
          server.kill('SIGKILL');
          await exited(server);
        }
        expect(snapshot(file).integrity).toBe('ok');
      }
      expect(existsSync(file)).toBe(true);
    },
    300_000,
  );
});
