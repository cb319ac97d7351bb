// Test helper with no expected values of its own (no source needed): runs Debian poppler-utils on rendered PDFs.
import { execFileSync } from 'node:child_process';
import { requirePresent } from '../helpers/requirements.js';

function has(cmd: string): boolean {
  try {
    execFileSync(cmd, ['-v'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

/** pdftotext, pdffonts and pdftoppm (Debian poppler-utils; the CI script installs it). */
export const hasPoppler = requirePresent(
  'poppler-utils (pdftotext, pdffonts, pdftoppm)',
  has('pdftotext') && has('pdffonts') && has('pdftoppm'),
  'apt-get install poppler-utils',
);
export const POPPLER_MISSING =
  'skipped: poppler-utils (pdftotext, pdffonts, pdftoppm) not installed';
