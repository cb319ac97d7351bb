import { systemClock } from '../src/clock.js';
import type { Db } from '../src/db/database.js';
import type { ImportOptions, ImportProgress, ImportResult } from './importer.js';
import { ImportCodes, IssueLog, StructuralError } from './issues.js';
import { SourceWriter, type SourceMeta } from './writer.js';

/** Byte-based progress across every file of an import, reported at most every 256 KiB. */
export class Progress {
  private done = 0;
  private lastSent = -Infinity;
  private file = '';
  rows = 0;
  constructor(
    private total: number,
    private readonly sink?: (p: ImportProgress) => void,
  ) {}

  setFile(name: string): void {
    this.file = name;
    this.emit(true);
  }
  addTotal(bytes: number): void {
    this.total += bytes;
  }
  readonly bytes = (n: number): void => {
    this.done += n;
    if (this.done - this.lastSent >= 256 * 1024) this.emit(false);
  };
  emit(force: boolean): void {
    if (!this.sink) return;
    if (!force && this.done - this.lastSent < 256 * 1024) return;
    this.lastSent = this.done;
    this.sink({
      file: this.file,
      bytesDone: this.done,
      bytesTotal: Math.max(this.total, this.done),
      rows: this.rows,
    });
  }
}

export interface ImportContext {
  writer: SourceWriter;
  issues: IssueLog;
  progress: Progress;
}

/**
 * Runs one import in one transaction: a structural error (or a database error) rolls back and
 * comes back as `ok: false`; everything else the body reports stays in `errors`.
 */
export async function runImport(
  db: Db,
  meta: Omit<SourceMeta, 'importedAt'>,
  options: ImportOptions,
  totalBytes: number,
  body: (ctx: ImportContext) => Promise<void>,
): Promise<ImportResult> {
  const issues = new IssueLog();
  const clock = options.clock ?? systemClock;
  const progress = new Progress(totalBytes, options.onProgress);
  let writer: SourceWriter | undefined;
  try {
    writer = SourceWriter.begin(db, { ...meta, importedAt: clock.now().toISOString() });
    await body({ writer, issues, progress });
    const counts = writer.commit(issues.skippedRows);
    progress.emit(true);
    return {
      ok: true,
      format: meta.format,
      release: meta.release,
      sourceId: writer.sourceId,
      imported: counts.foods,
      skipped: issues.skippedRows,
      values: counts.values,
      portions: counts.portions,
      errors: issues.sorted(),
      issueCount: issues.count,
      notes: issues.notes,
    };
  } catch (err) {
    writer?.rollback();
    const fatal = toFatal(err);
    if (!fatal) throw err;
    return {
      ok: false,
      format: meta.format,
      imported: 0,
      skipped: issues.skippedRows,
      errors: issues.sorted(),
      issueCount: issues.count,
      fatal,
      notes: issues.notes,
    };
  }
}

/** A structural error, or a database failure said without driver internals; else undefined. */
export function toFatal(err: unknown) {
  if (err instanceof StructuralError) return err.issue;
  const e = err as { code?: unknown; message?: string; name?: string };
  if (e?.name === 'SqliteError' && typeof e.code === 'string') {
    const why =
      e.code === 'SQLITE_BUSY'
        ? 'the database is busy (another import or program is writing to it)'
        : e.code === 'SQLITE_FULL'
          ? 'the disk is full'
          : e.code === 'SQLITE_READONLY'
            ? 'the database file is read-only'
            : `the database refused the write (${e.code})`;
    return {
      file: '(database)',
      line: null,
      code: ImportCodes.database,
      message: `import stopped: ${why}; nothing was changed`,
    };
  }
  return undefined;
}

/** The result for an import that could not start (missing path, missing file, bad zip). */
export function failedBeforeStart(format: string, err: unknown): ImportResult {
  const fatal = toFatal(err);
  if (!fatal) throw err;
  return {
    ok: false,
    format,
    imported: 0,
    skipped: 0,
    errors: [],
    issueCount: 0,
    fatal,
    notes: [],
  };
}
