import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { scanIngredients } from './additive-scan.js';
import { readCsv, type CsvRow } from './csv.js';
import { openFileSet, requireEntry, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField, structural, type IssueLog } from './issues.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';
import type { SourceWriter } from './writer.js';

/** FDC data types that are foods a person eats; the others are laboratory sample records. */
const FOOD_TYPES: Record<string, 'generic' | 'branded'> = {
  branded_food: 'branded',
  foundation_food: 'generic',
  sr_legacy_food: 'generic',
  survey_fndds_food: 'generic',
};

/** SR nutrient numbers (FDC `nutrient_nbr`) of the per-100 g columns (SR28 NUTR_DEF tagnames). */
export const TAG_BY_NBR: Record<string, string> = {
  '203': 'PROCNT',
  '208': 'ENERC_KCAL',
  '268': 'ENERC_KJ',
  '255': 'WATER',
  '301': 'CA',
  '305': 'P',
  '306': 'K',
  '307': 'NA',
  '957': 'ENERC_KCAL_ATWATER_GENERAL',
  '958': 'ENERC_KCAL_ATWATER_SPECIFIC',
};
export const UNITS: Record<string, string> = {
  G: 'g',
  MG: 'mg',
  UG: 'µg',
  KCAL: 'kcal',
  KJ: 'kJ',
  IU: 'IU',
};

const REQUIRED_FILES = ['food.csv', 'nutrient.csv', 'food_nutrient.csv'];

export function nbr(text: string): string {
  const t = text.trim();
  return /^\d+\.0+$/.test(t) ? t.replace(/\.0+$/, '') : t;
}

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const rowsOf = async function* (
    baseName: string,
    required: string[],
    optional = false,
    wanted: Record<string, string> = {},
  ) {
    const e = optional ? set.find(baseName) : requireEntry(set, baseName);
    if (!e) return;
    progress.setFile(e.name);
    const stream = await e.open(progress.bytes);
    let checked = false;
    for await (const batch of readCsv(stream, {
      file: e.name,
      delimiter: ',',
      quoted: true,
      required,
      issues,
      requireRows: !optional,
    })) {
      if (!checked && batch[0]) {
        checked = true;
        reportAbsentColumns(e.name, batch[0].header, wanted, issues);
      }
      for (const row of batch) yield { row, file: e.name, at: `${e.name} line ${row.line}` };
    }
  };
  const small = async (baseName: string, key: string, value: string) => {
    const m = new Map<string, string>();
    for await (const { row } of rowsOf(baseName, [key, value], true))
      m.set(row.get(key), row.get(value));
    return m;
  };

  // Lookup tables first (all small).
  const categories = await small('food_category.csv', 'id', 'description');
  for (const [k, v] of await small(
    'wweia_food_category.csv',
    'wweia_food_category',
    'wweia_food_category_description',
  ))
    categories.set(k, v);
  const units = await small('measure_unit.csv', 'id', 'name');
  const sourceCodes = await small('food_nutrient_source.csv', 'id', 'code');
  const derivations = new Map<string, { code: string; source: string | null }>();
  for await (const { row } of rowsOf('food_nutrient_derivation.csv', ['id', 'code'], true)) {
    derivations.set(row.get('id'), {
      code: row.get('code'),
      source: sourceCodes.get(row.get('source_id')) ?? null,
    });
  }

  const defs = new Map<string, number>();
  const usedCodes = new Set<string>();
  for await (const { row, file, at } of rowsOf('nutrient.csv', ['id', 'name', 'unit_name'])) {
    const id = row.get('id').trim();
    const number = nbr(row.get('nutrient_nbr'));
    if (!/^\d+$/.test(id)) {
      issues.skip(
        file,
        row.line,
        ImportCodes.rowNumber,
        `${at}: nutrient id '${id}' is not a number`,
      );
      continue;
    }
    if (defs.has(id)) {
      issues.skip(file, row.line, ImportCodes.rowDuplicate, `${at}: nutrient id ${id} again`);
      continue;
    }
    // Codes follow SR numbering where FDC gives one, so SR28 and FDC values line up.
    const code = number && !usedCodes.has(number) ? number : `fdc-${id}`;
    usedCodes.add(code);
    const unitName = row.get('unit_name').trim();
    defs.set(
      id,
      writer.defineNutrient({
        code,
        name: row.get('name').trim(),
        unit: UNITS[unitName.toUpperCase()] ?? unitName,
        tag: code === number ? (TAG_BY_NBR[number] ?? null) : null,
        sortOrder: Number(row.get('rank')) || null,
      }),
    );
  }

  // Each food is staged under its fdc_id, so later files find it in SQL, not in a map.
  let foodCount = 0;
  const leftOut = new Map<string, number>();
  for await (const { row, file, at } of rowsOf('food.csv', [
    'fdc_id',
    'data_type',
    'description',
  ])) {
    const fdcId = Number(row.get('fdc_id'));
    if (!Number.isInteger(fdcId) || fdcId <= 0) {
      issues.skip(
        file,
        row.line,
        ImportCodes.rowNumber,
        `${at}: fdc_id '${row.get('fdc_id')}' is not a number`,
      );
      continue;
    }
    const type = row.get('data_type').trim();
    const kind = FOOD_TYPES[type];
    if (!kind) {
      leftOut.set(type, (leftOut.get(type) ?? 0) + 1);
      continue;
    }
    const name = row.get('description').trim();
    if (!name) {
      issues.skip(
        file,
        row.line,
        ImportCodes.rowMissing,
        `${at}: food ${fdcId} has no description`,
      );
      continue;
    }
    const cat = row.get('food_category_id').trim();
    const id = writer.addFood(
      {
        code: String(fdcId),
        name,
        altNames: [],
        group: categories.get(cat) ?? (cat && !/^\d+$/.test(cat) ? cat : null),
        kind,
      },
      fdcId,
    );
    if (id === null) {
      issues.skip(file, row.line, ImportCodes.rowDuplicate, `${at}: fdc_id ${fdcId} again`);
      continue;
    }
    progress.rows = ++foodCount;
  }
  if (foodCount === 0) {
    throw structural(
      set.label,
      null,
      ImportCodes.empty,
      `${set.label}: food.csv has no foods of the types ${Object.keys(FOOD_TYPES).join(', ')}`,
    );
  }
  for (const [type, n] of leftOut) {
    issues.notes.push(
      `${n} food.csv rows of data type '${type}' (sample records, not foods) were left out, with their values and portions`,
    );
  }

  await readNdbNumbers(rowsOf, writer, issues);
  await readBranded(rowsOf, writer, issues);

  writer.onDuplicateValue = (file, line) =>
    issues.skip(
      file,
      line,
      ImportCodes.rowDuplicate,
      `${file} line ${line}: this food has this nutrient twice`,
    );
  let outside = 0;
  for await (const { row, file, at } of rowsOf('food_nutrient.csv', [
    'fdc_id',
    'nutrient_id',
    'amount',
  ])) {
    const fdcId = Number(row.get('fdc_id'));
    if (!writer.hasFood(fdcId)) {
      if (!Number.isInteger(fdcId)) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowNumber,
          `${at}: fdc_id '${row.get('fdc_id')}' is not a number`,
        );
      } else outside++;
      continue;
    }
    const defId = defs.get(row.get('nutrient_id').trim());
    if (defId === undefined) {
      issues.skip(
        file,
        row.line,
        ImportCodes.rowUnknownNutrient,
        `${at}: no nutrient ${row.get('nutrient_id')} in nutrient.csv`,
      );
      continue;
    }
    const v = parseNumberField(row.get('amount'));
    if (!v.ok || v.value === null) {
      issues.skip(
        file,
        row.line,
        v.ok ? ImportCodes.rowMissing : v.code,
        `${at}: amount ${v.ok ? 'is empty' : v.reason}`,
      );
      continue;
    }
    const d = derivations.get(row.get('derivation_id').trim());
    writer.addValue(
      fdcId,
      defId,
      v.value,
      d?.code ?? (row.get('derivation_id').trim() || null),
      d?.source ?? null,
      file,
      row.line,
    );
  }
  if (outside > 0)
    issues.notes.push(`${outside} food_nutrient.csv rows belong to left-out sample records`);

  outside = 0;
  for await (const { row, file, at } of rowsOf(
    'food_portion.csv',
    ['fdc_id', 'gram_weight'],
    true,
    {
      portion_description: 'portion descriptions',
      modifier: 'portion modifiers',
      measure_unit_id: 'portion units',
      amount: 'portion amounts (1 assumed)',
      seq_num: 'portion order',
    },
  )) {
    const foodId = Number(row.get('fdc_id'));
    if (!writer.hasFood(foodId)) {
      outside++;
      continue;
    }
    const grams = parseNumberField(row.get('gram_weight'));
    const amount = parseNumberField(row.get('amount'));
    if (!grams.ok || grams.value === null || grams.value <= 0 || !amount.ok) {
      const why = !grams.ok
        ? grams.reason
        : !amount.ok
          ? amount.reason
          : 'gram_weight must be a positive number';
      issues.skip(file, row.line, ImportCodes.rowNumber, `${at}: ${why}`);
      continue;
    }
    const unit = units.get(row.get('measure_unit_id').trim());
    const description = portionText(row, unit);
    writer.addPortion(
      foodId,
      Number(row.get('seq_num')) || 0,
      amount.value ?? 1,
      description,
      grams.value,
    );
  }
  if (outside > 0)
    issues.notes.push(`${outside} food_portion.csv rows belong to left-out sample records`);
}

type RowsOf = (
  baseName: string,
  required: string[],
  optional?: boolean,
  wanted?: Record<string, string>,
) => AsyncGenerator<{ row: CsvRow; file: string; at: string }>;

/**
 * An optional column the file's header lacks (an older or newer release) is said once, in the
 * notes, with what is left empty: never read as empty values without a word.
 */
function reportAbsentColumns(
  file: string,
  header: readonly string[],
  wanted: Record<string, string>,
  issues: IssueLog,
): void {
  const absent = Object.keys(wanted).filter((c) => !header.includes(c));
  if (absent.length === 0) return;
  issues.notes.push(
    `${file} has no column${absent.length > 1 ? 's' : ''} ${absent.join(', ')} (this release's layout): ${absent.map((c) => wanted[c]).join(', ')} left empty for every food`,
  );
}

/** SR28 NDB numbers of SR Legacy and Foundation foods, so two releases' foods can be linked. */
async function readNdbNumbers(rowsOf: RowsOf, writer: SourceWriter, issues: IssueLog) {
  for (const name of ['sr_legacy_food.csv', 'foundation_food.csv']) {
    for await (const { row, file, at } of rowsOf(name, ['fdc_id', 'NDB_number'], true)) {
      const fdcId = Number(row.get('fdc_id'));
      const ndb = row.get('NDB_number').trim();
      if (!ndb) continue;
      if (!/^\d+$/.test(ndb)) {
        issues.report(
          file,
          row.line,
          ImportCodes.rowNumber,
          `${at}: NDB_number '${ndb}' is not a number: not kept`,
        );
        continue;
      }
      // SR28 writes NDB numbers with 5 digits ('01001'); FDC drops the leading zeros.
      if (writer.hasFood(fdcId)) writer.updateFood(fdcId, { ndbNumber: ndb.padStart(5, '0') });
    }
  }
}

/** The label data of Branded foods (branded_food.csv). */
async function readBranded(rowsOf: RowsOf, writer: SourceWriter, issues: IssueLog) {
  for await (const { row, file, at } of rowsOf(
    'branded_food.csv',
    ['fdc_id', 'brand_owner', 'gtin_upc', 'ingredients'],
    true,
    {
      serving_size: 'serving sizes',
      serving_size_unit: 'serving units',
      household_serving_fulltext: 'household servings',
      branded_food_category: 'categories',
      brand_name: 'brand names',
      subbrand_name: 'sub-brand names',
    },
  )) {
    const fdcId = Number(row.get('fdc_id'));
    if (!writer.hasFood(fdcId)) {
      issues.skip(
        file,
        row.line,
        ImportCodes.rowUnknownFood,
        `${at}: no branded food ${row.get('fdc_id')} in food.csv`,
      );
      continue;
    }
    const size = parseNumberField(row.get('serving_size'));
    const unit = row.get('serving_size_unit').trim().toLowerCase();
    const amount = size.ok && size.value !== null && size.value > 0 ? size.value : null;
    // FDC units: 'g'/'GRM' grams, 'ml'/'MLT' millilitres. A volume stays a volume.
    const servingG = amount !== null && (unit === 'g' || unit === 'grm') ? amount : null;
    const servingMl = amount !== null && (unit === 'ml' || unit === 'mlt') ? amount : null;
    const ingredients = row.get('ingredients').trim() || null;
    // The Branded Foods set is the US label data: ingredient statements are in English.
    const scan = ingredients ? scanIngredients(ingredients, 'en') : null;
    const alt = [row.get('brand_name'), row.get('subbrand_name'), row.get('brand_owner')]
      .map((s) => s.trim())
      .filter(Boolean);
    const gtin = row.get('gtin_upc').trim();
    const household = row.get('household_serving_fulltext').trim();
    const category = row.get('branded_food_category').trim();
    writer.updateFood(fdcId, {
      brandOwner: row.get('brand_owner').trim() || null,
      gtin: gtin || null,
      ingredients,
      ingredientsLang: ingredients ? 'en' : null,
      servingG,
      servingMl,
      servingText: household || (amount !== null ? `${amount} ${unit}` : null),
      ...(category ? { group: category } : {}),
      altNames: [...new Set(alt)],
      additiveScan: scan?.scan ?? null,
      additiveScanVersion: scan?.version ?? null,
    });
    if (servingG !== null) writer.addPortion(fdcId, 1, 1, household || 'serving', servingG);
  }
}

function portionText(row: CsvRow, unit: string | undefined): string {
  const desc = row.get('portion_description').trim();
  if (desc && desc !== 'Quantity not specified') return desc;
  const modifier = row.get('modifier').trim();
  const u = unit && unit !== 'undetermined' ? unit : '';
  if (u && modifier.toLowerCase().startsWith(u.toLowerCase())) return modifier;
  return [u, modifier].filter(Boolean).join(' ') || desc || 'portion';
}

/** USDA FoodData Central CSV downloads (SR Legacy, Foundation, Survey (FNDDS), Branded). */
export const fdcCsv: Importer = {
  format: 'fdc-csv',
  title: 'USDA FoodData Central CSV download',
  where:
    'USDA FoodData Central "Download Datasets" page: any CSV download (Branded, Foundation, SR Legacy, FNDDS), public domain',
  pathHint: 'the unpacked folder or the .zip of one CSV download',
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'fdc-csv',
      name: 'USDA FoodData Central',
      release: options.release ?? (path ? basename(path).replace(/\.zip$/i, '') : ''),
      licence: 'Public domain (U.S. Government work), CC0 1.0',
      url: 'https://fdc.nal.usda.gov/download-datasets',
    };
    let set: FileSet;
    try {
      if (!path) throw structural('(none)', null, ImportCodes.notFound, 'fdc-csv needs a path');
      set = await openFileSet(path, options.limits);
      for (const f of REQUIRED_FILES) requireEntry(set, f);
    } catch (err) {
      return failedBeforeStart(meta.format, err);
    }
    const input = set.entries.filter((e) => /\.csv(\.gz)?$/i.test(e.name));
    try {
      return await runImport(db, meta, options, input, (ctx) => readAll(set, ctx));
    } finally {
      set.close();
    }
  },
};
