import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { fdcCsv } from '../../data-import/fdc-csv.js';
import { fixedClock } from '../../src/clock.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { copyFixture, FIXTURES, fixtureFiles, makeZip, snapshot, withDb } from './helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

describe('fdc-csv: FoodData Central CSV layout (invented demo rows, test/fixtures/import/fdc-mini)', () => {
  it('imports generic and branded foods, values by nutrient number, portions and label data', () =>
    withDb(async (db, dir) => {
      const r = await fdcCsv.run(db, copyFixture('fdc-mini', dir), { clock });
      expect(r).toMatchObject({ ok: true, imported: 3, skipped: 0, values: 11, portions: 3 });
      if (!r.ok) return;
      expect(r.release).toBe('fdc-mini');
      expect(r.notes.join(' ')).toMatch(/1 food\.csv rows of data type 'sample_food'/);
      const repo = new FoodRepository(db.kysely);
      const id = (code: string) =>
        (db.sqlite.prepare('select id from food where code = ?').get(code) as { id: number }).id;
      // Invented demo data (fixture): 900001 P 500 mg, protein 25.5 g, 400 kcal, Na 600 mg.
      const generic = await repo.getFood(id('900001'));
      expect(generic).toMatchObject({
        kind: 'generic',
        group: 'Dairy and Egg Products',
        per100g: {
          phosphorusMg: 500,
          proteinG: 25.5,
          energyKcal: 400,
          sodiumMg: 600,
          potassiumMg: null,
        },
      });
      expect(generic?.portions.map((p) => [p.description, p.grams])).toEqual([
        ['cup, diced', 132],
        ['oz', 28.35],
      ]);
      const p = (await repo.getAllNutrients(id('900001'))).find((n) => n.code === '305');
      expect(p).toMatchObject({ tag: 'P', unit: 'mg', derivation_code: 'A', source_code: '1' });
      const b12 = (await repo.getAllNutrients(id('900001'))).find((n) => n.code === '418');
      expect(b12?.unit).toBe('µg');

      const cheese = await repo.getFood(id('900002'));
      expect(cheese).toMatchObject({
        kind: 'branded',
        brandOwner: 'Demo Dairy Co.',
        gtin: '00012345678905',
        group: 'Cheese',
        ingredientsLanguage: 'en',
        servingG: 21,
        servingText: '1 slice',
        per100g: { phosphorusMg: 893, proteinG: 17.86 },
      });
      // The 2019 Branded layout has no brand_name / subbrand_name: said once, not read as ''.
      expect(cheese?.altNames).toEqual(['Demo Dairy Co.']);
      expect(r.notes.filter((n) => n.includes('brand_name'))).toEqual([
        "branded_food.csv has no columns brand_name, subbrand_name (this release's layout): brand names, sub-brand names left empty for every food",
      ]);
      // A serving in ml is not a weight: no serving_g for the cola, the volume kept as ml.
      expect((await repo.getFood(id('900003')))?.servingG).toBeNull();
      const col = (code: string, c: string) =>
        (db.sqlite.prepare(`select ${c} as v from food where code = ?`).get(code) as { v: unknown })
          .v;
      expect(col('900003', 'serving_ml')).toBe(355);
      // sr_legacy_food.csv: NDB_number 1999 (invented) kept as SR28 writes it, '01999'.
      expect(col('900001', 'ndb_number')).toBe('01999');
      expect(col('900002', 'ndb_number')).toBeNull();
    }));

  it('uses exactly the real headers of each FDC CSV file (reference/formats copies)', () => {
    const files = fixtureFiles('fdc-mini');
    for (const [name, bytes] of Object.entries(files)) {
      if (!name.endsWith('.csv')) continue;
      const first = bytes.toString('utf8').split('\n')[0];
      const real = ['fdc-sr-legacy-csv', 'fdc-foundation-csv', 'fdc-branded-csv-2019']
        .map((d) => join(FIXTURES, 'formats', d, name))
        .filter((f) => existsSync(f))
        .map((f) => readFileSync(f, 'utf8').split('\n')[0]);
      expect({ name, found: real.length > 0 }).toEqual({ name, found: true });
      expect({ name, first }).toEqual({ name, first: real.includes(first) ? first : real[0] });
    }
  });

  it('stores the additive scan of each ingredient statement with the catalogue version', () =>
    withDb(async (db, dir) => {
      await fdcCsv.run(db, copyFixture('fdc-mini', dir), { clock });
      const rows = db.sqlite
        .prepare(
          "select code, additive_scan, additive_scan_version from food where kind = 'branded' order by code",
        )
        .all() as Array<{ code: string; additive_scan: string; additive_scan_version: string }>;
      expect(rows).toHaveLength(2);
      for (const r of rows) {
        expect(r.additive_scan_version).toMatch(/\S/);
        const scan = JSON.parse(r.additive_scan) as {
          additives: Array<{ matchedText: string; counted: boolean }>;
        };
        expect(Array.isArray(scan.additives)).toBe(true);
      }
      // "SODIUM PHOSPHATE" (cheese) and "PHOSPHORIC ACID" (cola) are phosphate additives.
      const texts = rows.map((r) =>
        (JSON.parse(r.additive_scan).additives as Array<{ matchedText: string }>)
          .map((a) => a.matchedText.toLowerCase())
          .join('|'),
      );
      expect(texts[0]).toMatch(/phosphate/);
      expect(texts[1]).toMatch(/phosphoric/);
      const generic = db.sqlite
        .prepare("select additive_scan from food where code = '900001'")
        .get();
      expect(generic).toEqual({ additive_scan: null }); // no ingredient statement, nothing scanned
    }));

  it('reads the same download from a zip with a folder inside', () =>
    withDb(async (db, dir) => {
      const files = Object.fromEntries(
        Object.entries(fixtureFiles('fdc-mini')).map(([k, v]) => [
          `FoodData_Central_csv_demo/${k}`,
          v,
        ]),
      );
      const zip = join(dir, 'FoodData_Central_csv_demo.zip');
      writeFileSync(zip, makeZip(files));
      const r = await fdcCsv.run(db, zip, { clock });
      expect(r).toMatchObject({
        ok: true,
        imported: 3,
        values: 11,
        release: 'FoodData_Central_csv_demo',
      });
    }));

  it('skips bad rows with file and line, and stops on structural errors leaving the database as it was', () =>
    withDb(async (db, dir) => {
      const bad = copyFixture('fdc-mini', dir, (f, b) => {
        if (f !== 'food_nutrient.csv') return b;
        return Buffer.concat([
          b,
          Buffer.from(
            '"13","900001","1092","-4","","1","","","","",""\n' + // line 14: negative
              '"14","900001","1051","n/a","","1","","","","",""\n' + // line 15: not a number
              '"15","900001","1091","501","","1","","","","",""\n' + // line 16: duplicate
              '"16","900001","7777","1","","1","","","","",""\n', // line 17: unknown nutrient
          ),
        ]);
      });
      const r = await fdcCsv.run(db, bad, { clock });
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      expect(r.errors.map((e) => [e.file, e.line, e.code])).toEqual([
        ['food_nutrient.csv', 14, 'PHL_IMPORT_ROW_NEGATIVE'],
        ['food_nutrient.csv', 15, 'PHL_IMPORT_ROW_NUMBER'],
        ['food_nutrient.csv', 16, 'PHL_IMPORT_ROW_DUPLICATE'],
        ['food_nutrient.csv', 17, 'PHL_IMPORT_ROW_UNKNOWN_NUTRIENT'],
      ]);
      expect(r.skipped).toBe(4);
      const before = snapshot(db);
      const cases: Array<[string, (f: string, b: Buffer) => Buffer | null, string]> = [
        [
          'no food_nutrient.csv',
          (f, b) => (f === 'food_nutrient.csv' ? null : b),
          'PHL_IMPORT_FILE_MISSING',
        ],
        [
          'a column missing',
          (f, b) =>
            f === 'food.csv' ? Buffer.from(b.toString().replace('"description"', '"desc"')) : b,
          'PHL_IMPORT_COLUMNS',
        ],
        [
          'semicolons',
          (f, b) => (f === 'nutrient.csv' ? Buffer.from(b.toString().replaceAll('","', '";"')) : b),
          'PHL_IMPORT_DELIMITER',
        ],
        [
          'a truncated file',
          (f, b) => (f === 'food_nutrient.csv' ? b.subarray(0, b.length - 20) : b),
          'PHL_IMPORT_TRUNCATED',
        ],
        [
          'Latin-1 text',
          (f, b) =>
            f === 'food.csv'
              ? Buffer.concat([
                  b,
                  Buffer.from('"900009","sr_legacy_food","Cr\xe8me","1",""\n', 'latin1'),
                ])
              : b,
          'PHL_IMPORT_ENCODING',
        ],
        [
          'a header-only food.csv',
          (f, b) => (f === 'food.csv' ? Buffer.from(b.toString().split('\n')[0] + '\n') : b),
          'PHL_IMPORT_NO_ROWS',
        ],
      ];
      for (const [what, edit, code] of cases) {
        const res = await fdcCsv.run(db, copyFixture('fdc-mini', dir, edit), { clock });
        expect({ what, code: res.ok ? 'ok' : res.fatal.code }).toEqual({ what, code });
        expect(snapshot(db)).toBe(before);
      }
    }));
});
