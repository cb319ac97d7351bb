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

/** A stored result as any lab representation gives it (the record's list today, rows later). */
export interface LabLike {
  analyte: string;
  value: number;
  unit: string;
  date: string;
}

/** The latest result of each analyte the clinical rules read, with serum calcium corrected for albumin when an albumin result exists. */
export interface LatestLabs {
  phosphate: { mgPerDl: number; date: string } | null;
  calcium: {
    mgPerDl: number;
    date: string;
    /** Payne-corrected calcium, mg/dL, when an albumin result of the same day or earlier exists; else null. */
    correctedMgPerDl: number | null;
  } | null;
  albumin: { gPerDl: number; date: string } | null;
}

/**
 * Payne RB et al., BMJ 1973;4:643-646 (as commonly used, from memory): corrected calcium (mg/dL)
 * = measured calcium + 0.8 x (4.0 - albumin g/dL).
 */
export const CALCIUM_CORRECTION = { perGPerDl: 0.8, referenceAlbuminGPerDl: 4.0 } as const;

function albuminGPerDl(l: LabLike): number | null {
  if (l.unit === 'g/dL') return l.value;
  if (l.unit === 'g/L') return l.value / 10;
  return null;
}

/**
 * The one place the clinical rules read lab results from: the latest phosphate, calcium
 * (corrected with the latest albumin at or before it) and albumin, in mg/dL and g/dL.
 */
export function latestLabs(labs: readonly LabLike[]): LatestLabs {
  const newest = (analyte: string) =>
    [...labs].filter((l) => l.analyte === analyte).sort((a, b) => b.date.localeCompare(a.date))[0];
  const p = newest('phosphate');
  const ca = newest('calcium');
  const albumins = [...labs]
    .filter((l) => l.analyte === 'albumin' && albuminGPerDl(l) !== null)
    .sort((a, b) => b.date.localeCompare(a.date));
  const alb = albumins[0];
  const albForCa = ca ? albumins.find((l) => l.date <= ca.date) : undefined;
  const unit = (u: string): LabUnit | null => (u === 'mg/dL' || u === 'mmol/L' ? u : null);
  const caMg =
    ca && unit(ca.unit) ? toMgPerDl('calcium', ca.value, unit(ca.unit) as LabUnit) : null;
  const albG = albForCa ? (albuminGPerDl(albForCa) as number) : null;
  return {
    phosphate:
      p && unit(p.unit)
        ? {
            mgPerDl: round(toMgPerDl('phosphate', p.value, unit(p.unit) as LabUnit), 2),
            date: p.date,
          }
        : null,
    calcium:
      ca && caMg !== null
        ? {
            mgPerDl: round(caMg, 2),
            date: ca.date,
            correctedMgPerDl:
              albG === null
                ? null
                : round(
                    caMg +
                      CALCIUM_CORRECTION.perGPerDl *
                        (CALCIUM_CORRECTION.referenceAlbuminGPerDl - albG),
                    2,
                  ),
          }
        : null,
    albumin: alb ? { gPerDl: albuminGPerDl(alb) as number, date: alb.date } : null,
  };
}
