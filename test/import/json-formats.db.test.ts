import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { fdcJson } from '../../data-import/fdc-json.js';
import { offJsonl } from '../../data-import/off-jsonl.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb } from '../../src/db/database.js';
import { FIXTURES, makeZip, snapshot, withDb } from './helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

const col = (db: Awaited<ReturnType<typeof openMemoryDb>>, code: string, c: string) =>
  (db.sqlite.prepare(`select ${c} as v from food where code = ?`).get(code) as { v: unknown }).v;

describe('fdc-json: FDC JSON downloads, streamed (invented demo foods, json-mini.README.md)', () => {
  it('imports Foundation foods with values, portions and the SR28 number', () =>
    withDb(async (db) => {
      const r = await fdcJson.run(db, join(FIXTURES, 'fdc-foundation-mini.json'), { clock });
      expect(r).toMatchObject({ ok: true, imported: 1, values: 3, portions: 1 });
      if (!r.ok) return;
      // Invented: P 500 mg, protein 25.5 g, 400 kcal; sodium -4 mg is refused.
      expect(col(db, '910001', 'phosphorus_mg')).toBe(500);
      expect(col(db, '910001', 'protein_g')).toBe(25.5);
      expect(col(db, '910001', 'energy_kcal')).toBe(400);
      expect(col(db, '910001', 'sodium_mg')).toBeNull();
      expect(col(db, '910001', 'ndb_number')).toBe('01999');
      expect(r.errors.map((e) => e.code)).toEqual(['PHL_IMPORT_ROW_NEGATIVE']);
      expect(r.notes.join(' ')).toMatch(/1 of 2 items .* 'Experimental' were left out/);
    }));

  it('imports Branded foods from a zip: label data, grams as a portion, ml kept as volume', () =>
    withDb(async (db, dir) => {
      const zip = join(dir, 'branded.zip');
      writeFileSync(
        zip,
        makeZip({ 'x/branded.json': readFileSync(join(FIXTURES, 'fdc-branded-mini.json')) }),
      );
      const r = await fdcJson.run(db, zip, { clock });
      expect(r).toMatchObject({
        ok: true,
        imported: 2,
        values: 3,
        portions: 1,
        release: 'branded',
      });
      expect(col(db, '910003', 'serving_g')).toBe(21);
      expect(col(db, '910003', 'phosphorus_mg')).toBe(893); // invented
      expect(col(db, '910004', 'serving_g')).toBeNull();
      expect(col(db, '910004', 'serving_ml')).toBe(355);
      expect(String(col(db, '910004', 'additive_scan'))).toMatch(/PHOSPHORIC ACID/i);
    }));

  it('stops on cut or broken JSON with the line, changing nothing', () =>
    withDb(async (db, dir) => {
      await fdcJson.run(db, join(FIXTURES, 'fdc-foundation-mini.json'), { clock });
      const before = snapshot(db);
      const text = readFileSync(join(FIXTURES, 'fdc-foundation-mini.json'), 'utf8');
      const cases: Array<[string, string, string]> = [
        ['cut.json', text.slice(0, Math.floor(text.length / 2)), 'PHL_IMPORT_TRUNCATED'],
        ['broken.json', text.replace('"Foundation"', 'Foundation'), 'PHL_IMPORT_JSON'],
      ];
      for (const [name, body, code] of cases) {
        writeFileSync(join(dir, name), body);
        const r = await fdcJson.run(db, join(dir, name), { clock, release: 'fdc-foundation-mini' });
        expect({ name, code: r.ok ? 'ok' : r.fatal.code }).toEqual({ name, code });
        if (!r.ok) expect(r.fatal.message).toMatch(/line \d+.*the database was not changed/);
        expect(snapshot(db)).toBe(before);
      }
    }));
});

describe('off-jsonl: Open Food Facts JSONL export (invented demo products, off-mini.jsonl)', () => {
  it('imports gzipped JSONL with the same checks as the CSV, language from lang', () =>
    withDb(async (db, dir) => {
      const gz = join(dir, 'products.jsonl.gz');
      writeFileSync(gz, gzipSync(readFileSync(join(FIXTURES, 'off-mini.jsonl'))));
      const r = await offJsonl.run(db, gz, { clock });
      expect(r).toMatchObject({ ok: true, imported: 3, skipped: 1, release: 'products' });
      if (!r.ok) return;
      expect(r.errors.map((e) => [e.line, e.code])).toEqual([
        [2, 'PHL_IMPORT_ROW_IMPLAUSIBLE'],
        [3, 'PHL_IMPORT_JSON'],
        [4, 'PHL_IMPORT_ROW_IMPLAUSIBLE'],
      ]);
      // lang 'es': the statement from ingredients_text_es, scanned as Spanish.
      expect(col(db, '4000000000109', 'ingredients_lang')).toBe('es');
      expect(col(db, '4000000000109', 'ingredients')).toBe('queso, sales de fundido (difosfatos)');
      expect(col(db, '4000000000109', 'phosphorus_mg')).toBeCloseTo(800, 9); // 0.8 g, invented
      expect(col(db, '4000000000109', 'water_g')).toBe(48);
      // serving_quantity_unit ml: 500 ml kept as volume; sodium 96 g left out.
      expect(col(db, '4000000000116', 'serving_ml')).toBe(500);
      expect(col(db, '4000000000116', 'serving_g')).toBeNull();
      expect(col(db, '4000000000116', 'sodium_mg')).toBeNull();
      expect(col(db, '4000000000130', 'energy_kcal')).toBeNull(); // 1,200 kcal > 900
    }));

  it('stops on a cut last line, changing nothing', () =>
    withDb(async (db, dir) => {
      const text = readFileSync(join(FIXTURES, 'off-mini.jsonl'), 'utf8');
      writeFileSync(join(dir, 'cut.jsonl'), text.slice(0, text.length - 15));
      const r = await offJsonl.run(db, join(dir, 'cut.jsonl'), { clock });
      expect(r).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_TRUNCATED', line: 4 } });
      expect(db.sqlite.prepare('select count(*) as n from food').get()).toEqual({ n: 0 });
    }));
});

describe("off-jsonl: the product's names in other languages (invented demo product)", () => {
  const line = (es: string) =>
    JSON.stringify({
      code: '4000000000147',
      product_name: 'Demo cola (JSONL)',
      product_name_es: es,
      product_name_fr: 'Cola démo',
      generic_name_de: 'Erfrischungsgetränk',
      product_name_it: 'Demo cola (JSONL)', // same as the main name: not kept
      nutriments: { 'energy-kcal_100g': 42, phosphorus_100g: 0.01 },
    });
  const names = (db: Awaited<ReturnType<typeof openMemoryDb>>) =>
    db.sqlite
      .prepare(
        `select l.language, l.name from food_local_name l join food f on f.id = l.food_id
         where f.code = '4000000000147' order by l.language`,
      )
      .all();

  it('are staged and published with the food, and replaced with it on a re-import', () =>
    withDb(async (db, dir) => {
      const file = join(dir, 'names.jsonl');
      writeFileSync(file, `${line('Cola de demostración')}\n`);
      expect(await offJsonl.run(db, file, { clock })).toMatchObject({ ok: true, imported: 1 });
      expect(names(db)).toEqual([
        { language: 'de', name: 'Erfrischungsgetränk' },
        { language: 'es', name: 'Cola de demostración' },
        { language: 'fr', name: 'Cola démo' },
      ]);
      writeFileSync(file, `${line('Refresco de cola')}\n`);
      expect(await offJsonl.run(db, file, { clock })).toMatchObject({ ok: true, imported: 1 });
      expect(names(db)).toEqual([
        { language: 'de', name: 'Erfrischungsgetränk' },
        { language: 'es', name: 'Refresco de cola' },
        { language: 'fr', name: 'Cola démo' },
      ]);
    }));
});
