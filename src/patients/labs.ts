/**
 * Serum phosphate and calcium unit conversions. Factors come from IUPAC standard atomic weights
 * (P 30.974 g/mol, Ca 40.078 g/mol): mg/dL = mmol/L x (g/mol) / 10, because 1 mmol/L =
 * (g/mol) mg per litre = (g/mol) / 10 mg per decilitre.
 */

/** IUPAC standard atomic weight of phosphorus, g/mol (abridged value). */
export const PHOSPHORUS_G_PER_MOL = 30.974;
/** IUPAC standard atomic weight of calcium, g/mol (abridged value). */
export const CALCIUM_G_PER_MOL = 40.078;

export type LabAnalyte = 'phosphate' | 'calcium';
export type LabUnit = 'mg/dL' | 'mmol/L';

/** mg/dL per mmol/L for an analyte: 3.0974 for phosphate (as P), 4.0078 for calcium. */
export function mgPerDlPerMmolPerL(analyte: LabAnalyte): number {
  return (analyte === 'phosphate' ? PHOSPHORUS_G_PER_MOL : CALCIUM_G_PER_MOL) / 10;
}

/** Converts a serum value to mg/dL. */
export function toMgPerDl(analyte: LabAnalyte, value: number, unit: LabUnit): number {
  return unit === 'mg/dL' ? value : value * mgPerDlPerMmolPerL(analyte);
}

/** Converts a serum value to mmol/L. */
export function toMmolPerL(analyte: LabAnalyte, value: number, unit: LabUnit): number {
  return unit === 'mmol/L' ? value : value / mgPerDlPerMmolPerL(analyte);
}

/**
 * Values outside these bounds are refused as typing errors (not clinical limits): serum
 * phosphate 0.3-20 mg/dL, calcium 2-20 mg/dL (common practice, no source: far outside what a
 * living patient shows, wide enough for any real result).
 */
export const PLAUSIBLE_MG_PER_DL: Record<LabAnalyte, { min: number; max: number }> = {
  phosphate: { min: 0.3, max: 20 },
  calcium: { min: 2, max: 20 },
};

/** A result as entered plus both units, rounded for display (mg/dL 1 decimal, mmol/L 2). */
export interface ConvertedLab {
  mgPerDl: number;
  mmolPerL: number;
}

export function convertLab(analyte: LabAnalyte, value: number, unit: LabUnit): ConvertedLab {
  return {
    mgPerDl: round(toMgPerDl(analyte, value, unit), 2),
    mmolPerL: round(toMmolPerL(analyte, value, unit), 3),
  };
}

function round(x: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
}
