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

/** Progress of the byte stream over every file the import reads (for a progress bar). */
export interface ImportProgress {
  file: string;
  bytesDone: number;
  bytesTotal: number;
  rows: number;
}

export interface ImportOptions {
  /** Release label; re-importing the same format and release replaces it. Defaults per format. */
  release?: string | undefined;
  clock?: Clock | undefined;
  onProgress?: ((p: ImportProgress) => void) | undefined;
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
