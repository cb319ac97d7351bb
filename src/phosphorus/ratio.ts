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

/**
 * Threshold for plant foods, mg absorbable phosphorus per g protein: Noori 2010's whole-diet
 * high band (>= 16 mg/g total P, mostly animal and additive sources in that cohort) times the
 * typical absorbed fraction of animal organic phosphorus (50%, Kalantar-Zadeh 2010), i.e. the
 * absorbable phosphorus per g protein of an animal food at the band's edge: 16 x 0.5 = 8 mg/g.
 * Plant phosphorus is largely phytate-bound and poorly absorbed (KDOQI 2020 6.3.2, KDIGO 2017
 * 4.1.8, Moe SM et al., CJASN 2011;6:257-264), so plant foods are weighed on what is absorbed.
 */
export function plantAbsorbableRatioThresholdMgPerG(
  highRatioMgPerG: number,
  animalOrganicTypicalFraction: number,
): number {
  return highRatioMgPerG * animalOrganicTypicalFraction;
}

/** How a food's high-ratio flag is judged: total P per g protein, or absorbable P for plant foods. */
export type RatioFlagBasis = 'total' | 'absorbable-plant';

/**
 * Whether a food carries the high-ratio flag (pure). Plant-origin foods with no additive
 * phosphorus are judged on absorbable P per g protein against the derived threshold; animal,
 * additive and mixed foods on total P per g protein as before. Amounts per 100 g.
 */
export function highRatioFlag(
  p: {
    ratioMgPerG: number | null;
    organicAnimalMg: number | null;
    organicPlantMg: number | null;
    additiveMg: number | null;
    absorbableTypicalMg: number | null;
  },
  proteinGPer100g: number | null,
  opts: { highRatioMgPerG: number; minProteinGPer100g: number; animalOrganicTypical: number },
): { flagged: boolean; basis: RatioFlagBasis; valueMgPerG: number | null } {
  const prot = proteinGPer100g ?? 0;
  const plant = p.organicAnimalMg === 0 && p.additiveMg === 0 && (p.organicPlantMg ?? 0) > 0;
  if (plant) {
    const value =
      p.absorbableTypicalMg !== null && prot >= MIN_PROTEIN_FOR_RATIO_G
        ? p.absorbableTypicalMg / prot
        : null;
    const limit = plantAbsorbableRatioThresholdMgPerG(
      opts.highRatioMgPerG,
      opts.animalOrganicTypical,
    );
    return {
      flagged: value !== null && value >= limit && prot >= opts.minProteinGPer100g,
      basis: 'absorbable-plant',
      valueMgPerG: value,
    };
  }
  return {
    flagged:
      p.ratioMgPerG !== null &&
      p.ratioMgPerG >= opts.highRatioMgPerG &&
      prot >= opts.minProteinGPer100g,
    basis: 'total',
    valueMgPerG: p.ratioMgPerG,
  };
}
