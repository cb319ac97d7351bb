import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { scanIngredients } from './additive-scan.js';
import { readCsv } from './csv.js';
import { openFileSet, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField, structural } from './issues.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

/** The nutrient columns of the clinic products file: per 100 g, in the unit the name says. */
export const PRODUCT_NUTRIENT_COLUMNS = [
  { column: 'phosphorus_mg_100g', name: 'Phosphorus, P', unit: 'mg', tag: 'P' },
  { column: 'protein_g_100g', name: 'Protein', unit: 'g', tag: 'PROCNT' },
  { column: 'energy_kcal_100g', name: 'Energy', unit: 'kcal', tag: 'ENERC_KCAL' },
  { column: 'potassium_mg_100g', name: 'Potassium, K', unit: 'mg', tag: 'K' },
  { column: 'sodium_mg_100g', name: 'Sodium, Na', unit: 'mg', tag: 'NA' },
  { column: 'calcium_mg_100g', name: 'Calcium, Ca', unit: 'mg', tag: 'CA' },
  { column: 'water_g_100g', name: 'Water', unit: 'g', tag: 'WATER' },
] as const;

export const PRODUCT_COLUMNS = [
  'code',
  'name',
  'brand',
  'barcode',
  'group',
  'ingredients',
  'ingredients_lang',
  ...PRODUCT_NUTRIENT_COLUMNS.map((c) => c.column),
  'serving_g',
  'serving_description',
] as const;

const REQUIRED = ['name', 'phosphorus_mg_100g', 'protein_g_100g'] as const;

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const entry = set.entries[0];
  if (!entry) throw structural(set.label, null, ImportCodes.missingFile, `${set.label} is empty`);
  const file = entry.name;
  progress.setFile(file);
  const defs = PRODUCT_NUTRIENT_COLUMNS.map((c, i) => ({
    ...c,
    id: writer.defineNutrient({
      code: c.column,
      name: c.name,
      unit: c.unit,
      tag: c.tag,
      sortOrder: i,
    }),
  }));
  const stream = await entry.open(progress.bytes);
  for await (const batch of readCsv(stream, {
    file,
    delimiter: ',',
    quoted: true,
    required: REQUIRED,
    issues,
  })) {
    for (const row of batch) {
      const at = `${file} line ${row.line}`;
      const name = row.get('name').trim();
      if (!name) {
        issues.skip(file, row.line, ImportCodes.rowMissing, `${at}: name is empty`);
        continue;
      }
      const barcode = row.get('barcode').replace(/\s+/g, '');
      if (barcode && !/^\d{8,14}$/.test(barcode)) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowNumber,
          `${at}: barcode '${barcode}' is not 8 to 14 digits`,
        );
        continue;
      }
      const values: Array<[number, number]> = [];
      let bad: { code: string; reason: string } | null = null;
      for (const d of defs) {
        const v = parseNumberField(row.get(d.column));
        if (!v.ok) {
          bad = { code: v.code, reason: `${d.column}: ${v.reason}` };
          break;
        }
        if (v.value !== null) values.push([d.id, v.value]);
      }
      const serving = parseNumberField(row.get('serving_g'));
      if (!bad && !serving.ok) bad = { code: serving.code, reason: `serving_g: ${serving.reason}` };
      if (bad) {
        issues.skip(file, row.line, bad.code, `${at}: ${bad.reason}`);
        continue;
      }
      const ingredients = row.get('ingredients').trim() || null;
      const lang = row.get('ingredients_lang').trim() || null;
      const scan = ingredients ? scanIngredients(ingredients, lang) : null;
      const brand = row.get('brand').trim() || null;
      const code = row.get('code').trim() || barcode || `${name}|${brand ?? ''}`.toLowerCase();
      const foodId = writer.addFood({
        code,
        name,
        altNames: brand ? [brand] : [],
        group: row.get('group').trim() || null,
        kind: 'branded',
        brandOwner: brand,
        gtin: barcode || null,
        ingredients,
        ingredientsLang: lang,
        servingG: serving.ok ? serving.value : null,
        servingText: row.get('serving_description').trim() || null,
        additiveScan: scan?.scan ?? null,
        additiveScanVersion: scan?.version ?? null,
      });
      if (foodId === null) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowDuplicate,
          `${at}: product ${code} is already in this file`,
        );
        continue;
      }
      for (const [defId, value] of values)
        writer.addValue(foodId, defId, value, null, null, file, row.line);
      const servingG = serving.ok ? serving.value : null;
      if (servingG !== null && servingG > 0) {
        const desc = row.get('serving_description').trim() || 'serving';
        writer.addPortion(foodId, 1, 1, desc, servingG);
      }
      progress.rows++;
    }
  }
}

/** The clinic's own products, one row each (template: data-import/templates/products-template.csv). */
export const productsCsv: Importer = {
  format: 'products-csv',
  title: 'Clinic products (phosledger products CSV)',
  where:
    'written by the clinic from product labels: start from data-import/templates/products-template.csv',
  pathHint: 'a UTF-8 comma-separated .csv (or .csv.gz) with the template columns',
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'products-csv',
      name: 'Clinic products',
      release: options.release ?? (path ? basename(path).replace(/\.csv(\.gz)?$/i, '') : ''),
      licence: 'Clinic data (from product labels)',
      url: null,
    };
    let set: FileSet;
    try {
      if (!path)
        throw structural('(none)', null, ImportCodes.notFound, 'products-csv needs a file');
      set = await openFileSet(path, options.limits);
      if (set.entries.length !== 1) {
        throw structural(
          path,
          null,
          ImportCodes.missingFile,
          `${path}: give one .csv file, not a folder`,
        );
      }
    } catch (err) {
      return failedBeforeStart(meta.format, err);
    }
    try {
      return await runImport(db, meta, options, set.entries, (ctx) => readAll(set, ctx));
    } finally {
      set.close();
    }
  },
};
