/**
 * Phosphorus-to-protein ratio (mg P per g protein) and its bands.
 *
 * Cut points 12, 14 and 16 mg/g are the category limits of Noori N et al. (CJASN 2010;5:683-692,
 * doi 10.2215/CJN.08601209),
 * who found, in 224 haemodialysis patients, death hazard ratios of 1.13 (<12), 1.00 (12-<14,
 * reference), 1.80 (14-<16) and 1.99 (>=16). So: ">= 16 mg/g is high" and "14-<16 is raised"
 * have direct support; "below 12 is favourable" does not (its HR was above the reference); the
 * limits themselves are the authors' analysis categories, i.e. convention.
 */
export interface RatioBand {
  id: string;
  /** Lower limit, mg/g, inclusive. */
  fromMgPerG: number;
  label: string;
  note: string;
}

export const RATIO_BANDS: readonly RatioBand[] = Object.freeze([
  {
    id: 'below-12',
    fromMgPerG: 0,
    label: 'below 12 mg/g',
    note: 'Noori 2010 lowest category (HR 1.13 vs 12-<14): not shown to be better; cut point is convention',
  },
  {
    id: '12-to-14',
    fromMgPerG: 12,
    label: '12 to under 14 mg/g',
    note: 'Noori 2010 reference category; cut points are convention',
  },
  {
    id: '14-to-16',
    fromMgPerG: 14,
    label: '14 to under 16 mg/g',
    note: 'Noori 2010: HR 1.80 vs 12-<14 in haemodialysis patients',
  },
  {
    id: '16-or-more',
    fromMgPerG: 16,
    label: '16 mg/g or more',
    note: 'Noori 2010: HR 1.99 vs 12-<14 in haemodialysis patients (supported)',
  },
]);

/** Band id when protein is zero: the ratio is undefined, said plainly rather than shown as infinity. */
export const NO_PROTEIN_BAND = 'no-protein';

/** Protein below this (g per 100 g) counts as none for the ratio (tables print 0.0-0.09 for drinks). */
export const MIN_PROTEIN_FOR_RATIO_G = 0.1;

/** mg P per g protein, or null when either is unknown or protein is (essentially) zero. */
export function phosphorusProteinRatioMgPerG(
  phosphorusMg: number | null,
  proteinG: number | null,
): number | null {
  if (phosphorusMg === null || proteinG === null) return null;
  if (proteinG < MIN_PROTEIN_FOR_RATIO_G) return null;
  return phosphorusMg / proteinG;
}

/** The band a ratio falls in; `bands` must be sorted by `fromMgPerG`. */
export function ratioBandFor(
  ratioMgPerG: number,
  bands: readonly RatioBand[] = RATIO_BANDS,
): RatioBand {
  let found = bands[0] as RatioBand;
  for (const b of bands) if (ratioMgPerG >= b.fromMgPerG) found = b;
  return found;
}
