import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { requirePresent } from '../helpers/requirements.js';
import { describe, expect, it } from 'vitest';
import { SHARED_DIR } from '../helpers/shared.js';
import { FIXTURES } from './helpers.js';

const REAL = join(SHARED_DIR, 'reference/formats');
const COPY = join(FIXTURES, 'formats');
// Under CI the shared reference must be there: a missing folder fails instead of skipping.
const missing = !requirePresent(
  'the shared reference headers',
  existsSync(REAL),
  `expected at ${REAL}`,
);

describe('test/fixtures/import/formats: copies of the real published headers', () => {
  it.skipIf(missing)(
    missing
      ? `reference headers not found at ${REAL}: skipped`
      : 'match the shared reference byte for byte',
    () => {
      const dirs = readdirSync(REAL);
      expect(readdirSync(COPY).sort()).toEqual([...dirs].sort());
      for (const d of dirs) {
        for (const f of readdirSync(join(REAL, d))) {
          const a = readFileSync(join(REAL, d, f), 'utf8');
          expect({ file: `${d}/${f}`, same: readFileSync(join(COPY, d, f), 'utf8') === a }).toEqual(
            {
              file: `${d}/${f}`,
              same: true,
            },
          );
        }
      }
    },
  );
});
