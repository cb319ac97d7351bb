import { z } from 'zod';
import type { ImportProgress, ImportResult } from '../../data-import/importer.js';

/** Where an upload import stands. `failed` means nothing was written to the database. */
export type ImportJobState = 'queued' | 'running' | 'done' | 'failed';

/** One import started from an uploaded file, as `GET /api/imports/:id` shows it. */
export interface ImportJob {
  id: number;
  state: ImportJobState;
  format: string;
  fileName: string;
  /** Bytes of the uploaded file. */
  sizeBytes: number;
  startedBy: string | null;
  createdAt: string;
  finishedAt: string | null;
  progress: ImportProgress | null;
  /** 0-1 from bytes read, null before the importer reports. */
  fraction: number | null;
  result: ImportResult | null;
  error: { code: string; message: string } | null;
}

/** Form fields sent with the file (`multipart/form-data`, the file in field `file`). */
export const importFieldsSchema = z
  .object({
    format: z.string().trim().min(1, 'format is required: one of GET /api/imports/formats'),
    release: z.string().trim().min(1).max(80).optional(),
  })
  .strict();

/**
 * Largest upload accepted, set on the upload route itself (the file is streamed to disk, never
 * held in memory): 4 GiB holds the full Open Food Facts CSV export (.csv.gz, about 1 GB as of
 * 2025, from memory) and the FDC Branded zips (under 1 GB, from memory).
 */
export const MAX_IMPORT_BYTES = 4 * 1024 ** 3;

/** Imports that may wait while one runs; more are refused with 409 (one import at a time). */
export const MAX_WAITING_IMPORTS = 1;

/** A file name safe to keep in a temp folder: the last path segment, plain characters only. */
export function safeUploadName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? '';
  const clean = base.replace(/[^\w.-]+/g, '_').replace(/^\.+/, '');
  return clean.length > 0 ? clean.slice(-120) : 'upload';
}

/** The share of the input read so far, 0-1 (byte-based, as the importers report it). */
export function progressFraction(p: ImportProgress | null): number | null {
  if (!p || p.bytesTotal <= 0) return null;
  return Math.min(1, p.bytesDone / p.bytesTotal);
}
