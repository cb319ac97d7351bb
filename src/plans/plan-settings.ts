import { z } from 'zod';

/**
 * The `clinic` setting: who the handouts and reports come from. Empty until the clinic fills
 * it in (no source: the clinic's own details).
 */
export const clinicSchema = z
  .object({
    name: z.string().trim().max(200),
    contact: z.string().trim().max(500),
    dietitianName: z.string().trim().max(200),
  })
  .strict();
export type ClinicSettings = z.infer<typeof clinicSchema>;
export const DEFAULT_CLINIC: ClinicSettings = { name: '', contact: '', dietitianName: '' };

/** The `thresholds` setting: the clinic's cut-offs for flags, binder pairing and swaps. */
export const thresholdsSchema = z
  .object({
    /** Occasions under this absorbable phosphorus (mg, typical estimate) get no binder. */
    binderMinAbsorbableMgPerOccasion: z.number().min(0).max(1000),
    /** Occasions at or over this absorbable phosphorus (mg) with no binder are pointed out. */
    highLoadOccasionMg: z.number().min(0).max(5000),
    /** A food at or over this phosphorus-to-protein ratio (mg/g) is flagged. */
    highRatioMgPerG: z.number().positive().max(200),
    /** Only foods with at least this protein (g/100 g) get the high-ratio flag (fruit and vegetables with traces of protein do not). */
    highRatioMinProteinGPer100g: z.number().min(0).max(50).default(2.5),
    /** A swap must carry at most this share of the original's absorbable phosphorus per g protein (or per portion). */
    swapMaxShare: z.number().positive().max(1),
    /** How many foods the summary lists as top phosphorus contributors. */
    topContributors: z.number().int().min(1).max(20),
  })
  .strict();
export type Thresholds = z.infer<typeof thresholdsSchema>;

export const DEFAULT_THRESHOLDS: Thresholds = {
  binderMinAbsorbableMgPerOccasion: 50, // common practice, no source: a small snack needs no binder
  highLoadOccasionMg: 250, // common practice, no source
  // Noori N et al., CJASN 2010;5(4):683-692: >= 16 mg/g had death HR 1.99 vs 12-<14 mg/g in HD patients
  highRatioMgPerG: 16,
  highRatioMinProteinGPer100g: 2.5, // common practice, no source: milk (about 3.3 g) is flagged, fruit is not
  swapMaxShare: 0.8, // "clearly less" = at least 20% less: common practice, no source
  topContributors: 5, // common practice, no source
};

/** Sources shown beside each default (the settings screen lists them). */
export const THRESHOLD_SOURCES: Record<keyof Thresholds, string> = {
  binderMinAbsorbableMgPerOccasion: 'common practice, no source; set by the clinic',
  highLoadOccasionMg: 'common practice, no source; set by the clinic',
  highRatioMgPerG:
    'Noori N et al., CJASN 2010;5(4):683-692: dietary P:protein >= 16 mg/g, death HR 1.99 vs 12-<14 mg/g (hemodialysis)',
  highRatioMinProteinGPer100g: 'common practice, no source',
  swapMaxShare: 'common practice, no source',
  topContributors: 'common practice, no source',
};
