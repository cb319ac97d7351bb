import type { Db } from '../src/db/database.js';
import { readCaretFile } from './caret.js';
import { openFileSet, requireEntry, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField, structural } from './issues.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

// Field counts per file, from the SR28 documentation (sr28_doc.pdf, chapter 2).
const FIELDS = { FD_GROUP: 2, NUTR_DEF: 6, FOOD_DES: 14, WEIGHT: 7, NUT_DATA: 18 } as const;
const FILES = Object.keys(FIELDS).map((f) => `${f}.txt`);

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const entry = (name: keyof typeof FIELDS) => requireEntry(set, `${name}.txt`);
  const rows = async (
    name: keyof typeof FIELDS,
    want: number[] | undefined,
    onRow: (f: string[], line: number, file: string) => void,
  ) => {
    const e = entry(name);
    progress.setFile(e.name);
    const stream = await e.open(progress.bytes);
    await readCaretFile(stream, e.name, FIELDS[name], issues, undefined, want, (f, line) =>
      onRow(f, line, e.name),
    );
  };

  const groups = new Map<string, string>();
  await rows('FD_GROUP', undefined, (f) => groups.set(f[0] as string, f[1] as string));

  const defs = new Map<string, number>();
  await rows('NUTR_DEF', undefined, (f, line, file) => {
    const [code, unit, tag, name, , order] = f as [string, string, string, string, string, string];
    if (defs.has(code)) {
      issues.skip(
        file,
        line,
        ImportCodes.rowDuplicate,
        `${file} line ${line}: nutrient ${code} again`,
      );
      return;
    }
    const sortOrder = Number(order) || null;
    defs.set(code, writer.defineNutrient({ code, name, unit, tag: tag || null, sortOrder }));
  });

  const foods = new Map<string, number>();
  await rows('FOOD_DES', undefined, (f, line, file) => {
    const [ndb, group, longDesc, , comName, manufacturer, , , , sciName] = f as string[];
    if (!ndb || !longDesc) {
      issues.skip(
        file,
        line,
        ImportCodes.rowMissing,
        `${file} line ${line}: NDB_No or Long_Desc is empty`,
      );
      return;
    }
    const alt = [...(comName ?? '').split(','), sciName ?? '']
      .map((s) => s.trim())
      .filter((s) => s.length > 0);
    const id = writer.addFood({
      code: ndb,
      name: longDesc,
      altNames: [...new Set(alt)],
      group: groups.get(group ?? '') ?? null,
      kind: 'generic',
      brandOwner: manufacturer || null,
      ndbNumber: ndb,
    });
    if (id === null) {
      issues.skip(
        file,
        line,
        ImportCodes.rowDuplicate,
        `${file} line ${line}: NDB_No ${ndb} again`,
      );
      return;
    }
    foods.set(ndb, id);
    progress.rows = foods.size;
  });
  if (foods.size === 0) {
    const file = entry('FOOD_DES').name;
    throw structural(file, null, ImportCodes.empty, `${file} has no foods`);
  }

  await rows('WEIGHT', undefined, (f, line, file) => {
    const [ndb, seq, amountText, desc, gramsText] = f as string[];
    const foodId = foods.get(ndb ?? '');
    if (foodId === undefined) {
      issues.skip(
        file,
        line,
        ImportCodes.rowUnknownFood,
        `${file} line ${line}: no food ${ndb} in FOOD_DES`,
      );
      return;
    }
    const amount = parseNumberField(amountText);
    const grams = parseNumberField(gramsText);
    if (!amount.ok || !grams.ok) {
      const bad = !amount.ok ? amount : (grams as { reason: string; code: string });
      issues.skip(file, line, bad.code, `${file} line ${line}: ${bad.reason}`);
      return;
    }
    if (amount.value === null || grams.value === null || grams.value <= 0 || amount.value <= 0) {
      issues.skip(
        file,
        line,
        ImportCodes.rowMissing,
        `${file} line ${line}: Amount and Gm_Wgt must be positive numbers`,
      );
      return;
    }
    writer.addPortion(foodId, Number(seq) || 0, amount.value, desc ?? '', grams.value);
  });

  writer.onDuplicateValue = (file, line) =>
    issues.skip(
      file,
      line,
      ImportCodes.rowDuplicate,
      `${file} line ${line}: this food has this nutrient twice`,
    );
  const plain = /^\d+(\.\d+)?$/;
  await rows('NUT_DATA', [0, 1, 2, 5, 6], (f, line, file) => {
    const ndb = f[0] as string;
    const nutr = f[1] as string;
    const valText = f[2] as string;
    const foodId = foods.get(ndb);
    if (foodId === undefined) {
      issues.skip(
        file,
        line,
        ImportCodes.rowUnknownFood,
        `${file} line ${line}: no food ${ndb} in FOOD_DES`,
      );
      return;
    }
    const defId = defs.get(nutr);
    if (defId === undefined) {
      issues.skip(
        file,
        line,
        ImportCodes.rowUnknownNutrient,
        `${file} line ${line}: no nutrient ${nutr} in NUTR_DEF`,
      );
      return;
    }
    if (!plain.test(valText)) {
      const p = parseNumberField(valText);
      const reason = p.ok ? (p.value === null ? 'Nutr_Val is empty' : null) : p.reason;
      if (reason !== null || !p.ok) {
        issues.skip(
          file,
          line,
          p.ok ? ImportCodes.rowMissing : p.code,
          `${file} line ${line}: ${reason}`,
        );
        return;
      }
    }
    // Src_Cd (field 6) and Deriv_Cd (field 7) are kept as the table gives them.
    writer.addValue(foodId, defId, Number(valText), f[6] || null, f[5] || null, file, line);
  });
}

/** USDA National Nutrient Database for Standard Reference, Release 28, ASCII files. */
export const usdaSr28: Importer = {
  format: 'usda-sr28',
  title: 'USDA National Nutrient Database for Standard Reference, Release 28 (ASCII)',
  where:
    'USDA Agricultural Research Service, "SR28 ASCII" download (sr28asc.zip) from the FoodData Central downloads page',
  pathHint: 'the unpacked folder or the .zip of the ASCII release',
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'usda-sr28',
      name: 'USDA National Nutrient Database for Standard Reference',
      release: options.release ?? 'SR28',
      licence: 'Public domain (U.S. Government work)',
      url: 'https://fdc.nal.usda.gov/download-datasets',
    };
    let set: FileSet;
    try {
      if (!path) throw structural('(none)', null, ImportCodes.notFound, 'usda-sr28 needs a path');
      set = await openFileSet(path, options.limits);
      for (const f of FILES) requireEntry(set, f);
    } catch (err) {
      return failedBeforeStart(meta.format, err);
    }
    const input = FILES.map((f) => set.find(f)).filter((e) => e !== undefined);
    try {
      return await runImport(db, meta, options, input, (ctx) => readAll(set, ctx));
    } finally {
      set.close();
    }
  },
};
