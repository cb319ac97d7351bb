import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { offCsv } from '../../data-import/off-csv.js';
import { PRODUCT_COLUMNS, productsCsv } from '../../data-import/products-csv.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FIXTURES, snapshot, withDb } from './helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time
const TEMPLATE = new URL('../../data-import/templates/products-template.csv', import.meta.url);

const scanOf = (db: Awaited<ReturnType<typeof openMemoryDb>>, code: string) => {
  const r = db.sqlite.prepare('select additive_scan from food where code = ?').get(code) as {
    additive_scan: string | null;
  };
  return r.additive_scan === null
    ? null
    : (JSON.parse(r.additive_scan) as {
        additives: Array<{ matchedText: string; counted: boolean }>;
      });
};

describe('off-csv: Open Food Facts export layout (invented demo products, off-mini.csv)', () => {
  it('imports products, converts g to mg, keeps products without phosphorus and reports bad values', () =>
    withDb(async (db) => {
      const r = await offCsv.run(db, join(FIXTURES, 'off-mini.csv'), { clock });
      expect(r).toMatchObject({ ok: true, imported: 6, skipped: 0, release: 'off-mini' });
      if (!r.ok) return;
      // Line 4: phosphorus 'abc'; line 5: phosphorus -0.1: values left out, products kept.
      // Lines 6 and 7: implausible values, left out and reported once per product.
      expect(r.errors.map((e) => [e.line, e.code])).toEqual([
        [4, 'PHL_IMPORT_ROW_NUMBER'],
        [5, 'PHL_IMPORT_ROW_NEGATIVE'],
        [6, 'PHL_IMPORT_ROW_IMPLAUSIBLE'],
        [7, 'PHL_IMPORT_ROW_IMPLAUSIBLE'],
      ]);
      // The real export header has no language column: said once.
      expect(r.notes.join(' ')).toMatch(/no language column/);
      const repo = new FoodRepository(db.kysely);
      const id = (code: string) =>
        (db.sqlite.prepare('select id from food where code = ?').get(code) as { id: number }).id;
      // Invented demo data: phosphorus_100g 0.8 g -> 800 mg; sodium_100g 1 g -> 1000 mg;
      // calcium_100g 0.45 g -> 450 mg; potassium_100g 0.15 g -> 150 mg; 280 kcal; protein 13 g.
      const cheese = await repo.getFood(id('4000000000017'));
      expect(cheese).toMatchObject({
        name: 'Queso fundido en lonchas (demo)',
        kind: 'branded',
        brandOwner: 'Demo Lácteos',
        gtin: '4000000000017',
        ingredientsLanguage: null,
        servingG: 20,
        group: 'Processed cheeses',
      });
      expect(cheese?.per100g.phosphorusMg).toBeCloseTo(800, 9);
      expect(cheese?.per100g.sodiumMg).toBeCloseTo(1000, 9);
      expect(cheese?.per100g.calciumMg).toBeCloseTo(450, 9);
      expect(cheese?.per100g.potassiumMg).toBeCloseTo(150, 9);
      expect(cheese?.per100g).toMatchObject({ energyKcal: 280, proteinG: 13 });
      const col = (code: string, c: string) =>
        (db.sqlite.prepare(`select ${c} as v from food where code = ?`).get(code) as { v: unknown })
          .v;
      expect(col('4000000000017', 'water_g')).toBe(48); // water_100g 48 g (invented)
      // The cola has no phosphorus value: imported anyway, phosphorus null (never 0).
      const cola = await repo.getFood(id('4000000000024'));
      expect(cola?.name).toBe('Demo cola "zero" drink'); // the export never quotes: '"' is text
      expect(cola?.per100g.phosphorusMg).toBeNull();
      expect(cola?.ingredients).toMatch(/acide phosphorique/);
      // "330 ml": a volume stays a volume (no density, so no grams and no gram portion).
      expect(cola?.servingG).toBeNull();
      expect(col('4000000000024', 'serving_ml')).toBe(330);
      // Line 6: sodium_100g 96 g is more sodium than pure salt holds (39.3 g/100 g): left out,
      // never stored as 96,000 mg; salt 0.24 g and phosphorus 0.35 g -> 350 mg are kept.
      expect(col('4000000000055', 'sodium_mg')).toBeNull();
      expect(col('4000000000055', 'phosphorus_mg')).toBeCloseTo(350, 9);
      expect(r.errors[2]?.message).toMatch(/product 4000000000055: implausible.*sodium_100g/);
      // Line 7: 950 kcal > 900 (pure fat), fat 101 g > 100 g, and sodium 1.2 g vs salt 1.5 g /
      // 2.5 = 0.6 g (disagree by 50% > 20%): all four left out; water 16 g kept.
      const butter = r.errors[3]?.message ?? '';
      for (const c of ['energy-kcal_100g', 'fat_100g', 'sodium_100g', 'salt_100g'])
        expect(butter).toContain(c);
      expect(col('4000000000062', 'energy_kcal')).toBeNull();
      expect(col('4000000000062', 'sodium_mg')).toBeNull();
      expect(col('4000000000062', 'water_g')).toBe(16);
      const butterCodes = (await repo.getAllNutrients(id('4000000000062'))).map((n) => n.code);
      expect(butterCodes).not.toContain('fat_100g');
      expect(butterCodes).not.toContain('salt_100g');
      // The nutrition score is not a nutrient.
      expect(
        (await repo.getAllNutrients(id('4000000000017'))).some((n) => n.code.includes('score')),
      ).toBe(false);
    }));

  it('has exactly the header of the real export (reference/formats copy)', () => {
    const real = readFileSync(
      join(FIXTURES, 'formats/off-csv/en.openfoodfacts.org.products.header.tsv'),
      'utf8',
    );
    const mine = readFileSync(join(FIXTURES, 'off-mini.csv'), 'utf8');
    expect(mine.split('\n')[0]).toBe(real.split('\n')[0]);
    expect(real.split('\t')).toHaveLength(210);
  });

  it('scans ingredient statements in their language for phosphate additives', () =>
    withDb(async (db) => {
      await offCsv.run(db, join(FIXTURES, 'off-mini.csv'), { clock });
      // "difosfatos, polifosfatos" (es) and "acide phosphorique" (fr) are phosphate additives.
      expect(
        scanOf(db, '4000000000017')?.additives.map((a) => a.matchedText.toLowerCase()),
      ).toEqual(expect.arrayContaining(['difosfatos', 'polifosfatos']));
      expect(
        scanOf(db, '4000000000024')?.additives.some((a) => /phosphorique/i.test(a.matchedText)),
      ).toBe(true);
      expect(scanOf(db, '4000000000031')?.additives).toEqual([]); // rice, sunflower oil, salt
    }));

  it('reads a gzipped export and refuses commas, Latin-1 and UTF-16 with the database unchanged', () =>
    withDb(async (db, dir) => {
      const text = readFileSync(join(FIXTURES, 'off-mini.csv'), 'utf8');
      const gz = join(dir, 'products.csv.gz');
      writeFileSync(gz, gzipSync(text));
      expect(await offCsv.run(db, gz, { clock })).toMatchObject({
        ok: true,
        imported: 6,
        release: 'products',
      });
      const before = snapshot(db);
      const cases: Array<[string, Buffer, string]> = [
        ['commas.csv', Buffer.from(text.replaceAll('\t', ',')), 'PHL_IMPORT_DELIMITER'],
        ['latin1.csv', Buffer.from(text, 'latin1'), 'PHL_IMPORT_ENCODING'],
        [
          'utf16.csv',
          Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]),
          'PHL_IMPORT_ENCODING',
        ],
        ['header.csv', Buffer.from(`${text.split('\n')[0]}\n`), 'PHL_IMPORT_NO_ROWS'],
        ['cut.csv', Buffer.from(text.slice(0, text.length - 40)), 'PHL_IMPORT_TRUNCATED'],
        ['dups.csv', Buffer.from(text + text.split('\n')[1] + '\n'), 'ok'],
      ];
      for (const [name, bytes, code] of cases) {
        writeFileSync(join(dir, name), bytes);
        const res = await offCsv.run(db, join(dir, name), { clock, release: 'products' });
        expect({ name, code: res.ok ? 'ok' : res.fatal.code }).toEqual({ name, code });
        if (res.ok)
          expect(res.errors.at(-1)).toMatchObject({ line: 8, code: 'PHL_IMPORT_ROW_DUPLICATE' });
        else expect(snapshot(db)).toBe(before);
      }
    }));
});

describe('products-csv: the clinic products file (invented demo products, products-mini.csv)', () => {
  it('has a template whose header is exactly the documented columns', () => {
    const header = readFileSync(TEMPLATE, 'utf8').trim().split(',');
    expect(header).toEqual([...PRODUCT_COLUMNS]);
  });

  it('imports products with quoted commas and quotes, a barcode as code, servings as portions', () =>
    withDb(async (db) => {
      const r = await productsCsv.run(db, join(FIXTURES, 'products-mini.csv'), { clock });
      expect(r).toMatchObject({
        ok: true,
        imported: 3,
        skipped: 0,
        portions: 2,
        release: 'products-mini',
      });
      const rows = db.sqlite
        .prepare(
          'select code, name, gtin, phosphorus_mg, protein_g, potassium_mg, serving_g from food order by name',
        )
        .all();
      // Invented demo data (products-mini.csv).
      expect(rows).toEqual([
        {
          code: '4000000000055',
          name: 'Demo renal bread, low phosphorus',
          gtin: '4000000000055',
          phosphorus_mg: 45,
          protein_g: 1.2,
          potassium_mg: 30,
          serving_g: 40,
        },
        {
          code: 'DEMO-2',
          name: 'Demo sausage, "classic"',
          gtin: null,
          phosphorus_mg: 250,
          protein_g: 12,
          potassium_mg: 200,
          serving_g: 50,
        },
        {
          code: 'DEMO-3',
          name: 'Demo soup powder',
          gtin: null,
          phosphorus_mg: 120,
          protein_g: 8,
          potassium_mg: null,
          serving_g: null,
        },
      ]);
      expect(scanOf(db, 'DEMO-2')?.additives.some((a) => /diphosphate/i.test(a.matchedText))).toBe(
        true,
      );
      expect(scanOf(db, 'DEMO-3')).toBeNull(); // no ingredient statement
    }));

  it('skips bad rows (negative, non-numeric, duplicate, bad barcode, no name) with their lines', () =>
    withDb(async (db, dir) => {
      const header = readFileSync(TEMPLATE, 'utf8').trim();
      const file = join(dir, 'clinic.csv');
      writeFileSync(
        file,
        '\ufeff' + // a spreadsheet's BOM is fine
          [
            header,
            'A,Good one,,,,,,100,5,,,,,,,', // line 2
            'B,Negative,,,,,,-3,5,,,,,,,', // line 3
            'C,Not a number,,,,,,ten,5,,,,,,,', // line 4
            'A,Duplicate code,,,,,,100,5,,,,,,,', // line 5
            'D,Bad barcode,,12AB,,,,100,5,,,,,,,', // line 6
            'E,,,,,,,100,5,,,,,,,', // line 7
            'F,Too few fields,100', // line 8
          ].join('\r\n') +
          '\r\n',
      );
      const r = await productsCsv.run(db, file, { clock });
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      expect(r.imported).toBe(1);
      expect(r.skipped).toBe(6);
      expect(r.errors.map((e) => [e.line, e.code])).toEqual([
        [3, 'PHL_IMPORT_ROW_NEGATIVE'],
        [4, 'PHL_IMPORT_ROW_NUMBER'],
        [5, 'PHL_IMPORT_ROW_DUPLICATE'],
        [6, 'PHL_IMPORT_ROW_NUMBER'],
        [7, 'PHL_IMPORT_ROW_MISSING_FIELD'],
        [8, 'PHL_IMPORT_ROW_FIELDS'],
      ]);
      expect(r.errors[0]?.message).toBe("clinic.csv line 3: phosphorus_mg_100g: '-3' is negative");
    }));

  it('refuses the bare template, missing columns and a missing file, changing nothing', () =>
    withDb(async (db, dir) => {
      expect(await productsCsv.run(db, TEMPLATE.pathname, { clock })).toMatchObject({
        ok: false,
        fatal: { code: 'PHL_IMPORT_NO_ROWS' },
      });
      writeFileSync(join(dir, 'cols.csv'), 'name,protein_g_100g\nX,1\n');
      const cols = await productsCsv.run(db, join(dir, 'cols.csv'), { clock });
      expect(cols).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_COLUMNS', line: 1 } });
      if (!cols.ok) expect(cols.fatal.message).toMatch(/missing column phosphorus_mg_100g/);
      expect(await productsCsv.run(db, join(dir, 'none.csv'), { clock })).toMatchObject({
        ok: false,
        fatal: { code: 'PHL_IMPORT_PATH_NOT_FOUND' },
      });
      expect(db.sqlite.prepare('select count(*) as n from food_source').get()).toEqual({ n: 0 });
    }));
});
