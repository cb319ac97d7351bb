import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { scanIngredients } from './additive-scan.js';
import { readCsv, type CsvRow } from './csv.js';
import { openFileSet, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField, structural } from './issues.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

/**
 * Units of the `_100g` columns: grams, except energy in kJ ("energy-kcal_100g" in kcal), per the
 * Open Food Facts CSV field documentation ("fields that end with _100g correspond to the amount
 * of a nutriment (in g, or kJ for energy) for 100 g or 100 ml of product").
 */
function unitOf(column: string): string {
  if (column === 'energy-kcal_100g') return 'kcal';
  if (column.startsWith('energy')) return 'kJ';
  return 'g';
}
const TAGS: Record<string, string> = {
  proteins_100g: 'PROCNT',
  phosphorus_100g: 'P',
  potassium_100g: 'K',
  sodium_100g: 'NA',
  calcium_100g: 'CA',
  'energy-kcal_100g': 'ENERC_KCAL',
  'energy-kj_100g': 'ENERC_KJ',
  energy_100g: 'ENERC_KJ',
  'phytic-acid_100g': 'PHYTAC',
};
// `_100g` columns that are scores or properties, not amounts of a nutrient.
const NOT_NUTRIENTS =
  /score|footprint|^ph_|glycemic|hardness|fruits-vegetables|cocoa|collagen|nova/;

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const entry = set.entries[0];
  if (!entry) throw structural(set.label, null, ImportCodes.missingFile, `${set.label} is empty`);
  const file = entry.name;
  progress.setFile(file);
  let nutrients: Array<{ column: string; index: number; defId: number }> | null = null;
  const stream = await entry.open(progress.bytes);
  const text = (row: CsvRow, c: string) => row.get(c).trim();
  for await (const batch of readCsv(stream, {
    file,
    delimiter: '\t',
    quoted: false, // the export never quotes; a '"' is part of the text
    required: ['code', 'product_name'],
    issues,
  })) {
    if (!nutrients) {
      const first = batch[0];
      if (!first) continue;
      nutrients = [];
      first.header.forEach((column, index) => {
        if (!column.endsWith('_100g') || NOT_NUTRIENTS.test(column)) return;
        const defId = writer.defineNutrient({
          code: column,
          name: column.replace(/_100g$/, '').replace(/-/g, ' '),
          unit: unitOf(column),
          tag: TAGS[column] ?? null,
          sortOrder: index,
        });
        (nutrients as NonNullable<typeof nutrients>).push({ column, index, defId });
      });
    }
    for (const row of batch) {
      const at = `${file} line ${row.line}`;
      const code = text(row, 'code');
      const name = text(row, 'product_name') || text(row, 'generic_name');
      if (!code) {
        issues.skip(file, row.line, ImportCodes.rowMissing, `${at}: code (barcode) is empty`);
        continue;
      }
      if (!name) {
        issues.skip(file, row.line, ImportCodes.rowMissing, `${at}: product ${code} has no name`);
        continue;
      }
      const values: Array<[number, number]> = [];
      for (const n of nutrients) {
        const v = parseNumberField(row.fields[n.index]);
        if (!v.ok) {
          // One bad value does not lose the product (its ingredient statement matters).
          issues.report(
            file,
            row.line,
            v.code,
            `${at}: product ${code}, ${n.column} ${v.reason}: value left out`,
          );
        } else if (v.value !== null) values.push([n.defId, v.value]);
      }
      const ingredients = text(row, 'ingredients_text') || null;
      const lang = text(row, 'lang') || text(row, 'lc') || null;
      const scan = ingredients ? scanIngredients(ingredients, lang) : null;
      const brands = text(row, 'brands');
      const serving = parseNumberField(row.get('serving_quantity'));
      const servingG =
        serving.ok && serving.value !== null && serving.value > 0 ? serving.value : null;
      const group = text(row, 'main_category_en') || text(row, 'pnns_groups_2') || null;
      const foodId = writer.addFood({
        code,
        name,
        altNames: [text(row, 'generic_name'), ...brands.split(',').map((b) => b.trim())].filter(
          (s) => s && s !== name,
        ),
        group: group === 'unknown' ? null : group,
        kind: 'branded',
        brandOwner: text(row, 'brand_owner') || brands.split(',')[0]?.trim() || null,
        gtin: /^\d{8,14}$/.test(code) ? code : null,
        ingredients,
        ingredientsLang: lang,
        servingG,
        servingText: text(row, 'serving_size') || null,
        additiveScan: scan?.scan ?? null,
        additiveScanVersion: scan?.version ?? null,
      });
      if (foodId === null) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowDuplicate,
          `${at}: barcode ${code} is already in this file`,
        );
        continue;
      }
      for (const [defId, value] of values)
        writer.addValue(foodId, defId, value, null, null, file, row.line);
      if (servingG !== null)
        writer.addPortion(foodId, 1, 1, text(row, 'serving_size') || 'serving', servingG);
      progress.rows++;
    }
  }
}

/** The Open Food Facts products export (tab-separated UTF-8, one product a line). */
export const offCsv: Importer = {
  format: 'off-csv',
  title: 'Open Food Facts products export (CSV)',
  where: 'Open Food Facts "data" page: the CSV export (en.openfoodfacts.org.products.csv.gz), ODbL',
  pathHint: 'the .csv or .csv.gz export (tab-separated UTF-8)',
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'off-csv',
      name: 'Open Food Facts',
      release: options.release ?? (path ? basename(path).replace(/\.(csv|tsv)(\.gz)?$/i, '') : ''),
      licence: 'Open Database License (ODbL) 1.0; contents: Database Contents License',
      url: 'https://world.openfoodfacts.org/data',
    };
    let set: FileSet;
    try {
      if (!path) throw structural('(none)', null, ImportCodes.notFound, 'off-csv needs a file');
      set = await openFileSet(path, options.limits);
      if (set.entries.length !== 1) {
        throw structural(
          path,
          null,
          ImportCodes.missingFile,
          `${path}: give the one export file, not a folder`,
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
