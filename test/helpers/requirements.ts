// Test helper with no expected values of its own (no source needed).
import { existsSync } from 'node:fs';

/** True when `CI` is set to anything but an explicit "0" or "false". */
export const underCi = !['', '0', 'false'].includes((process.env.CI ?? '').toLowerCase());

/**
 * Whether something a test needs from outside the repository is here (the SR28 release beside
 * the checkout, Debian's Chromium or poppler-utils). Under CI it must be: a missing one throws,
 * which fails the test file with the reason, instead of letting its tests skip and the run
 * pass. Elsewhere the tests that need it skip, and this says once why.
 */
export function requirePresent(what: string, present: boolean, howToGet: string): boolean {
  if (present) return true;
  const why = `${what} not found (${howToGet})`;
  if (underCi) throw new Error(`${why}: required when CI is set`);
  process.stderr.write(`skipping the tests that need it: ${why}\n`);
  return false;
}

/** Debian's Chromium, driven by playwright-core in the browser tests. */
export const CHROMIUM = '/usr/bin/chromium';

/** True when Chromium is installed (throws under CI when it is not). */
export function chromiumPresent(): boolean {
  return requirePresent('Chromium', existsSync(CHROMIUM), 'apt-get install chromium');
}
