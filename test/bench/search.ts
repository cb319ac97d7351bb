/**
 * Food search: type-ahead latency (FoodService.search, limit 20, with the hits' foods loaded)
 * over a fixed query set, on the full USDA SR28 and on 1,000,000 generated branded-like foods,
 * beside the bare FTS5 MATCH of the same prefix query (ids only, LIMIT 20) in the same run.
 * Goal: p95 < 5 ms on the 1M set. Also: server start to the first /api/health answer on an
 * existing database (goal < 10 s). Databases live in the temp folder, never in the checkout.
 */
import { existsSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { migrateToLatest, openDb, type Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FoodService } from '../../src/foods/foods.service.js';
import { ftsPrefixQuery, searchWords } from '../../src/foods/text.js';
import { migrations } from '../../migrations/index.js';
import { SR28_DIR, SR28_MISSING, hasSr28 } from '../helpers/shared.js';
import { SOURCE_BIN, timeServerReady } from './startup.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

/** Fixed type-ahead queries: partial words as typed, whole words, two words, a code. */
const QUERIES = [
  'c',
  'ch',
  'che',
  'chee',
  'cheese',
  'cheddar',
  'milk',
  'mil',
  'milk wh',
  'egg',
  'eg',
  'chicken br',
  'rice',
  'ri',
  'bread wh',
  'beef gr',
  'apple',
  'ap',
  'bean',
  'yog',
  'yogurt',
  'pork',
  'fish',
  'salmon',
  'potato',
  'pot',
  'tomato',
  'cereal',
  'crème',
  'jalapeño',
  'soy',
  'tofu',
  'cola',
  'nut',
  'almond',
  'oat',
  'pasta',
  'cheese ched',
  'sausage',
  'ham',
  's',
  'b',
  'cracker',
  'juice or',
  '01009',
  'butter',
];
const ROUNDS = 5;

async function timeQueries(db: Db) {
  const service = new FoodService(new FoodRepository(db.kysely));
  const bare = db.sqlite.prepare('select rowid from food_fts where food_fts match ? limit 20');
  const svc: number[] = [];
  const raw: number[] = [];
  for (const q of QUERIES) await service.search({ q, limit: 20 }); // warm the page cache
  for (let round = 0; round < ROUNDS; round++) {
    for (const q of QUERIES) {
      const t0 = performance.now();
      await service.search({ q, limit: 20 });
      svc.push(performance.now() - t0);
      const words = searchWords(q);
      const t1 = performance.now();
      bare.all(ftsPrefixQuery(words));
      raw.push(performance.now() - t1);
    }
  }
  const line = (label: string, xs: number[]) =>
    `   ${label.padEnd(22)} p50 ${fmt(percentile(xs, 50), 2)} ms   p95 ${fmt(percentile(xs, 95), 2)} ms   max ${fmt(Math.max(...xs), 1)} ms`;
  console.log(line('food search', svc));
  console.log(line('bare FTS5 MATCH', raw));
  return percentile(svc, 95);
}

// Deterministic invented names (mulberry32): brand, qualifier, food word(s), pack size.
function rng(seed: number) {
  let a = seed;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const FOODS =
  'cheese cheddar milk yogurt butter cream bread roll bun cracker cookie biscuit cake muffin rice pasta noodle cereal oat granola bar chicken beef pork ham bacon sausage salami turkey fish salmon tuna shrimp egg bean lentil chickpea tofu soy almond peanut cashew walnut apple banana orange juice grape berry tomato potato chip fries onion pepper jalapeño soup sauce ketchup mayo dressing cola soda tea coffee cocoa chocolate candy gum ice pizza burger taco burrito wrap sandwich dumpling pie waffle pancake syrup honey jam spread hummus salsa pickle olive corn pea carrot spinach'.split(
    ' ',
  );
const QUALIFIERS =
  'classic original organic light lite reduced fat free whole grain wheat white smoked spicy sweet salted unsalted roasted frozen fresh mini large family value premium crème deluxe style homestyle natural zero diet extra'.split(
    ' ',
  );
const BRANDS =
  'Acme Bellwood Cedar Dunmore Elmstead Fairhill Glenrock Harbor Ivystone Juniper Kestrel Larkspur Meadowbrook Northwind Oakvale Pinecrest Quarry Riverton Stillwater Thornbury Upland Valebrook Westfield Yarrow Zephyr'.split(
    ' ',
  );

async function branded1M(): Promise<Db> {
  const key =
    Object.keys(migrations).join(',').length.toString(36) + Object.keys(migrations).length;
  const file = join(tmpdir(), `phosledger-bench-branded-1m-${key}.sqlite`);
  if (existsSync(file)) {
    const db = openDb(file);
    const n = db.sqlite.prepare('select count(*) as n from food').get() as { n: number };
    if (n.n === 1_000_000) return db;
    await db.close();
  }
  for (const f of [file, `${file}-wal`, `${file}-shm`]) rmSync(f, { force: true });
  const db = openDb(file);
  await migrateToLatest(db);
  const s = db.sqlite;
  const t0 = performance.now();
  const r = rng(20261201);
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(r() * xs.length)] as T;
  s.exec('begin');
  s.prepare(
    "insert into food_source (format, name, release, licence, imported_at) values ('bench', 'Generated branded-like foods (invented)', '1m', 'invented benchmark data', '2026-12-01T00:00:00Z')",
  ).run();
  const ins = s.prepare(
    `insert into food (source_id, code, name, alt_names, kind, brand_owner, gtin, phosphorus_mg, protein_g)
     values (1, ?, ?, ?, 'branded', ?, ?, ?, ?)`,
  );
  const fts = s.prepare(
    "insert into food_fts (rowid, name, alt_names, kind) values (?, ?, ?, 'branded')",
  );
  for (let i = 0; i < 1_000_000; i++) {
    const brand = pick(BRANDS);
    const words = [pick(QUALIFIERS), pick(FOODS)];
    if (r() < 0.6) words.push(pick(FOODS));
    if (r() < 0.3) words.unshift(pick(QUALIFIERS));
    const name = `${words.join(' ')} ${Math.floor(r() * 900) + 100} g`;
    const gtin = String(10_000_000_000_000 + i * 7);
    const id = Number(
      ins.run(
        String(i + 1),
        name,
        JSON.stringify([brand]),
        brand,
        gtin,
        Math.round(r() * 600),
        Math.round(r() * 300) / 10,
      ).lastInsertRowid,
    );
    fts.run(id, name, brand);
  }
  s.exec('commit');
  console.log(
    `   generated 1,000,000 branded-like foods in ${fmt((performance.now() - t0) / 1000, 1)} s (${file})`,
  );
  return db;
}

async function serverStart(dbFile: string) {
  const once = () => timeServerReady(SOURCE_BIN, dbFile);
  await once(); // the first start may run first-start steps; measure the next ones
  const times = [await once(), await once()];
  console.log(
    `   server start to /api/health on an existing database: ${fmt(percentile(times, 50) / 1000, 2)} s (median of 2; goal < 10 s)`,
  );
}

export const searchBench: BenchSection = {
  name: 'search',
  title: 'Food search p50/p95 on SR28 and on 1M branded-like foods vs bare FTS5; server start',
  async run() {
    console.log(`   ${QUERIES.length} queries x ${ROUNDS} rounds, limit 20`);
    let srFile: string | null = null;
    if (hasSr28) {
      srFile = join(tmpdir(), `phosledger-bench-search-sr28-${process.pid}.sqlite`);
      const db = openDb(srFile);
      await migrateToLatest(db);
      await usdaSr28.run(db, SR28_DIR);
      console.log('   USDA SR28 (8,789 foods):');
      await timeQueries(db);
      await db.close();
    } else console.log(`   ${SR28_MISSING}`);
    const big = await branded1M();
    console.log('   1,000,000 generated branded-like foods (invented):');
    const p95 = await timeQueries(big);
    console.log(`   goal p95 < 5 ms on 1M: ${p95 < 5 ? 'met' : 'NOT met'}`);
    await big.close();
    if (srFile) {
      await serverStart(srFile);
      for (const f of [srFile, `${srFile}-wal`, `${srFile}-shm`]) rmSync(f, { force: true });
    }
  },
};
