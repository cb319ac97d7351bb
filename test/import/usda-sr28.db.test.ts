import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { SR28_DIR, SR28_MISSING, hasSr28 } from '../helpers/shared.js';
import { copyFixture, fixtureFiles, makeZip, snapshot, tempDir } from './helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

describe('usda-sr28: the complete USDA SR28 release (../shared/reference/usda-sr28)', () => {
  let db: Db;
  let first: Awaited<ReturnType<typeof usdaSr28.run>>;
  beforeAll(async () => {
    db = await openMemoryDb();
    if (hasSr28) first = await usdaSr28.run(db, SR28_DIR, { clock });
  }, 120_000);
  afterAll(async () => db.close());

  it.skipIf(!hasSr28)(
    `imports every food, value and measure ${hasSr28 ? '' : SR28_MISSING}`,
    async () => {
      // USDA SR28 documentation (sr28_doc.pdf, table 1): 8,789 foods, 679,045 values, 15,438 weights.
      expect(first.ok).toBe(true);
      if (!first.ok) return;
      expect(first).toMatchObject({ imported: 8789, values: 679045, portions: 15438, skipped: 0 });
      expect(first.errors).toEqual([]);
      const src = db.sqlite.prepare('select * from food_source').get() as Record<string, unknown>;
      expect(src).toMatchObject({
        format: 'usda-sr28',
        release: 'SR28',
        food_count: 8789,
        nutrient_value_count: 679045,
        portion_count: 15438,
        skipped_count: 0,
        imported_at: '2026-03-05T09:30:00.000Z',
      });
      expect(db.sqlite.prepare('select count(*) as n from food_fts').get()).toEqual({ n: 8789 });
    },
  );

  it.skipIf(!hasSr28)(
    `USDA SR28 NDB 01009 Cheese, cheddar ${hasSr28 ? '' : SR28_MISSING}`,
    async () => {
      const repo = new FoodRepository(db.kysely);
      const [id] = await repo.findIdsByCode('01009');
      const food = await repo.getFood(id as number);
      // USDA SR28 NDB 01009: P 455 mg, protein 22.87 g, 404 kcal, K 76 mg, Na 653 mg, Ca 710 mg,
      // water 37.02 g per 100 g (NUT_DATA 305, 203, 208, 306, 307, 301, 255); no phytate in SR28.
      expect(food).toMatchObject({
        name: 'Cheese, cheddar',
        group: 'Dairy and Egg Products',
        kind: 'generic',
        per100g: {
          phosphorusMg: 455,
          proteinG: 22.87,
          energyKcal: 404,
          potassiumMg: 76,
          sodiumMg: 653,
          calciumMg: 710,
          waterG: 37.02,
          phytateMg: null,
        },
      });
      // USDA SR28 WEIGHT 01009: 1 cup diced 132 g, 1 cup melted 244 g, 1 cup shredded 113 g,
      // 1 oz 28.35 g, 1 cubic inch 17 g, 1 slice (1 oz) 28 g.
      expect(food?.portions.map((p) => [p.amount, p.description, p.grams])).toEqual([
        [1, 'cup, diced', 132],
        [1, 'cup, melted', 244],
        [1, 'cup, shredded', 113],
        [1, 'oz', 28.35],
        [1, 'cubic inch', 17],
        [1, 'slice (1 oz)', 28],
      ]);
      const p = (await repo.getAllNutrients(id as number)).find((n) => n.code === '305');
      // USDA SR28 NUT_DATA 01009/305: Src_Cd 1 (analytical), Deriv_Cd A.
      expect(p).toMatchObject({
        unit: 'mg',
        tag: 'P',
        value_per_100g: 455,
        derivation_code: 'A',
        source_code: '1',
      });
    },
  );

  it.skipIf(!hasSr28)(
    `reads Latin-1 text: NUTR_DEF units in µg ${hasSr28 ? '' : SR28_MISSING}`,
    () => {
      // USDA SR28 NUTR_DEF 418 Vitamin B-12 is in µg (byte 0xB5 in the Latin-1 file).
      const row = db.sqlite.prepare("select unit, name from nutrient_def where code = '418'").get();
      expect(row).toEqual({ unit: 'µg', name: 'Vitamin B-12' });
      const n = db.sqlite
        .prepare("select count(*) as n from nutrient_def where unit = 'µg'")
        .get() as { n: number };
      // USDA SR28 NUTR_DEF.txt: the micro sign appears in 28 unit fields (count of ~µg~ in the file).
      const expected =
        readFileSync(join(SR28_DIR, 'NUTR_DEF.txt'), 'latin1').split('~\u00b5g~').length - 1;
      expect(n.n).toBe(expected);
      expect(expected).toBeGreaterThan(0);
    },
  );

  it.skipIf(!hasSr28)(
    `re-importing the release replaces it, keeping food ids ${hasSr28 ? '' : SR28_MISSING}`,
    async () => {
      const before = db.sqlite.prepare("select id from food where code = '01009'").get();
      const again = await usdaSr28.run(db, SR28_DIR, { clock });
      expect(again).toMatchObject({ ok: true, imported: 8789, values: 679045, portions: 15438 });
      expect(db.sqlite.prepare("select id from food where code = '01009'").get()).toEqual(before);
      expect(db.sqlite.prepare('select count(*) as n from food_source').get()).toEqual({ n: 1 });
      expect(db.sqlite.prepare('select count(*) as n from food').get()).toEqual({ n: 8789 });
      expect(db.sqlite.prepare('select count(*) as n from food_fts').get()).toEqual({ n: 8789 });
    },
    120_000,
  );
});

describe('usda-sr28 on the invented mini release (SR28 layout: caret, tilde, CRLF, Latin-1)', () => {
  it('imports foods, values, measures and Latin-1 text', async () => {
    const db = await openMemoryDb();
    const t = tempDir();
    try {
      const r = await usdaSr28.run(db, copyFixture('sr28-mini', t.dir), { clock });
      expect(r).toMatchObject({ ok: true, imported: 2, values: 11, portions: 3, skipped: 0 });
      const rows = db.sqlite
        .prepare('select code, name, phosphorus_mg, protein_g, alt_names from food order by code')
        .all();
      // Invented demo data (fixture README): 90001 P 500 mg, protein 25.5 g; 90002 P 120 mg, 6 g.
      expect(rows).toEqual([
        {
          code: '90001',
          name: 'Cheese, demo hard, invented',
          phosphorus_mg: 500,
          protein_g: 25.5,
          alt_names: '["demo cheese"]',
        },
        {
          code: '90002',
          name: 'Crème de riz, demo, invented',
          phosphorus_mg: 120,
          protein_g: 6,
          alt_names: '[]',
        },
      ]);
    } finally {
      t.cleanup();
      await db.close();
    }
  });

  it('imports the same release from a zip', async () => {
    const db = await openMemoryDb();
    const t = tempDir();
    try {
      const zip = join(t.dir, 'sr28asc.zip');
      writeFileSync(zip, makeZip(fixtureFiles('sr28-mini')));
      const r = await usdaSr28.run(db, zip, { clock });
      expect(r).toMatchObject({ ok: true, imported: 2, values: 11, portions: 3 });
    } finally {
      t.cleanup();
      await db.close();
    }
  });

  type Case = [string, (f: string, b: Buffer) => Buffer | null, string, RegExp];
  const latin1 = (b: Buffer) => b.toString('latin1');
  const cases: Case[] = [
    [
      'a truncated NUT_DATA (cut inside the last row)',
      (f, b) => (f === 'NUT_DATA.txt' ? b.subarray(0, b.length - 30) : b),
      'PHL_IMPORT_TRUNCATED',
      /NUT_DATA\.txt line 11: .*truncated/,
    ],
    [
      'a comma-separated FOOD_DES',
      (f, b) => (f === 'FOOD_DES.txt' ? Buffer.from(latin1(b).replaceAll('^', ','), 'latin1') : b),
      'PHL_IMPORT_DELIMITER',
      /FOOD_DES\.txt line 1: .*','/,
    ],
    [
      'a missing WEIGHT.txt',
      (f, b) => (f === 'WEIGHT.txt' ? null : b),
      'PHL_IMPORT_FILE_MISSING',
      /has no WEIGHT\.txt/,
    ],
    [
      'NUTR_DEF saved as UTF-8',
      (f, b) => (f === 'NUTR_DEF.txt' ? Buffer.from(latin1(b), 'utf8') : b),
      'PHL_IMPORT_ENCODING',
      /UTF-8 encoded, but this release is Latin-1/,
    ],
    [
      'FOOD_DES saved as UTF-16',
      (f, b) =>
        f === 'FOOD_DES.txt'
          ? Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(latin1(b), 'utf16le')])
          : b,
      'PHL_IMPORT_ENCODING',
      /UTF-16/,
    ],
    [
      'an empty FOOD_DES',
      (f, b) => (f === 'FOOD_DES.txt' ? Buffer.alloc(0) : b),
      'PHL_IMPORT_NO_ROWS',
      /has no foods/,
    ],
  ];
  for (const [what, edit, code, message] of cases) {
    it(`stops on ${what} and leaves the database as it was`, async () => {
      const db = await openMemoryDb();
      const t = tempDir();
      try {
        expect(
          (await usdaSr28.run(db, copyFixture('sr28-mini', t.dir), { clock, release: 'earlier' }))
            .ok,
        ).toBe(true);
        const before = snapshot(db);
        const r = await usdaSr28.run(db, copyFixture('sr28-mini', t.dir, edit), {
          clock,
          release: 'earlier',
        });
        expect(r.ok).toBe(false);
        if (r.ok) return;
        expect(r.fatal.code).toBe(code);
        expect(r.fatal.message).toMatch(message);
        expect(snapshot(db)).toBe(before);
      } finally {
        t.cleanup();
        await db.close();
      }
    });
  }

  it('skips and reports bad rows with file and line: negative, non-numeric, duplicate, unknown food', async () => {
    const db = await openMemoryDb();
    const t = tempDir();
    try {
      const dir = copyFixture('sr28-mini', t.dir, (f, b) => {
        if (f !== 'NUT_DATA.txt') return b;
        const lines = latin1(b).split('\r\n');
        lines[0] = (lines[0] as string).replace('^25.5^', '^-25.5^'); // line 1: negative
        lines[1] = (lines[1] as string).replace('^400^', '^four^'); // line 2: not a number
        lines.push('~90001~^~305~^501^3^^~1~^~A~^^^^^^^^^^06/2015^'); // line 12: duplicate key
        lines.push('~99999~^~305~^1^3^^~1~^~A~^^^^^^^^^^06/2015^'); // line 13: unknown food
        return Buffer.from(lines.join('\r\n'), 'latin1');
      });
      const r = await usdaSr28.run(db, dir, { clock });
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      expect(r.skipped).toBe(4);
      expect(r.values).toBe(9); // 11 good rows, less the two bad ones; the duplicate and unknown add none
      expect(r.errors.map((e) => [e.file, e.line, e.code])).toEqual([
        ['NUT_DATA.txt', 1, 'PHL_IMPORT_ROW_NEGATIVE'],
        ['NUT_DATA.txt', 2, 'PHL_IMPORT_ROW_NUMBER'],
        ['NUT_DATA.txt', 12, 'PHL_IMPORT_ROW_DUPLICATE'],
        ['NUT_DATA.txt', 13, 'PHL_IMPORT_ROW_UNKNOWN_FOOD'],
      ]);
      // The first value stays (P 500 mg, invented), the duplicate 501 is not taken.
      expect(
        db.sqlite.prepare("select phosphorus_mg from food where code = '90001'").get(),
      ).toEqual({ phosphorus_mg: 500 });
      expect(db.sqlite.prepare('select skipped_count from food_source').get()).toEqual({
        skipped_count: 4,
      });
    } finally {
      t.cleanup();
      await db.close();
    }
  });

  it('reports a path that does not exist and a zip without the release files', async () => {
    const db = await openMemoryDb();
    const t = tempDir();
    try {
      const missing = await usdaSr28.run(db, join(t.dir, 'nope'), { clock });
      expect(missing).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_PATH_NOT_FOUND' } });
      const zip = join(t.dir, 'other.zip');
      writeFileSync(zip, makeZip({ 'readme.txt': Buffer.from('not the release') }));
      const wrong = await usdaSr28.run(db, zip, { clock });
      expect(wrong).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_FILE_MISSING' } });
      if (!wrong.ok)
        expect(wrong.fatal.message).toMatch(/has no FD_GROUP\.txt \(found: readme\.txt\)/);
      const notZip = join(t.dir, 'broken.zip');
      writeFileSync(notZip, 'this is not a zip');
      expect(await usdaSr28.run(db, notZip, { clock })).toMatchObject({
        ok: false,
        fatal: { code: 'PHL_IMPORT_ZIP' },
      });
      expect(db.sqlite.prepare('select count(*) as n from food_source').get()).toEqual({ n: 0 });
    } finally {
      t.cleanup();
      await db.close();
    }
  });
});
