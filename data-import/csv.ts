import { parse, type CsvError } from 'csv-parse';
import type { Readable } from 'node:stream';
import { decodeText } from './decode.js';
import { ImportCodes, StructuralError, structural, type IssueLog } from './issues.js';

export interface CsvRow {
  /** Fields by header name (missing trailing fields are ''). */
  get(column: string): string;
  fields: string[];
  /** Column keys and the header cells as written (shared by every row of the file). */
  header: readonly string[];
  rawHeader: readonly string[];
  /** 1-based line where the record ends (a quoted field may span lines). */
  line: number;
}

export interface CsvOptions {
  file: string;
  delimiter: ',' | '\t';
  /** false for formats that never quote (the Open Food Facts export). */
  quoted: boolean;
  required: readonly string[];
  issues: IssueLog;
  onBytes?: (n: number) => void;
  /** Turns a header cell into the column's key (default: trimmed text). */
  columnKey?: (header: string) => string;
  /** A header-only file stops the import (true) or is fine (false: optional side files). */
  requireRows?: boolean;
}

const delimiterName = (d: string) => (d === '\t' ? 'tab' : d === ',' ? 'comma' : `'${d}'`);

/**
 * Streams a delimited UTF-8 file in batches of rows. The header is checked first (wrong
 * delimiter, missing columns); a row with the wrong number of fields or broken quotes is
 * reported and skipped; a file that ends inside a record is a structural error (truncated).
 */
export async function* readCsv(stream: Readable, opts: CsvOptions): AsyncGenerator<CsvRow[]> {
  const { file, issues } = opts;
  const parser = parse({
    delimiter: opts.delimiter,
    quote: opts.quoted ? '"' : false,
    relax_column_count: true,
    skip_records_with_error: true,
    skip_empty_lines: true,
    bom: true,
    info: true,
    max_record_size: 8 << 20,
  });
  let failure: Error | null = null;
  parser.on('error', (e: Error) => {
    failure = e;
  });
  parser.on('skip', (e: CsvError) => {
    const line = typeof e.lines === 'number' ? e.lines : null;
    if (!header) {
      // The header itself does not parse: most often another separator around quoted names.
      failure = headerFailure(firstLine, opts, e.message);
      return;
    }
    if (e.code === 'CSV_QUOTE_NOT_CLOSED') {
      failure = e; // only ever at the end of the input: the file is cut short
      return;
    }
    issues.skip(file, line, ImportCodes.rowQuote, `${file} line ${line}: ${e.message}`);
  });
  let header: string[] | null = null;
  let firstLine: string | null = null;
  let rawHeader: string[] = [];
  let index = new Map<string, number>();
  let rows = 0;
  let lastRow: { fields: string[]; line: number } | null = null;
  let endsWithNewline = true;

  const handle = (item: { record: string[]; info: { lines: number } }, out: CsvRow[]) => {
    const { record, info } = item;
    if (!header) {
      rawHeader = record.map((h) => h.trim());
      header = rawHeader.map((h) => (opts.columnKey ? opts.columnKey(h) : h));
      index = new Map(header.map((h, i) => [h, i]));
      checkHeader(header, opts);
      return;
    }
    if (lastRow) out.push(...finishRow(lastRow));
    lastRow = { fields: record, line: info.lines };
  };
  const take = (): CsvRow[] => {
    const out: CsvRow[] = [];
    for (;;) {
      const item = parser.read() as { record: string[]; info: { lines: number } } | null;
      if (item === null) break;
      handle(item, out);
    }
    return out;
  };
  // A row is kept back one step so the last row can be judged against the file's end.
  const finishRow = (r: { fields: string[]; line: number }): CsvRow[] => {
    const h = header as string[];
    if (r.fields.length !== h.length) {
      issues.skip(
        file,
        r.line,
        ImportCodes.rowFields,
        `${file} line ${r.line}: ${r.fields.length} fields, the header has ${h.length}`,
      );
      return [];
    }
    rows++;
    const fields = r.fields;
    return [
      { fields, header: h, rawHeader, line: r.line, get: (c) => fields[index.get(c) ?? -1] ?? '' },
    ];
  };

  for await (const text of decodeText(stream, file, 'utf-8', opts.onBytes)) {
    endsWithNewline = text.endsWith('\n');
    if (firstLine === null) firstLine = text.split('\n', 1)[0] ?? '';
    parser.write(text);
    if (failure) throw csvFailure(failure, file);
    const batch = take();
    if (batch.length) yield batch;
  }
  parser.end();
  const batch: CsvRow[] = [];
  if (!failure) {
    try {
      for await (const item of parser as AsyncIterable<{
        record: string[];
        info: { lines: number };
      }>)
        handle(item, batch);
    } catch (e) {
      failure = e as Error;
    }
  }
  if (failure) throw csvFailure(failure, file);
  if (!header) {
    throw structural(file, null, ImportCodes.empty, `${file} is empty (no header line)`);
  }
  const last = lastRow as { fields: string[]; line: number } | null;
  if (last) {
    const h = header as string[];
    if (!endsWithNewline && last.fields.length < h.length) {
      throw structural(
        file,
        last.line,
        ImportCodes.truncated,
        `${file} line ${last.line}: the file ends in the middle of a row (truncated download?)`,
      );
    }
    batch.push(...finishRow(last));
  }
  if (batch.length) yield batch;
  if (rows === 0 && opts.requireRows !== false && issues.skippedRows === 0) {
    throw structural(file, 2, ImportCodes.empty, `${file} has a header but no data rows`);
  }
}

function headerFailure(firstLine: string | null, opts: CsvOptions, why: string) {
  const line = firstLine ?? '';
  const other = [',', ';', '\t', '|'].find(
    (d) => d !== opts.delimiter && line.split(d).length > line.split(opts.delimiter).length,
  );
  if (other) {
    return structural(
      opts.file,
      1,
      ImportCodes.delimiter,
      `${opts.file}: the header is separated by ${delimiterName(other)}, this format uses ${delimiterName(opts.delimiter)}`,
    );
  }
  return structural(
    opts.file,
    1,
    ImportCodes.columns,
    `${opts.file} line 1: the header does not parse (${why})`,
  );
}

function csvFailure(e: Error, file: string) {
  if (e instanceof StructuralError) return e;
  const err = e as CsvError;
  const line = typeof err.lines === 'number' ? err.lines : null;
  if (err.code === 'CSV_QUOTE_NOT_CLOSED') {
    return structural(
      file,
      line,
      ImportCodes.truncated,
      `${file} line ${line}: a quoted field is never closed (a stray quote, or the file is truncated)`,
    );
  }
  return structural(file, line, ImportCodes.columns, `${file} line ${line}: ${err.message}`);
}

function checkHeader(header: string[], opts: CsvOptions): void {
  const missing = opts.required.filter((c) => !header.includes(c));
  if (missing.length === 0) return;
  const only = header.length === 1 ? (header[0] ?? '') : '';
  const other = [',', ';', '\t', '|'].find((d) => d !== opts.delimiter && only.includes(d));
  if (other) {
    throw structural(
      opts.file,
      1,
      ImportCodes.delimiter,
      `${opts.file}: the header is separated by ${delimiterName(other)}, this format uses ${delimiterName(opts.delimiter)}`,
    );
  }
  throw structural(
    opts.file,
    1,
    ImportCodes.columns,
    `${opts.file}: missing column${missing.length > 1 ? 's' : ''} ${missing.join(', ')} (found: ${header.slice(0, 15).join(', ')}${header.length > 15 ? ', ...' : ''})`,
  );
}
