import { statfs } from 'node:fs/promises';
import { systemClock } from '../src/clock.js';
import type { Db } from '../src/db/database.js';
import { fmtBytes, type SetEntry } from './files.js';
import type { ImportOptions, ImportProgress, ImportResult } from './importer.js';
import { ImportCodes, IssueLog, NOT_CHANGED, StructuralError, structural } from './issues.js';
import { stagingDir } from './staging.js';
import { SourceWriter, removeDeadReservations, type SourceMeta } from './writer.js';

/** Byte-based progress across every file of an import, reported every 1% or 256 KiB. */
export class Progress {
  private done = 0;
  private lastSent = -Infinity;
  private file = '';
  phase: ImportProgress['phase'] = 'reading';
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
  private get step(): number {
    return Math.max(1, Math.min(256 * 1024, this.total / 100));
  }
  readonly bytes = (n: number): void => {
    this.done += n;
    if (this.done - this.lastSent >= this.step) this.emit(false);
  };
  emit(force: boolean): void {
    if (!this.sink) return;
    if (!force && this.done - this.lastSent < this.step) return;
    this.lastSent = this.done;
    this.sink({
      file: this.file,
      bytesDone: this.done,
      bytesTotal: Math.max(this.total, this.done),
      rows: this.rows,
      phase: this.phase,
    });
  }
}

export interface ImportContext {
  writer: SourceWriter;
  issues: IssueLog;
  progress: Progress;
}

/**
 * Free disk an import needs beside the database: the staging file, the published rows and the
 * WAL that holds them until the checkpoint, each at most about the unpacked input (measured:
 * SR28's 36 MB of text make a 31 MB staging file and 40 MB of database), plus 64 MiB.
 */
export function diskNeededBytes(unpackedBytes: number): number {
  return Math.ceil(unpackedBytes * 2.5) + 64 * 1024 * 1024;
}

async function checkFreeDisk(dir: string, unpacked: number, options: ImportOptions) {
  const free = options.freeBytes
    ? await options.freeBytes(dir)
    : await statfs(dir).then(
        (s) => s.bavail * s.bsize,
        () => Number.POSITIVE_INFINITY,
      );
  const need = diskNeededBytes(unpacked);
  if (free < need) {
    throw structural(
      dir,
      null,
      ImportCodes.diskSpace,
      `not enough free disk for this import: it needs about ${fmtBytes(need)} in ${dir} (2.5 x the ${fmtBytes(unpacked)} unpacked input, for the staging file, the new rows and the write-ahead log, plus 64 MiB), ${fmtBytes(free)} are free; ${NOT_CHANGED}`,
    );
  }
}

/**
 * Runs one import: the body writes into a staging file (the database is not touched), then the
 * release is published in one short transaction. A structural error (or a database error)
 * anywhere leaves the database as it was and comes back as `ok: false`; everything else the
 * body reports stays in `errors`.
 */
export async function runImport(
  db: Db,
  meta: Omit<SourceMeta, 'importedAt'>,
  options: ImportOptions,
  input: readonly SetEntry[],
  body: (ctx: ImportContext) => Promise<void>,
): Promise<ImportResult> {
  const issues = new IssueLog();
  const clock = options.clock ?? systemClock;
  const stored = input.reduce((n, e) => n + e.storedBytes, 0);
  const unpacked = input.reduce((n, e) => n + e.unpackedEstimate, 0);
  const progress = new Progress(stored, options.onProgress);
  let writer: SourceWriter | undefined;
  try {
    const dir = stagingDir(db);
    removeDeadReservations(db);
    await checkFreeDisk(dir, unpacked, options);
    writer = SourceWriter.open(db, { ...meta, importedAt: clock.now().toISOString() }, dir);
    await body({ writer, issues, progress });
    progress.phase = 'publishing';
    progress.emit(true);
    const counts = await writer.publish(issues.skippedRows);
    checkpoint(db);
    return {
      ok: true,
      format: meta.format,
      release: meta.release,
      sourceId: counts.sourceId,
      imported: counts.foods,
      skipped: issues.skippedRows,
      values: counts.values,
      portions: counts.portions,
      publishMs: Math.round(counts.lockMs),
      errors: issues.sorted(),
      issueCount: issues.count,
      notes: issues.notes,
    };
  } catch (err) {
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
  } finally {
    writer?.discard();
  }
}

/**
 * Moves the published pages into the database file without blocking other writers (PASSIVE:
 * a TRUNCATE checkpoint of a large WAL held the write lock for seconds), and lets the WAL file
 * shrink back to 64 MiB when it is next reset (no source; common practice).
 */
function checkpoint(db: Db): void {
  if (db.file === ':memory:') return;
  try {
    db.sqlite.pragma('journal_size_limit = 67108864');
    db.sqlite.pragma('wal_checkpoint(PASSIVE)');
  } catch {
    // A busy reader keeps part of the WAL until the next checkpoint: not an import failure.
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
      message: `import stopped: ${why}; ${NOT_CHANGED}`,
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
