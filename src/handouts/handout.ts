import { z } from 'zod';

/** Amounts the handout prints, mg of phosphorus (absorbable as low/typical/high estimates). */
export interface HandoutNutrients {
  phosphorusMg: number;
  absorbablePhosphorusMg: { low: number; typical: number; high: number };
  additivePhosphorusMg: number | null;
  proteinG?: number | null;
}

export interface HandoutItem {
  foodId: number;
  grams: number;
  /** The patient's own words (the patient-facing label), or the food's name when none was given. */
  label: string;
  /** The food table's name (the summary's `foodName`); a label equal to it is no patient wording. */
  foodName?: string;
  /** The household measure the dietitian entered (from the food table), when there is one. */
  measure?: { count: number; description: string } | null;
  /** The summary's flags; `additive` marks foods likely to contain phosphate additives. */
  flags?: { additive: boolean };
  /** The preparation method the dietitian chose ('as-listed' or absent: nothing to say). */
  preparation?: { method: string; plateGrams?: number } | null;
}

export interface HandoutOccasion {
  name: string;
  time?: string | null;
  items: HandoutItem[];
  nutrients: HandoutNutrients;
}

export interface HandoutDay {
  label: string;
  occasions: HandoutOccasion[];
  nutrients: HandoutNutrients;
  /** The day's targets; the handout reads the phosphorus target (max, mg per day) from it. */
  targets?: unknown;
}

export interface HandoutBinderDose {
  /** The day's label as in `days[].label` (a number is read as the day's position, from 1). */
  day: string | number;
  occasion: string;
  units: number;
}

/**
 * The parts of the plan summary (`plan summary --json` contract, `PlanSummary` in
 * src/plans/summary-types.ts) that a handout reads; a PlanSummary is assignable to it.
 */
export interface HandoutSummary {
  planId: number;
  patientId: number;
  days: HandoutDay[];
  binders: {
    prescription: {
      ingredient: string;
      unitStrengthMg: number;
      schedule?: string;
      units: number;
    } | null;
    perOccasion: HandoutBinderDose[];
    /** Units prescribed and handed out per day after distribution, when the summary lists them. */
    days?: { day: string; distributedUnits: number; prescribedUnits?: number }[];
    elementalCalciumMgPerDay?: number | null;
  } | null;
  /** The summary's clinical cautions; the handout says those meant for the patient. */
  cautions?: { code: string }[];
}

export interface HandoutPatient {
  label: string;
  language?: string | null;
}

export interface HandoutClinic {
  name: string;
  contact: string;
  dietitianName: string;
}

/** One phosphate additive as the "foods to watch" section needs it (from the additive catalogue). */
export interface AdditiveLabelEntry {
  eNumber: string | null;
  insNumber?: string | null;
  counted: boolean;
  labelNames: Partial<Record<string, readonly string[]>>;
}

export const PAPER_SIZES = ['a4', 'letter'] as const;
export type PaperSize = (typeof PAPER_SIZES)[number];

export const handoutQuerySchema = z
  .object({
    lang: z
      .string()
      .regex(
        /^[A-Za-z]{2,3}([-_][A-Za-z0-9]{2,8})*$/,
        'lang must be a language tag like es or zh-Hans',
      )
      .optional(),
    paper: z.enum(PAPER_SIZES).default('a4'),
    /** A saved version of the plan (default: the latest). */
    version: z.coerce
      .number()
      .int('version must be a whole number')
      .positive('version must be positive')
      .optional(),
  })
  .strict();
export type HandoutQuery = z.infer<typeof handoutQuerySchema>;

export const planIdParamsSchema = z.object({
  id: z.coerce.number().int('id must be a whole number').positive('id must be positive'),
});
