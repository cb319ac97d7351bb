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
  decompress: 'PHL_IMPORT_DECOMPRESS',
  unpackLimit: 'PHL_IMPORT_UNPACK_LIMIT',
  diskSpace: 'PHL_IMPORT_DISK_SPACE',
  busy: 'PHL_IMPORT_BUSY',
  rowImplausible: 'PHL_IMPORT_ROW_IMPLAUSIBLE',
  columnAbsent: 'PHL_IMPORT_COLUMN_ABSENT',
  json: 'PHL_IMPORT_JSON',
} as const;

/** Said with every error that stops an import. */
export const NOT_CHANGED = 'the database was not changed';

/**
 * A failure of the decompressor (zlib, or the zip reader) while reading `file`: the file is
 * damaged or cut short. Returns the structural error to throw, or null for other errors.
 */
export function decompressFailure(
  err: unknown,
  file: string,
  line: number | null,
): StructuralError | null {
  if (err instanceof StructuralError) return err;
  const e = err as { code?: unknown; errno?: unknown; message?: unknown };
  const code = typeof e?.code === 'string' ? e.code : '';
  const msg = typeof e?.message === 'string' ? e.message : '';
  const zlib =
    code.startsWith('Z_') ||
    /unexpected end of file|incorrect header check|invalid (stored|block|distance|code)|too many length|crc|zip/i.test(
      msg,
    );
  if (!zlib) return null;
  const why = /unexpected end/i.test(msg)
    ? 'it ends early (a cut download?)'
    : /header check/i.test(msg)
      ? 'it is not compressed data of its kind (a renamed file?)'
      : 'its compressed data is damaged';
  return structural(
    file,
    line,
    ImportCodes.decompress,
    `${file}${line !== null ? ` line ${line}` : ''}: cannot unpack: ${why} (${code || msg}); ${NOT_CHANGED}`,
  );
}

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
