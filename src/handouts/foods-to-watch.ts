import type { AdditiveLabelEntry } from './handout.js';

/** The fields of an additive catalogue entry (src/additives/catalogue.ts) this selection reads. */
export interface CatalogueAdditive extends AdditiveLabelEntry {
  family: string;
  level: 'substance' | 'family';
}

/**
 * The additives a patient is told to look for: one line per counted E-number family (E 339
 * "sodium phosphates" rather than its three sub-numbers), plus counted substances whose number
 * has no family entry (E 338 phosphoric acid). Entries without an E number are left out; their
 * words are covered by the catalogue's plain words ("phosphate", "polyphosphate").
 */
export function selectWatchAdditives(
  catalogue: readonly CatalogueAdditive[],
): AdditiveLabelEntry[] {
  const counted = catalogue.filter((a) => a.counted && a.eNumber);
  const familiesWithEntry = new Set(
    counted.filter((a) => a.level === 'family').map((a) => a.family),
  );
  return counted
    .filter((a) => a.level === 'family' || !familiesWithEntry.has(a.family))
    .map((a) => ({
      eNumber: a.eNumber,
      insNumber: a.insNumber ?? null,
      counted: a.counted,
      labelNames: a.labelNames,
    }));
}
