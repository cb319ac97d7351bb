import { basename } from 'node:path';
import type { Db } from '../src/db/database.js';
import { scanIngredients } from './additive-scan.js';
import { readCsv, type CsvRow } from './csv.js';
import { openFileSet, requireEntry, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField, structural } from './issues.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

/** FDC data types that are foods a person eats; the others are laboratory sample records. */
const FOOD_TYPES: Record<string, 'generic' | 'branded'> = {
  branded_food: 'branded',
  foundation_food: 'generic',
  sr_legacy_food: 'generic',
  survey_fndds_food: 'generic',
};

/** SR nutrient numbers (FDC `nutrient_nbr`) of the per-100 g columns (SR28 NUTR_DEF tagnames). */
const TAG_BY_NBR: Record<string, string> = {
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
const UNITS: Record<string, string> = {
  G: 'g',
  MG: 'mg',
  UG: 'µg',
  KCAL: 'kcal',
  KJ: 'kJ',
  IU: 'IU',
};

const REQUIRED_FILES = ['food.csv', 'nutrient.csv', 'food_nutrient.csv'];

function nbr(text: string): string {
  const t = text.trim();
  return /^\d+\.0+$/.test(t) ? t.replace(/\.0+$/, '') : t;
}

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const rowsOf = async function* (baseName: string, required: string[], optional = false) {
    const e = optional ? set.find(baseName) : requireEntry(set, baseName);
    if (!e) return;
    progress.setFile(e.name);
    const stream = await e.open();
    for await (const batch of readCsv(stream, {
      file: e.name,
      delimiter: ',',
      quoted: true,
      required,
      issues,
      onBytes: progress.bytes,
      requireRows: !optional,
    })) {
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

  const foods = new Map<number, number>();
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
    const id = writer.addFood({
      code: String(fdcId),
      name,
      altNames: [],
      group: categories.get(cat) ?? (cat && !/^\d+$/.test(cat) ? cat : null),
      kind,
    });
    if (id === null) {
      issues.skip(file, row.line, ImportCodes.rowDuplicate, `${at}: fdc_id ${fdcId} again`);
      continue;
    }
    foods.set(fdcId, id);
    progress.rows = foods.size;
  }
  if (foods.size === 0) {
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

  const branded = writer.prepare(
    `update food set brand_owner = ?, gtin = ?, ingredients = ?, ingredients_lang = ?, serving_g = ?,
       serving_text = ?, food_group = coalesce(?, food_group), alt_names = ?, additive_scan = ?,
       additive_scan_version = ? where id = ?`,
  );
  for await (const { row, file, at } of rowsOf(
    'branded_food.csv',
    ['fdc_id', 'brand_owner', 'gtin_upc', 'ingredients'],
    true,
  )) {
    const foodId = foods.get(Number(row.get('fdc_id')));
    if (foodId === undefined) {
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
    const servingG =
      size.ok && size.value !== null && size.value > 0 && (unit === 'g' || unit === 'grm')
        ? size.value
        : null;
    const ingredients = row.get('ingredients').trim() || null;
    // The Branded Foods set is the US label data: ingredient statements are in English.
    const scan = ingredients ? scanIngredients(ingredients, 'en') : null;
    const alt = [row.get('brand_name'), row.get('subbrand_name'), row.get('brand_owner')]
      .map((s) => s.trim())
      .filter(Boolean);
    const gtin = row.get('gtin_upc').trim();
    const household = row.get('household_serving_fulltext').trim();
    branded.run(
      row.get('brand_owner').trim() || null,
      gtin || null,
      ingredients,
      ingredients ? 'en' : null,
      servingG,
      household || (size.ok && size.value !== null ? `${size.value} ${unit}` : null),
      row.get('branded_food_category').trim() || null,
      JSON.stringify([...new Set(alt)]),
      scan?.scan ?? null,
      scan?.version ?? null,
      foodId,
    );
    if (servingG !== null) writer.addPortion(foodId, 1, 1, household || 'serving', servingG);
  }

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
    const foodId = foods.get(fdcId);
    if (foodId === undefined) {
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
      foodId,
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
  )) {
    const foodId = foods.get(Number(row.get('fdc_id')));
    if (foodId === undefined) {
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
      set = await openFileSet(path);
      for (const f of REQUIRED_FILES) requireEntry(set, f);
    } catch (err) {
      return failedBeforeStart(meta.format, err);
    }
    const total = set.entries
      .filter((e) => e.name.endsWith('.csv'))
      .reduce((n, e) => n + e.size, 0);
    try {
      return await runImport(db, meta, options, total, (ctx) => readAll(set, ctx));
    } finally {
      set.close();
    }
  },
};
