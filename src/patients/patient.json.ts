import type { Patient } from './patient.js';
import { TARGETS_CAUTION, computeTargets } from './targets.js';

/** A patient record as the API and `patient show --json` give it: with its targets and their caution. */
export function toPatientJson(p: Patient) {
  return { ...p, targets: computeTargets(p), targetsCaution: TARGETS_CAUTION };
}
