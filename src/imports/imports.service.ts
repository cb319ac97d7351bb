import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  DEFAULT_UNPACK_LIMITS,
  type Importer,
  type UnpackLimits,
} from '../../data-import/importer.js';
import type { Clock } from '../clock.js';
import { openDb, type Db } from '../db/database.js';
import { AppError } from '../errors.js';
import {
  MAX_WAITING_IMPORTS,
  progressFraction,
  safeUploadName,
  type ImportJob,
} from './imports.js';
import { auditImport } from '../audit/actors.js';

/** Where the uploaded bytes go before the importer reads them. */
export interface UploadSink {
  /** Writes the upload to `path`, resolving with the number of bytes written. */
  saveTo(path: string): Promise<number>;
}

/**
 * Upload imports running in the background of the server, one at a time, with at most
 * `MAX_WAITING_IMPORTS` waiting (uploads being received count as waiting); more are refused
 * before their bytes are saved. Each import stages into its own file and publishes in one
 * transaction, so a failure leaves the database as it was. Jobs live in memory: after a
 * restart the imported tables remain, the job list does not.
 */
export class ImportJobs {
  private readonly jobs = new Map<number, ImportJob>();
  private seq = 0;
  /** Uploads being saved, queued imports and the running one. */
  private active = 0;
  private chain: Promise<void> = Promise.resolve();
  private readonly stopping = new AbortController();

  /**
   * `afterImport` runs after each import that changed the tables (e.g. rebuilding what diary
   * audits keep in memory); its failure does not fail the import.
   */
  constructor(
    private readonly db: Db,
    private readonly clock: Clock,
    private readonly limits: UnpackLimits = DEFAULT_UNPACK_LIMITS,
    private readonly afterImport: (signal: AbortSignal) => Promise<unknown> = async () => {},
  ) {}

  /** Stops the after-import work early (shutdown); queued imports still run to the end. */
  stop(): void {
    this.stopping.abort();
  }

  list(): ImportJob[] {
    return [...this.jobs.values()].sort((a, b) => b.id - a.id);
  }

  get(id: number): ImportJob | undefined {
    return this.jobs.get(id);
  }

  /**
   * Refuses (409) when one import runs and `MAX_WAITING_IMPORTS` wait; call before reading the
   * upload, so a refused upload is never saved.
   */
  reserve(): void {
    if (this.active >= 1 + MAX_WAITING_IMPORTS) {
      throw new AppError(
        'PHL_IMPORT_BUSY',
        409,
        'an import is running and another is waiting: start this one when one of them has finished (see the Food tables screen)',
      );
    }
    this.active++;
  }

  /** Gives back a reservation whose upload was refused or failed. */
  release(): void {
    this.active = Math.max(0, this.active - 1);
  }

  /**
   * Saves the upload to a fresh temp folder, queues the import and returns the job at once.
   * Needs a `reserve()` first; the reservation ends when the import ends (or the save fails).
   */
  async start(
    importer: Importer,
    upload: { fileName: string; sink: UploadSink },
    opts: { release?: string | undefined; startedBy: string | null },
  ): Promise<ImportJob> {
    let dir: string;
    let sizeBytes: number;
    let path: string;
    try {
      dir = await mkdtemp(join(tmpdir(), 'phosledger-import-'));
      path = join(dir, safeUploadName(upload.fileName));
    } catch (err) {
      this.release();
      throw err;
    }
    try {
      sizeBytes = await upload.sink.saveTo(path);
    } catch (err) {
      this.release();
      await rm(dir, { recursive: true, force: true });
      throw err;
    }
    const job: ImportJob = {
      id: ++this.seq,
      state: 'queued',
      format: importer.format,
      fileName: safeUploadName(upload.fileName),
      sizeBytes,
      startedBy: opts.startedBy,
      createdAt: this.clock.now().toISOString(),
      finishedAt: null,
      progress: null,
      fraction: null,
      result: null,
      error: null,
    };
    this.jobs.set(job.id, job);
    this.chain = this.chain
      .then(() => this.run(job, importer, path, opts.release))
      .finally(() => {
        this.release();
        return rm(dir, { recursive: true, force: true });
      });
    return job;
  }

  /** Resolves when every queued import has finished (tests and shutdown). */
  idle(): Promise<void> {
    return this.chain;
  }

  private async run(
    job: ImportJob,
    importer: Importer,
    path: string,
    release: string | undefined,
  ): Promise<void> {
    job.state = 'running';
    // A file database gets its own connection, so the import's long transaction is not shared
    // with the requests the server keeps answering; an in-memory one (tests) has only one.
    const own = this.db.file === ':memory:' ? null : openDb(this.db.file);
    try {
      const result = await importer.run(own ?? this.db, path, {
        release,
        clock: this.clock,
        limits: this.limits,
        onProgress: (p) => {
          job.progress = p;
          job.fraction = progressFraction(p);
        },
      });
      job.result = result;
      job.progress = job.progress && { ...job.progress, phase: 'publishing' };
      await auditImport(this.db, result, { userId: null, username: job.startedBy }, this.clock);
      if (result.ok) {
        job.state = 'done';
        job.fraction = 1;
        if (!this.stopping.signal.aborted) {
          await this.afterImport(this.stopping.signal).catch(() => undefined);
        }
      } else {
        job.state = 'failed';
        job.error = { code: result.fatal.code, message: result.fatal.message };
      }
    } catch {
      job.state = 'failed';
      job.error = {
        code: 'PHL_IMPORT_FAILED',
        message: 'the import stopped unexpectedly; the database was not changed',
      };
      await auditImport(
        this.db,
        { ok: false, format: job.format, imported: 0, skipped: 0, fatal: job.error },
        { userId: null, username: job.startedBy },
        this.clock,
      ).catch(() => undefined);
    } finally {
      job.finishedAt = this.clock.now().toISOString();
      await own?.close();
    }
  }
}
