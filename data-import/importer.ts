import type { Clock } from '../src/clock.js';
import type { Db } from '../src/db/database.js';

/** One reported problem: where (file and 1-based line, null for the whole file) and why. */
export interface ImportIssue {
  file: string;
  line: number | null;
  code: string;
  message: string;
}

/** What one import did. `ok: false` means a structural error stopped it and nothing was written. */
export type ImportResult =
  | {
      ok: true;
      format: string;
      release: string;
      sourceId: number;
      /** Foods written. */
      imported: number;
      /** Rows (in any file) that were reported and left out. */
      skipped: number;
      values: number;
      portions: number;
      /** Milliseconds the database's write lock was held to publish the release. */
      publishMs: number;
      /** The first `MAX_REPORTED_ISSUES` row problems; `skipped` and `issueCount` are exact. */
      errors: ImportIssue[];
      issueCount: number;
      /** Things left out by design (e.g. laboratory sample records), said plainly. */
      notes: string[];
    }
  | {
      ok: false;
      format: string;
      imported: 0;
      skipped: number;
      errors: ImportIssue[];
      issueCount: number;
      /** The structural error that stopped the import. */
      fatal: ImportIssue;
      notes: string[];
    };

/**
 * Progress over every file the import reads (for a progress bar). Bytes are the bytes read
 * from disk: compressed bytes for a `.gz` or a `.zip`, so the fraction is honest from the start.
 */
export interface ImportProgress {
  file: string;
  bytesDone: number;
  bytesTotal: number;
  rows: number;
  /** 'reading' the files into the staging file, then 'publishing' into the database. */
  phase: 'reading' | 'publishing';
}

/** Limits on what a compressed file may unpack to (a small file that unpacks to a disk-full). */
export interface UnpackLimits {
  /** Largest total of unpacked bytes of one import. */
  maxUnpackedBytes: number;
  /** Largest ratio of unpacked to compressed bytes (checked once 4 MiB are unpacked). */
  maxRatio: number;
}

/**
 * Defaults: 20 GiB unpacked (the full Open Food Facts CSV export unpacks to about 10 GB as of
 * 2025, from memory) and 200:1 (text tables compress 5-15:1; common practice, no source).
 */
export const DEFAULT_UNPACK_LIMITS: UnpackLimits = {
  maxUnpackedBytes: 20 * 1024 ** 3,
  maxRatio: 200,
};

/** Environment variables that change the unpack limits (read once where imports start). */
export const UNPACK_ENV = {
  maxUnpackedGiB: 'PHOSLEDGER_IMPORT_MAX_UNPACKED_GIB',
  maxRatio: 'PHOSLEDGER_IMPORT_MAX_RATIO',
} as const;

/** The unpack limits an environment sets; a value that is not a positive number is an error. */
export function unpackLimitsFromEnv(env: Record<string, string | undefined>): UnpackLimits {
  const read = (name: string, fallback: number) => {
    const text = env[name];
    if (text === undefined || text.trim() === '') return fallback;
    const n = Number(text);
    if (!Number.isFinite(n) || n <= 0)
      throw new Error(`${name} must be a positive number (got '${text}')`);
    return n;
  };
  return {
    maxUnpackedBytes: Math.round(
      read(UNPACK_ENV.maxUnpackedGiB, DEFAULT_UNPACK_LIMITS.maxUnpackedBytes / 1024 ** 3) *
        1024 ** 3,
    ),
    maxRatio: read(UNPACK_ENV.maxRatio, DEFAULT_UNPACK_LIMITS.maxRatio),
  };
}

export interface ImportOptions {
  /** Release label; re-importing the same format and release replaces it. Defaults per format. */
  release?: string | undefined;
  clock?: Clock | undefined;
  onProgress?: ((p: ImportProgress) => void) | undefined;
  /** Unpack limits (defaults `DEFAULT_UNPACK_LIMITS`). */
  limits?: Partial<UnpackLimits> | undefined;
  /** Free bytes on the disk of a folder (tests pass a fake; default `fs.statfs`). */
  freeBytes?: ((dir: string) => Promise<number>) | undefined;
}

/** One food-table format: how to read it and write it into the database. */
export interface Importer {
  format: string;
  title: string;
  /** Where the user gets the table, in one line (shown by `import --help`). */
  where: string;
  /** What `path` may be, e.g. 'folder or .zip of the ASCII release'. */
  pathHint: string;
  /** True when the format needs no path (it ships with the program). */
  pathOptional?: boolean;
  run(db: Db, path: string | undefined, options?: ImportOptions): Promise<ImportResult>;
}

export const MAX_REPORTED_ISSUES = 1000;
