import { parse } from 'csv-parse/sync';
import { z } from 'zod';

/** Whether someone who reads the language has checked a name. */
export const NAME_STATUSES = ['drafted', 'reviewed'] as const;
export type NameStatus = (typeof NAME_STATUSES)[number];

/** A handout language tag as the catalogues name them (`es`, `zh-Hans`). */
export const languageTagSchema = z
  .string()
  .regex(/^[A-Za-z]{2,3}(-[A-Za-z0-9]{2,8})*$/, 'language must be a tag like es or zh-Hans');

/** One clinic glossary entry as the API takes it. */
export const glossaryEntryInputSchema = z
  .object({
    name: z.string().trim().min(1, 'name must not be empty').max(120),
    status: z.enum(NAME_STATUSES).default('drafted'),
  })
  .strict();
export type GlossaryEntryInput = z.infer<typeof glossaryEntryInputSchema>;

/** A glossary entry with the food it names (source format and code travel between databases). */
export interface GlossaryEntry {
  foodId: number;
  foodSource: string;
  foodCode: string;
  tableName: string;
  language: string;
  name: string;
  status: NameStatus;
  /** 'clinic': kept by this clinic; 'starter': shipped starter glossary (always drafted). */
  origin: 'clinic' | 'starter';
}

/** Where a patient-facing food name came from, strongest first. */
export type NameOrigin = 'patient' | 'clinic' | 'table-language' | 'starter' | 'table';

export interface PatientFacingName {
  text: string;
  origin: NameOrigin;
  /** Shown with a mark on the handout: nobody has checked this name in the language yet. */
  drafted: boolean;
  /** Shown with a mark: the table's own (usually English) name stands in. */
  fromTable: boolean;
}

/** What is known of one food's names in one language (the service gathers it). */
export interface FoodNameSources {
  foodName: string;
  clinic?: { name: string; status: NameStatus } | null;
  /** The table's own name in the language (Open Food Facts `product_name_<lc>`). */
  tableLanguage?: string | null;
  /** The shipped starter glossary's drafted name. */
  starter?: string | null;
}

/**
 * The name a handout prints for an item: the patient's own words typed on the row, else the
 * clinic glossary, else the table's own name in the language, else the starter glossary
 * (drafted), else the table's name (marked when the handout is not in English). Pure.
 */
export function patientFacingName(
  label: string | null | undefined,
  sources: FoodNameSources,
  language: string,
): PatientFacingName {
  const own = label?.trim();
  if (own && own !== sources.foodName) {
    return { text: own, origin: 'patient', drafted: false, fromTable: false };
  }
  if (sources.clinic) {
    return {
      text: sources.clinic.name,
      origin: 'clinic',
      drafted: sources.clinic.status === 'drafted',
      fromTable: false,
    };
  }
  if (sources.tableLanguage) {
    return {
      text: sources.tableLanguage,
      origin: 'table-language',
      drafted: false,
      fromTable: false,
    };
  }
  if (sources.starter) {
    return { text: sources.starter, origin: 'starter', drafted: true, fromTable: false };
  }
  return {
    text: sources.foodName,
    origin: 'table',
    drafted: false,
    fromTable: baseLanguage(language) !== 'en',
  };
}

/** 'zh-Hans' -> 'zh', 'es-MX' -> 'es'. */
export function baseLanguage(tag: string): string {
  return (tag.split('-')[0] ?? tag).toLowerCase();
}

/** The glossary's CSV columns (the product's own file format, "phosledger food names"). */
export const GLOSSARY_CSV_COLUMNS = [
  'food_source',
  'food_code',
  'language',
  'name',
  'status',
  'table_name',
] as const;

/** One row of a glossary CSV as read (the food is found by source format and code). */
export interface GlossaryCsvRow {
  line: number;
  foodSource: string;
  foodCode: string;
  language: string;
  name: string;
  status: NameStatus;
}

export interface GlossaryCsvIssue {
  line: number;
  message: string;
}

export type GlossaryCsvResult =
  { ok: true; value: GlossaryCsvRow[] } | { ok: false; issues: GlossaryCsvIssue[] };

function csvCell(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

/** Writes entries as the glossary CSV (UTF-8, comma, header line first). Pure. */
export function glossaryToCsv(entries: readonly GlossaryEntry[]): string {
  const lines = [GLOSSARY_CSV_COLUMNS.join(',')];
  for (const e of entries) {
    lines.push(
      [e.foodSource, e.foodCode, e.language, e.name, e.status, e.tableName].map(csvCell).join(','),
    );
  }
  return `${lines.join('\r\n')}\r\n`;
}

/**
 * Reads a glossary CSV (header line naming at least food_source, food_code, language, name;
 * status defaults to drafted). Every bad line is reported with its number; nothing is returned
 * unless every line is good. `languages` are the handout languages the clinic has. Pure.
 */
export function parseGlossaryCsv(
  text: string,
  languages: readonly string[],
  maxRows = 20_000,
): GlossaryCsvResult {
  let records: string[][];
  try {
    records = parse(text.replace(/^\uFEFF/, ''), {
      relax_column_count: true,
      skip_empty_lines: true,
    }) as string[][];
  } catch (err) {
    return {
      ok: false,
      issues: [{ line: 0, message: `not a CSV file: ${(err as Error).message}` }],
    };
  }
  const header = (records[0] ?? []).map((h) => h.trim().toLowerCase());
  const missing = ['food_source', 'food_code', 'language', 'name'].filter(
    (c) => !header.includes(c),
  );
  if (missing.length > 0) {
    return {
      ok: false,
      issues: [{ line: 1, message: `the header line lacks the column(s) ${missing.join(', ')}` }],
    };
  }
  if (records.length - 1 > maxRows) {
    return {
      ok: false,
      issues: [{ line: 0, message: `${records.length - 1} rows: at most ${maxRows} in one file` }],
    };
  }
  const col = (r: string[], name: string) => (r[header.indexOf(name)] ?? '').trim();
  const byLower = new Map(languages.map((l) => [l.toLowerCase(), l]));
  const rows: GlossaryCsvRow[] = [];
  const issues: GlossaryCsvIssue[] = [];
  const seen = new Map<string, number>();
  records.slice(1).forEach((r, i) => {
    const line = i + 2;
    const language = byLower.get(col(r, 'language').toLowerCase());
    const name = col(r, 'name');
    const status = header.includes('status') ? col(r, 'status') || 'drafted' : 'drafted';
    const problems: string[] = [];
    if (!col(r, 'food_source') || !col(r, 'food_code'))
      problems.push('food_source and food_code are required');
    if (!language)
      problems.push(
        `language '${col(r, 'language')}' is not a handout language (${languages.join(', ')})`,
      );
    if (!name) problems.push('name is empty');
    else if (name.length > 120) problems.push(`name is ${name.length} characters (at most 120)`);
    if (!(NAME_STATUSES as readonly string[]).includes(status))
      problems.push(`status '${status}' must be drafted or reviewed`);
    const key = `${col(r, 'food_source')}|${col(r, 'food_code')}|${language}`;
    const earlier = seen.get(key);
    if (earlier !== undefined && language)
      problems.push(`the same food and language as line ${earlier}`);
    seen.set(key, line);
    if (problems.length > 0) {
      issues.push({ line, message: problems.join('; ') });
      return;
    }
    rows.push({
      line,
      foodSource: col(r, 'food_source'),
      foodCode: col(r, 'food_code'),
      language: language as string,
      name,
      status: status as NameStatus,
    });
  });
  return issues.length > 0 ? { ok: false, issues } : { ok: true, value: rows };
}
