import { z } from 'zod';

/**
 * The parts of the plan summary (`plan summary --json` contract) that a handout reads. Declared
 * here, narrowly, so the handout depends on the contract and not on the plans module's code.
 */
export interface HandoutNutrients {
  phosphorusMg: number;
  absorbablePhosphorusMg: { low: number; typical: number; high: number };
  additivePhosphorusMg: number | null;
  proteinG?: number | null;
}

export interface HandoutItem {
  foodId: number;
  grams: number;
  /** What the plan calls the item (the patient-facing label when the dietitian gave one). */
  label: string;
  /** The words the patient uses, when the summary carries them separately from `label`. */
  patientLabel?: string | null;
  /** The household measure the dietitian entered (from the food table), when there is one. */
  measure?: { amount: number; description: string } | null;
  /** The summary's flag for foods likely to contain phosphate additives. */
  additiveLikely?: boolean;
  nutrients: HandoutNutrients;
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
  /** The day's targets; the handout reads the phosphorus target (mg per day) from it. */
  targets?: unknown;
}

export interface HandoutBinderDose {
  day: number | string;
  occasion: string;
  units: number;
  timing?: string | null;
}

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
    elementalCalciumMgPerDay?: number | null;
  } | null;
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
  eNumber: string;
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
  })
  .strict();
export type HandoutQuery = z.infer<typeof handoutQuerySchema>;

export const planIdParamsSchema = z.object({
  id: z.coerce.number().int('id must be a whole number').positive('id must be positive'),
});
