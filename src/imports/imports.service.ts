import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Importer } from '../../data-import/importer.js';
import type { Clock } from '../clock.js';
import { openDb, type Db } from '../db/database.js';
import { progressFraction, safeUploadName, type ImportJob } from './imports.js';
import { auditImport } from '../audit/actors.js';

/** Where the uploaded bytes go before the importer reads them. */
export interface UploadSink {
  /** Writes the upload to `path`, resolving with the number of bytes written. */
  saveTo(path: string): Promise<number>;
}

/**
 * Upload imports running in the background of the server, one at a time (SQLite has one writer;
 * each import is one transaction, so a failure leaves the database as it was). Jobs live in
 * memory: after a restart the imported tables remain, the job list does not.
 */
export class ImportJobs {
  private readonly jobs = new Map<number, ImportJob>();
  private seq = 0;
  private chain: Promise<void> = Promise.resolve();
  private readonly stopping = new AbortController();

  /**
   * `afterImport` runs after each import that changed the tables (e.g. rebuilding what diary
   * audits keep in memory); its failure does not fail the import.
   */
  constructor(
    private readonly db: Db,
    private readonly clock: Clock,
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

  /** Saves the upload to a fresh temp folder, queues the import and returns the job at once. */
  async start(
    importer: Importer,
    upload: { fileName: string; sink: UploadSink },
    opts: { release?: string | undefined; startedBy: string | null },
  ): Promise<ImportJob> {
    const dir = await mkdtemp(join(tmpdir(), 'phosledger-import-'));
    const path = join(dir, safeUploadName(upload.fileName));
    let sizeBytes: number;
    try {
      sizeBytes = await upload.sink.saveTo(path);
    } catch (err) {
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
      .finally(() => rm(dir, { recursive: true, force: true }));
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
        onProgress: (p) => {
          job.progress = p;
          job.fraction = progressFraction(p);
        },
      });
      job.result = result;
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
        message: 'the import stopped unexpectedly; nothing was changed',
      };
    } finally {
      job.finishedAt = this.clock.now().toISOString();
      await own?.close();
    }
  }
}
