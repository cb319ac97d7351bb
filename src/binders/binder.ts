import { z } from 'zod';

/** Active ingredients the product knows; aluminium and magnesium salts carry warnings. */
export const BINDER_INGREDIENTS = [
  'calcium-acetate',
  'calcium-carbonate',
  'sevelamer-carbonate',
  'sevelamer-hydrochloride',
  'lanthanum-carbonate',
  'ferric-citrate',
  'sucroferric-oxyhydroxide',
  'aluminium-hydroxide',
  'magnesium-carbonate',
] as const;
export type BinderIngredient = (typeof BINDER_INGREDIENTS)[number];

/**
 * The prescription as written by the prescriber: ingredient, strength of one unit (mg of the
 * salt, or of elemental lanthanum / iron where the product is labelled that way), and either
 * units per day or units with each meal. The product distributes it; it never changes it.
 */
export const binderPrescriptionSchema = z
  .object({
    ingredient: z.enum(BINDER_INGREDIENTS),
    unitStrengthMg: z
      .number({ error: 'unitStrengthMg must be a number (mg per tablet, capsule or sachet)' })
      .positive('unitStrengthMg must be greater than 0')
      .max(5000, 'unitStrengthMg must be at most 5000 mg'),
    schedule: z.enum(['per-day', 'per-meal']),
    units: z
      .number()
      .int('units must be a whole number')
      .min(1, 'units must be at least 1')
      .max(30, 'units must be at most 30'),
    /** Other medicines the patient takes, as written (used only to show spacing notes). */
    otherMedicines: z.array(z.string().trim().min(1).max(120)).max(30).default([]),
  })
  .strict();
export type BinderPrescription = z.infer<typeof binderPrescriptionSchema>;
