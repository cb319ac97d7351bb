import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { scanIngredients } from './additive-scan.js';
import { TAG_BY_NBR, UNITS, nbr } from './fdc-csv.js';
import { openFileSet, type FileSet, type SetEntry } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField, structural, type IssueLog } from './issues.js';
import { readJsonArrays, type JsonItem } from './json-stream.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';
import type { SourceWriter } from './writer.js';

/**
 * The FDC JSON downloads: one document whose top-level key holds every food
 * (`FoundationFoods`, `SRLegacyFoods`, `BrandedFoods`, `SurveyFoods`), each food with its
 * `foodNutrients` (`nutrient.number`, `nutrient.unitName`, `amount`), `foodPortions` and, for
 * Branded foods, the label fields. Field names as in the FDC JSON downloads, from memory (no
 * reference file of this layout in the project's shared folder).
 */
const KINDS: Record<string, 'generic' | 'branded'> = {
  Foundation: 'generic',
  'SR Legacy': 'generic',
  'Survey (FNDDS)': 'generic',
  Branded: 'branded',
};

type Obj = Record<string, unknown>;
const obj = (v: unknown): Obj =>
  v && typeof v === 'object' && !Array.isArray(v) ? (v as Obj) : {};
const arr = (v: unknown): unknown[] => (Array.isArray(v) ? v : []);
const str = (v: unknown): string =>
  typeof v === 'string' ? v.trim() : typeof v === 'number' ? String(v) : '';

/** Nutrient definitions by SR number (bounded by FDC's nutrient list). */
class Defs {
  private readonly ids = new Map<string, number>();
  constructor(private readonly writer: SourceWriter) {}
  id(n: Obj): number | null {
    const number = nbr(str(n.number));
    const code = number || (n.id !== undefined ? `fdc-${str(n.id)}` : '');
    if (!code) return null;
    let id = this.ids.get(code);
    if (id === undefined) {
      const unitName = str(n.unitName);
      id = this.writer.defineNutrient({
        code,
        name: str(n.name) || code,
        unit: UNITS[unitName.toUpperCase()] ?? unitName,
        tag: number ? (TAG_BY_NBR[number] ?? null) : null,
        sortOrder: Number(n.rank) || null,
      });
      this.ids.set(code, id);
    }
    return id;
  }
}

function stageFood(
  item: JsonItem,
  file: string,
  ctx: ImportContext,
  defs: Defs,
  leftOut: Map<string, number>,
): void {
  const { writer, issues } = ctx;
  const f = obj(item.value);
  const at = `${file} ${item.key}[${item.index}] (near line ${item.line})`;
  const type = str(f.dataType);
  const kind = KINDS[type];
  if (!kind) {
    leftOut.set(type || '(none)', (leftOut.get(type || '(none)') ?? 0) + 1);
    return;
  }
  const fdcId = Number(f.fdcId);
  const name = str(f.description);
  if (!Number.isInteger(fdcId) || fdcId <= 0 || !name) {
    issues.skip(file, item.line, ImportCodes.rowMissing, `${at}: fdcId or description missing`);
    return;
  }
  const ingredients = str(f.ingredients) || null;
  const scan = ingredients ? scanIngredients(ingredients, 'en') : null;
  const size = parseNumberField(str(f.servingSize));
  const unit = str(f.servingSizeUnit).toLowerCase();
  const amount = size.ok && size.value !== null && size.value > 0 ? size.value : null;
  const servingG = amount !== null && (unit === 'g' || unit === 'grm') ? amount : null;
  const servingMl = amount !== null && (unit === 'ml' || unit === 'mlt') ? amount : null;
  const household = str(f.householdServingFullText);
  const ndb = str(f.ndbNumber);
  const id = writer.addFood(
    {
      code: String(fdcId),
      name,
      altNames: [...new Set([str(f.brandName), str(f.brandOwner)].filter(Boolean))],
      group: str(obj(f.foodCategory).description) || str(f.brandedFoodCategory) || null,
      kind,
      brandOwner: str(f.brandOwner) || null,
      gtin: str(f.gtinUpc) || null,
      ingredients,
      ingredientsLang: ingredients ? 'en' : null,
      servingG,
      servingMl,
      servingText: household || (amount !== null ? `${amount} ${unit}` : null),
      additiveScan: scan?.scan ?? null,
      additiveScanVersion: scan?.version ?? null,
      ndbNumber: /^\d+$/.test(ndb) ? ndb.padStart(5, '0') : null,
    },
    fdcId,
  );
  if (id === null) {
    issues.skip(file, item.line, ImportCodes.rowDuplicate, `${at}: fdcId ${fdcId} again`);
    return;
  }
  stageValues(f, fdcId, at, file, item.line, ctx, defs);
  let seq = 0;
  for (const p of arr(f.foodPortions).map(obj)) {
    const grams = parseNumberField(str(p.gramWeight));
    if (!grams.ok || grams.value === null || grams.value <= 0) continue;
    const unitName = str(obj(p.measureUnit).name);
    const text =
      str(p.portionDescription) ||
      [unitName !== 'undetermined' ? unitName : '', str(p.modifier)].filter(Boolean).join(' ') ||
      'portion';
    const count = parseNumberField(str(p.amount) || str(p.value));
    writer.addPortion(
      fdcId,
      Number(p.sequenceNumber) || ++seq,
      count.ok && count.value ? count.value : 1,
      text,
      grams.value,
    );
  }
  if (servingG !== null) writer.addPortion(fdcId, 0, 1, household || 'serving', servingG);
  ctx.progress.rows++;
}

function stageValues(
  f: Obj,
  fdcId: number,
  at: string,
  file: string,
  line: number,
  ctx: ImportContext,
  defs: Defs,
): void {
  const { writer, issues } = ctx;
  for (const fnRaw of arr(f.foodNutrients)) {
    const fn = obj(fnRaw);
    const defId = defs.id(obj(fn.nutrient));
    if (defId === null) continue;
    if (fn.amount === undefined || fn.amount === null) continue; // no value given
    const v = parseNumberField(str(fn.amount));
    if (!v.ok || v.value === null) {
      issues.report(
        file,
        line,
        v.ok ? ImportCodes.rowMissing : v.code,
        `${at}: ${str(obj(fn.nutrient).name)} ${v.ok ? 'is empty' : v.reason}: value left out`,
      );
      continue;
    }
    const deriv = obj(fn.foodNutrientDerivation);
    writer.addValue(
      fdcId,
      defId,
      v.value,
      str(deriv.code) || null,
      str(obj(deriv.foodNutrientSource).code) || null,
      file,
      line,
    );
  }
}

async function readAll(entry: SetEntry, ctx: ImportContext): Promise<void> {
  const file = entry.name;
  ctx.progress.setFile(file);
  const defs = new Defs(ctx.writer);
  const leftOut = new Map<string, number>();
  ctx.writer.onDuplicateValue = (f, line) =>
    ctx.issues.skip(f, line, ImportCodes.rowDuplicate, `${f} near line ${line}: a nutrient twice`);
  let seen = 0;
  for await (const batch of readJsonArrays(await entry.open(ctx.progress.bytes), file)) {
    for (const item of batch) {
      seen++;
      stageFood(item, file, ctx, defs, leftOut);
    }
  }
  report(file, seen, leftOut, ctx.issues);
  if (ctx.progress.rows === 0) {
    throw structural(
      file,
      null,
      ImportCodes.empty,
      `${file} has no foods of the types ${Object.keys(KINDS).join(', ')} (is it an FDC JSON download?)`,
    );
  }
}

function report(file: string, seen: number, leftOut: Map<string, number>, issues: IssueLog) {
  for (const [type, n] of leftOut) {
    issues.notes.push(`${n} of ${seen} items in ${file} of data type '${type}' were left out`);
  }
}

/** USDA FoodData Central JSON downloads (Foundation, SR Legacy, Branded, FNDDS). */
export const fdcJson: Importer = {
  format: 'fdc-json',
  title: 'USDA FoodData Central JSON download',
  where:
    'USDA FoodData Central "Download Datasets" page: a JSON download (Foundation, SR Legacy, Branded), public domain',
  pathHint: 'the .json file, or the .zip of one JSON download',
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'fdc-json',
      name: 'USDA FoodData Central',
      release: options.release ?? (path ? basename(path).replace(/\.(zip|json)$/i, '') : ''),
      licence: 'Public domain (U.S. Government work), CC0 1.0',
      url: 'https://fdc.nal.usda.gov/download-datasets',
    };
    let set: FileSet;
    let entry: SetEntry;
    try {
      if (!path) throw structural('(none)', null, ImportCodes.notFound, 'fdc-json needs a path');
      set = await openFileSet(path, options.limits);
      const json = set.entries.filter((e) => /\.json(\.gz)?$/i.test(e.name));
      if (json.length !== 1 || !json[0]) {
        throw structural(
          path,
          null,
          ImportCodes.missingFile,
          `${path}: give one FDC JSON download (.json, or a .zip holding one .json); found ${json.length} .json files`,
        );
      }
      entry = json[0];
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
