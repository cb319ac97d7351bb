/**
 * Import speed, part 1: the full USDA SR28 import (values per second, every file, one transaction)
 * beside a bare better-sqlite3 loop that inserts the same foods, nutrient definitions and
 * 679,045 values with one prepared statement each, in one transaction, into the same schema, in
 * the same run. Goal: the import at >= 50% of the bare rate. Best of 5 alternating runs (on a
 * shared, busy machine the fastest run is the one least disturbed by other work; medians shown too).
 */
import { readFileSync, rmSync, statSync } from 'node:fs';
import { Worker } from 'node:worker_threads';
import { fdcCsv } from '../../data-import/fdc-csv.js';
import type { Importer } from '../../data-import/importer.js';
import { offCsv } from '../../data-import/off-csv.js';
import { writeBrandedDownload, writeOffExport } from '../fixtures/import/generate.js';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { migrateToLatest, openDb, type Db } from '../../src/db/database.js';
import { SR28_DIR, SR28_MISSING, hasSr28 } from '../helpers/shared.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

const ROUNDS = 3;

async function freshDb(name: string): Promise<Db> {
  const file = join(tmpdir(), `phosledger-bench-${process.pid}-${name}.sqlite`);
  for (const f of [file, `${file}-wal`, `${file}-shm`]) rmSync(f, { force: true });
  const db = openDb(file);
  await migrateToLatest(db);
  return db;
}
async function dropDb(db: Db) {
  await db.close();
  for (const f of [db.file, `${db.file}-wal`, `${db.file}-shm`]) rmSync(f, { force: true });
}

/** The SR28 rows, parsed once outside the timed part (the bare loop only inserts). */
function loadRows() {
  const lines = (f: string) =>
    readFileSync(join(SR28_DIR, f), 'latin1')
      .split('\r\n')
      .filter(Boolean)
      .map((l) => l.split('^').map((x) => x.replace(/^~|~$/g, '')));
  return {
    foods: lines('FOOD_DES.txt').map((f) => [f[0] as string, f[2] as string] as const),
    defs: lines('NUTR_DEF.txt').map(
      (f) => [f[0] as string, f[3] as string, f[1] as string] as const,
    ),
    values: lines('NUT_DATA.txt').map(
      (f) => [f[0] as string, f[1] as string, Number(f[2]), f[6] || null, f[5] || null] as const,
    ),
  };
}

function bareInsert(db: Db, rows: ReturnType<typeof loadRows>): number {
  const s = db.sqlite;
  const t0 = performance.now();
  s.exec('begin');
  s.prepare(
    "insert into food_source (format, name, release, licence, imported_at) values ('bare', 'bare', 'bare', 'bare', 'now')",
  ).run();
  const insFood = s.prepare(
    "insert into food (source_id, code, name, kind) values (1, ?, ?, 'generic')",
  );
  const foodIds = new Map<string, number>();
  for (const [code, name] of rows.foods)
    foodIds.set(code, Number(insFood.run(code, name).lastInsertRowid));
  const insDef = s.prepare(
    'insert into nutrient_def (source_id, code, name, unit) values (1, ?, ?, ?)',
  );
  const defIds = new Map<string, number>();
  for (const [code, name, unit] of rows.defs)
    defIds.set(code, Number(insDef.run(code, name, unit).lastInsertRowid));
  const insValue = s.prepare(
    'insert into nutrient_value (food_id, nutrient_def_id, value_per_100g, derivation_code, source_code) values (?, ?, ?, ?, ?)',
  );
  for (const [ndb, nutr, value, deriv, src] of rows.values)
    insValue.run(foodIds.get(ndb), defIds.get(nutr), value, deriv, src);
  s.exec('commit');
  return (performance.now() - t0) / 1000;
}

export const importBench: BenchSection = {
  name: 'import',
  title:
    'Imports: SR28 vs a bare insert loop; 300,000-row Open Food Facts and 100,000-food FDC Branded files (invented data, real layouts) with a concurrent writer',
  async run() {
    await sr28VsBare();
    await largeImports();
  },
};

/**
 * A writer like the server's (its own connection, busy_timeout 5000 ms) in a worker thread:
 * one small insert every 20 ms; reports how long each insert took, waits for the lock included.
 */
function startWriter(file: string): {
  stop(): Promise<{ n: number; maxMs: number; p99Ms: number; failed: number }>;
} {
  const code = `
    const { parentPort, workerData } = require('node:worker_threads');
    const Database = require(workerData.bsq);
    const db = new Database(workerData.file);
    db.pragma('busy_timeout = 5000');
    db.exec('create table if not exists bench_write (id integer primary key, at text)');
    const ins = db.prepare('insert into bench_write (at) values (?)');
    const times = []; let failed = 0; let stop = false;
    parentPort.on('message', () => { stop = true; });
    const tick = () => {
      if (stop) { db.close(); parentPort.postMessage({ times, failed }); return; }
      const t0 = performance.now();
      try { ins.run(new Date().toISOString()); } catch { failed++; }
      times.push(performance.now() - t0);
      setTimeout(tick, 20);
    };
    tick();`;
  const bsq = new URL('../../node_modules/better-sqlite3/lib/index.js', import.meta.url).pathname;
  const w = new Worker(code, { eval: true, workerData: { file, bsq } });
  return {
    stop: () =>
      new Promise((resolve) => {
        w.once('message', (m: { times: number[]; failed: number }) => {
          void w.terminate();
          resolve({
            n: m.times.length,
            maxMs: Math.max(...m.times),
            p99Ms: percentile(m.times, 99),
            failed: m.failed,
          });
        });
        w.postMessage('stop');
      }),
  };
}

/** Runs one import on a fresh file database with the concurrent writer, memory sampled. */
async function measured(label: string, importer: Importer, path: string, rowsWord: string) {
  const db = await freshDb(label);
  const writer = startWriter(db.file);
  let peakRss = process.memoryUsage().rss;
  const rss0 = peakRss;
  let last = performance.now();
  let maxLoopGap = 0;
  const timer = setInterval(() => {
    const now = performance.now();
    maxLoopGap = Math.max(maxLoopGap, now - last);
    last = now;
    peakRss = Math.max(peakRss, process.memoryUsage().rss);
  }, 50);
  let readS = 0;
  const t0 = performance.now();
  const r = await importer.run(db, path, {
    release: label,
    onProgress: (p) => {
      if (p.phase === 'publishing' && readS === 0) readS = (performance.now() - t0) / 1000;
    },
  });
  const totalS = (performance.now() - t0) / 1000;
  clearInterval(timer);
  const w = await writer.stop();
  if (!r.ok) throw new Error(`${label} failed: ${JSON.stringify(r.fatal)}`);
  const dbBytes = statSync(db.file).size;
  console.log(
    `   ${label.padEnd(18)} ${fmt(r.imported)} ${rowsWord}, ${fmt(r.values)} values in ${fmt(totalS, 1)} s = ${fmt(r.imported / totalS)} ${rowsWord}/s (reading ${fmt(readS, 1)} s, publish lock ${fmt(r.publishMs / 1000, 2)} s)`,
  );
  console.log(
    `   ${''.padEnd(18)} peak RSS ${fmt(peakRss / 2 ** 20)} MiB (${fmt((peakRss - rss0) / 2 ** 20)} MiB above the start), database ${fmt(dbBytes / 2 ** 20)} MiB, input ${fmt(inputBytes(path) / 2 ** 20)} MiB`,
  );
  console.log(
    `   ${''.padEnd(18)} concurrent writer (own connection): ${fmt(w.n)} writes, longest ${fmt(w.maxMs)} ms, p99 ${fmt(w.p99Ms, 1)} ms, failed ${w.failed}; longest event-loop stall in the importing process ${fmt(maxLoopGap)} ms`,
  );
  await dropDb(db);
}

function inputBytes(path: string): number {
  const s = statSync(path);
  if (!s.isDirectory()) return s.size;
  return ['food.csv', 'branded_food.csv', 'food_nutrient.csv', 'nutrient.csv'].reduce(
    (n, f) => n + statSync(join(path, f)).size,
    0,
  );
}

/** Part 2: generated files of invented data in the real layouts (test/fixtures/import/generate.ts). */
async function largeImports() {
  const dir = join(tmpdir(), `phosledger-bench-${process.pid}-gen`);
  rmSync(dir, { recursive: true, force: true });
  try {
    const off = join(dir, 'off-300k.csv');
    const branded = join(dir, 'branded-100k');
    const { mkdirSync } = await import('node:fs');
    mkdirSync(dir, { recursive: true });
    const t = performance.now();
    writeOffExport(off, 300_000);
    writeBrandedDownload(branded, 100_000);
    console.log(
      `   generated invented files in the real layouts in ${fmt((performance.now() - t) / 1000, 1)} s`,
    );
    await measured('off-csv 300k', offCsv, off, 'products');
    await measured('fdc-csv Branded', fdcCsv, branded, 'foods');
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

async function sr28VsBare() {
  if (!hasSr28) {
    console.log(`   ${SR28_MISSING}`);
    return;
  }
  const rows = loadRows();
  const n = rows.values.length;
  const bare: number[] = [];
  const imp: number[] = [];
  for (let round = 0; round < ROUNDS; round++) {
    const a = await freshDb('bare');
    bare.push(bareInsert(a, rows));
    await dropDb(a);
    const b = await freshDb('import');
    const t0 = performance.now();
    const r = await usdaSr28.run(b, SR28_DIR);
    imp.push((performance.now() - t0) / 1000);
    if (!r.ok || r.values !== n)
      throw new Error(`import failed: ${JSON.stringify(r).slice(0, 300)}`);
    await dropDb(b);
  }
  const bareS = Math.min(...bare);
  const impS = Math.min(...imp);
  const medianRatio = percentile(bare, 50) / percentile(imp, 50);
  const bareRate = n / bareS;
  const impRate = n / impS;
  console.log(
    `   values: ${fmt(n)} (all of NUT_DATA), foods ${fmt(rows.foods.length)}, best of ${ROUNDS}`,
  );
  console.log(`   bare insert loop   ${fmt(bareS, 2)} s   ${fmt(bareRate)} values/s`);
  console.log(
    `   usda-sr28 import   ${fmt(impS, 2)} s   ${fmt(impRate)} values/s (reads, checks and decodes every file, measures, search index, per-100 g columns)`,
  );
  console.log(
    `   ratio import/bare  ${fmt(impRate / bareRate, 2)}  (goal >= 0.50; ratio of medians ${fmt(medianRatio, 2)})`,
  );
}
