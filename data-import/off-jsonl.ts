import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { decodeText, readLines } from './decode.js';
import { openFileSet, type FileSet, type SetEntry } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, structural } from './issues.js';
import { OffDefs, isOffNutrient, localNamesFrom, stageOffProduct } from './off-product.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

type Obj = Record<string, unknown>;
const str = (v: unknown): string =>
  typeof v === 'string' ? v.trim() : typeof v === 'number' ? String(v) : '';

/**
 * One product of the JSONL export: `lang` (or `lc`) names the product's language and
 * `ingredients_text_<lang>` holds the statement in it; `nutriments` has the same `_100g`
 * fields as the CSV; `serving_quantity_unit` says g or ml where present. Field names from the
 * Open Food Facts product schema, from memory (no reference file of this layout in shared/).
 */
function toProduct(p: Obj) {
  const lang = str(p.lang) || str(p.lc) || null;
  const own = lang ? str(p[`ingredients_text_${lang}`]) : '';
  const nutriments = (p.nutriments && typeof p.nutriments === 'object' ? p.nutriments : {}) as Obj;
  const unit = str(p.serving_quantity_unit).toLowerCase();
  const servingSize = str(p.serving_size);
  return {
    code: str(p.code),
    productName: str(p.product_name) || (lang ? str(p[`product_name_${lang}`]) : ''),
    genericName: str(p.generic_name),
    brands: str(p.brands),
    brandOwner: str(p.brand_owner),
    group: str(p.main_category_en) || str(p.pnns_groups_2),
    ingredients: own || str(p.ingredients_text),
    ingredientsLang: own || str(p.ingredients_text) ? lang : null,
    // With an explicit unit the text need not say it: make the text say it for the check.
    servingSize:
      unit && !servingSize.toLowerCase().includes(unit)
        ? `${servingSize} (${str(p.serving_quantity)} ${unit})`.trim()
        : servingSize,
    servingQuantity: str(p.serving_quantity),
    localNames: localNamesFrom(Object.entries(p), str(p.product_name)),
    nutrients: Object.entries(nutriments).filter(([k]) => isOffNutrient(k)),
  };
}

async function readAll(entry: SetEntry, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const file = entry.name;
  progress.setFile(file);
  const defs = new OffDefs(writer);
  let seen = 0;
  // JSONL: one JSON document a line, so memory holds one product and a bad line is only that
  // line (reported and skipped); the file's end must be a complete line.
  const text = decodeText(await entry.open(progress.bytes), file, 'utf-8');
  for await (const batch of readLines(text)) {
    for (let i = 0; i < batch.lines.length; i++) {
      const raw = batch.lines[i] as string;
      const line = batch.first + i;
      if (!raw.trim()) continue;
      let value: unknown;
      try {
        value = JSON.parse(raw);
      } catch (err) {
        if (batch.endsWithNewline === false && i === batch.lines.length - 1) {
          throw structural(
            file,
            line,
            ImportCodes.truncated,
            `${file} line ${line}: the last line is not a complete product (a cut download?); the database was not changed`,
          );
        }
        issues.skip(
          file,
          line,
          ImportCodes.json,
          `${file} line ${line}: not valid JSON (${(err as Error).message})`,
        );
        continue;
      }
      seen++;
      if (!value || typeof value !== 'object' || Array.isArray(value)) {
        issues.skip(file, line, ImportCodes.json, `${file} line ${line}: not a product object`);
        continue;
      }
      if (stageOffProduct(writer, defs, issues, toProduct(value as Obj), { file, line })) {
        progress.rows++;
      }
    }
  }
  if (seen === 0) throw structural(file, null, ImportCodes.empty, `${file} has no products`);
}

/** The Open Food Facts JSONL export (one product a line, UTF-8, usually gzipped). */
export const offJsonl: Importer = {
  format: 'off-jsonl',
  title: 'Open Food Facts products export (JSONL)',
  where: 'Open Food Facts "data" page: the JSONL export (openfoodfacts-products.jsonl.gz), ODbL',
  pathHint: 'the .jsonl or .jsonl.gz export',
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'off-jsonl',
      name: 'Open Food Facts',
      release: options.release ?? (path ? basename(path).replace(/\.jsonl?(\.gz)?$/i, '') : ''),
      licence: 'Open Database License (ODbL) 1.0; contents: Database Contents License',
      url: 'https://world.openfoodfacts.org/data',
    };
    let set: FileSet;
    let entry: SetEntry;
    try {
      if (!path) throw structural('(none)', null, ImportCodes.notFound, 'off-jsonl needs a file');
      set = await openFileSet(path, options.limits);
      if (set.entries.length !== 1 || !set.entries[0]) {
        throw structural(path, null, ImportCodes.missingFile, `${path}: give the one export file`);
      }
      entry = set.entries[0];
    } catch (err) {
      return failedBeforeStart(meta.format, err);
    }
    try {
      return await runImport(db, meta, options, [entry], (ctx) => readAll(entry, ctx));
    } finally {
      set.close();
    }
  },
};
