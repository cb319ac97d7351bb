// Test helper with no expected values of its own (no source needed): where the shared reference data is.
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { requirePresent } from './requirements.js';

/** The shared reference folder beside the checkout (CI has it too). */
export const SHARED_DIR = fileURLToPath(new URL('../../../shared/', import.meta.url));
export const SR28_DIR = `${SHARED_DIR}reference/usda-sr28`;

/** True when the complete USDA SR28 release is beside the checkout. */
export const hasSr28 = requirePresent(
  'USDA SR28',
  existsSync(`${SR28_DIR}/FOOD_DES.txt`),
  `expected at ${SR28_DIR}`,
);

/** Why a test skips when SR28 is missing: said plainly in the skipped test's name. */
export const SR28_MISSING = `USDA SR28 not found at ${SR28_DIR}: skipped`;
