import { fmtBytes } from './files.js';
import type { ImportProgress } from './importer.js';

/** How often a progress line is written when no progress bar can be drawn (no source). */
export const PROGRESS_LINE_EVERY_MS = 5_000;

/** One progress line for a log (non-terminal stderr), or one JSON line with `--json`. */
export function progressLine(format: string, p: ImportProgress, json: boolean): string {
  const fraction = p.bytesTotal > 0 ? Math.min(1, p.bytesDone / p.bytesTotal) : null;
  if (json) {
    return JSON.stringify({
      progress: { format, ...p, fraction: fraction === null ? null : +fraction.toFixed(4) },
    });
  }
  const pct = fraction === null ? '?' : `${Math.floor(fraction * 100)}%`;
  const what =
    p.phase === 'publishing'
      ? 'publishing into the database (one short transaction)'
      : `reading ${p.file}`;
  return `import ${format}: ${pct} of ${fmtBytes(p.bytesTotal)} read (compressed bytes where compressed), ${p.rows.toLocaleString('en-US')} rows; ${what}`;
}

/**
 * Decides when to write a line: the first report, a change of phase, then at most one every
 * `everyMs`. `nowMs` is passed in (the caller's clock).
 */
export class ProgressThrottle {
  private lastMs = -Infinity;
  private lastPhase: ImportProgress['phase'] | null = null;
  constructor(private readonly everyMs = PROGRESS_LINE_EVERY_MS) {}

  due(p: ImportProgress, nowMs: number): boolean {
    if (p.phase !== this.lastPhase || nowMs - this.lastMs >= this.everyMs) {
      this.lastPhase = p.phase;
      this.lastMs = nowMs;
      return true;
    }
    return false;
  }
}
