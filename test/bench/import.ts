/**
 * Import speed: the full USDA SR28 import (values per second, every file, one transaction)
 * beside a bare better-sqlite3 loop that inserts the same foods, nutrient definitions and
 * 679,045 values with one prepared statement each, in one transaction, into the same schema, in
 * the same run. Goal: the import at >= 50% of the bare rate. Best of 5 alternating runs (on a
 * shared, busy machine the fastest run is the one least disturbed by other work; medians shown too).
 */
import { readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { migrateToLatest, openDb, type Db } from '../../src/db/database.js';
import { SR28_DIR, SR28_MISSING, hasSr28 } from '../helpers/shared.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

const ROUNDS = 5;

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
  title: 'USDA SR28 full import vs a bare prepared-statement insert loop (values/s)',
  async run() {
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
  },
};
