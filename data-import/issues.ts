import { MAX_REPORTED_ISSUES, type ImportIssue } from './importer.js';

/** Stable codes of import problems (never reused). */
export const ImportCodes = {
  notFound: 'PHL_IMPORT_PATH_NOT_FOUND',
  missingFile: 'PHL_IMPORT_FILE_MISSING',
  encoding: 'PHL_IMPORT_ENCODING',
  columns: 'PHL_IMPORT_COLUMNS',
  delimiter: 'PHL_IMPORT_DELIMITER',
  truncated: 'PHL_IMPORT_TRUNCATED',
  empty: 'PHL_IMPORT_NO_ROWS',
  badZip: 'PHL_IMPORT_ZIP',
  database: 'PHL_IMPORT_DATABASE',
  rowFields: 'PHL_IMPORT_ROW_FIELDS',
  rowNumber: 'PHL_IMPORT_ROW_NUMBER',
  rowNegative: 'PHL_IMPORT_ROW_NEGATIVE',
  rowDuplicate: 'PHL_IMPORT_ROW_DUPLICATE',
  rowUnknownFood: 'PHL_IMPORT_ROW_UNKNOWN_FOOD',
  rowUnknownNutrient: 'PHL_IMPORT_ROW_UNKNOWN_NUTRIENT',
  rowMissing: 'PHL_IMPORT_ROW_MISSING_FIELD',
  rowQuote: 'PHL_IMPORT_ROW_QUOTES',
} as const;

/** A structural problem: the import stops, rolls back and reports this. */
export class StructuralError extends Error {
  constructor(readonly issue: ImportIssue) {
    super(issue.message);
    this.name = 'StructuralError';
  }
}

export function structural(
  file: string,
  line: number | null,
  code: string,
  message: string,
): StructuralError {
  return new StructuralError({ file, line, code, message });
}

/** Collects row problems: every one is counted, the first MAX_REPORTED_ISSUES are kept. */
export class IssueLog {
  readonly issues: ImportIssue[] = [];
  count = 0;
  /** Rows left out because of a problem. */
  skippedRows = 0;
  readonly notes: string[] = [];

  /** The kept issues by file (in the order files were first seen) and line. */
  sorted(): ImportIssue[] {
    const fileOrder = new Map<string, number>();
    for (const i of this.issues) if (!fileOrder.has(i.file)) fileOrder.set(i.file, fileOrder.size);
    return [...this.issues].sort(
      (a, b) =>
        (fileOrder.get(a.file) ?? 0) - (fileOrder.get(b.file) ?? 0) ||
        (a.line ?? 0) - (b.line ?? 0),
    );
  }

  /** Reports a row that is left out. */
  skip(file: string, line: number | null, code: string, message: string): void {
    this.skippedRows++;
    this.report(file, line, code, message);
  }

  /** Reports a problem in a row that is still imported (e.g. one bad value dropped). */
  report(file: string, line: number | null, code: string, message: string): void {
    this.count++;
    if (this.issues.length < MAX_REPORTED_ISSUES) this.issues.push({ file, line, code, message });
  }
}

/**
 * Parses a number field: '' is "no value" (null); anything else must be a finite number.
 * Returns an error text instead of throwing.
 */
export function parseNumberField(
  text: string | undefined,
  opts: { allowNegative?: boolean } = {},
): { ok: true; value: number | null } | { ok: false; reason: string; code: string } {
  const t = (text ?? '').trim();
  if (t === '') return { ok: true, value: null };
  // Number('') / Number(' ') are 0 and Number('0x10') is 16: accept plain decimals only.
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t)) {
    return { ok: false, code: ImportCodes.rowNumber, reason: `'${t}' is not a number` };
  }
  const value = Number(t);
  if (!Number.isFinite(value)) {
    return { ok: false, code: ImportCodes.rowNumber, reason: `'${t}' is not a finite number` };
  }
  if (value < 0 && !opts.allowNegative) {
    return { ok: false, code: ImportCodes.rowNegative, reason: `'${t}' is negative` };
  }
  return { ok: true, value };
}
