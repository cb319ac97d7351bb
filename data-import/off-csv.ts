import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { readCsv, type CsvRow } from './csv.js';
import { openFileSet, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, structural } from './issues.js';
import { OffDefs, isOffNutrient, localNamesFrom, stageOffProduct } from './off-product.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

/** Ingredient columns with a language suffix (`ingredients_text_fr`), where a header has them. */
const LANG_COLUMN = /^ingredients_text_([a-z]{2,3})$/;

/**
 * How this file's header says the ingredient language: per-language ingredient columns, or a
 * `lang`/`lc` column; the current export header (reference/formats) has neither, so its
 * statements are scanned in every catalogue language (said once in the notes).
 */
function languageColumns(header: readonly string[]) {
  const suffixed: Array<{ index: number; lang: string }> = [];
  header.forEach((h, index) => {
    const m = LANG_COLUMN.exec(h);
    if (m?.[1]) suffixed.push({ index, lang: m[1] });
  });
  const langIndex = ['lang', 'lc'].map((c) => header.indexOf(c)).find((i) => i >= 0) ?? -1;
  return { suffixed, langIndex };
}

/** The product's own names in other languages from a CSV row (see `localNamesFrom`). */
export function localNames(row: CsvRow, mainName: string): Array<[string, string]> {
  return localNamesFrom(
    row.header.map((c): [string, string] => [c, row.get(c)]),
    mainName,
  );
}

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const entry = set.entries[0];
  if (!entry) throw structural(set.label, null, ImportCodes.missingFile, `${set.label} is empty`);
  const file = entry.name;
  progress.setFile(file);
  const defs = new OffDefs(writer);
  let layout: {
    nutrients: Array<{ column: string; index: number }>;
    langs: ReturnType<typeof languageColumns>;
  } | null = null;
  const stream = await entry.open(progress.bytes);
  for await (const batch of readCsv(stream, {
    file,
    delimiter: '\t',
    quoted: false, // the export never quotes; a '"' is part of the text
    required: ['code', 'product_name'],
    issues,
  })) {
    const first = batch[0];
    if (!first) continue;
    if (!layout) {
      const nutrients = first.header
        .map((column, index) => ({ column, index }))
        .filter((n) => isOffNutrient(n.column));
      nutrients.forEach((n) => defs.id(n.column, n.index));
      layout = { nutrients, langs: languageColumns(first.header) };
      if (layout.langs.suffixed.length === 0 && layout.langs.langIndex < 0) {
        issues.notes.push(
          `${file} has no language column (lang, lc or ingredients_text_<language>): ingredient statements are scanned for phosphate additives in every catalogue language`,
        );
      }
    }
    const { nutrients, langs } = layout;
    for (const row of batch) {
      const text = (c: string) => row.get(c).trim();
      let ingredients = text('ingredients_text');
      let lang: string | null =
        langs.langIndex >= 0 ? row.fields[langs.langIndex]?.trim() || null : null;
      // The statement in the product's language where a suffixed column has it, else any.
      const filled = (x: { index: number }) => Boolean(row.fields[x.index]?.trim());
      const pick =
        langs.suffixed.find((x) => x.lang === lang && filled(x)) ??
        (ingredients ? undefined : langs.suffixed.find(filled));
      if (pick) {
        ingredients = row.fields[pick.index]?.trim() ?? '';
        lang = pick.lang;
      }
      const ok = stageOffProduct(
        writer,
        defs,
        issues,
        {
          code: text('code'),
          productName: text('product_name'),
          genericName: text('generic_name'),
          brands: text('brands'),
          brandOwner: text('brand_owner'),
          group: text('main_category_en') || text('pnns_groups_2'),
          ingredients,
          ingredientsLang: lang,
          servingSize: text('serving_size'),
          servingQuantity: text('serving_quantity'),
          localNames: localNames(row, text('product_name')),
          nutrients: nutrients.map((n) => [n.column, row.fields[n.index]] as [string, unknown]),
        },
        { file, line: row.line },
      );
      if (ok) progress.rows++;
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
