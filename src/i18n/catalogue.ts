import { z } from 'zod';

/**
 * A message catalogue file: `templates/locales/<language>.json`, one per language. Clinics may
 * add or edit these files; they are validated at start-up and every problem names its file
 * and key.
 */
export const reviewStatusSchema = z.enum(['drafted', 'reviewed']);
export type ReviewStatus = z.infer<typeof reviewStatusSchema>;

export const catalogueMetaSchema = z
  .object({
    /** BCP-47 tag; the file name must be `<language>.json`. */
    language: z
      .string()
      .regex(/^[a-z]{2,3}(-[A-Za-z0-9]{2,8})*$/, 'must be a BCP-47 tag like es or zh-Hans'),
    /** The language's own name for itself (shown to patients and clinics). */
    name: z.string().min(1),
    englishName: z.string().min(1),
    /** Locale for numbers and dates (Intl), e.g. 'ar-EG' for Arabic-Indic digits. */
    locale: z.string().min(2),
    direction: z.enum(['ltr', 'rtl']),
    script: z.enum(['latin', 'cyrillic', 'han', 'arabic', 'devanagari']),
    /**
     * Which language of the additive catalogue's label names to print under "foods to watch";
     * null when that catalogue has none for this language (E numbers and the plain words of this
     * catalogue are printed instead).
     */
    additiveLabelLanguage: z.enum(['en', 'es', 'fr', 'de', 'it', 'pt']).nullable(),
    review: z
      .object({
        status: reviewStatusSchema,
        /** Who reviewed it (a qualified medical translator) and when; null while drafted. */
        reviewer: z.string().min(1).nullable(),
        date: z
          .string()
          .regex(/^\d{4}-\d{2}-\d{2}$/, 'must be YYYY-MM-DD')
          .nullable(),
        note: z.string(),
      })
      .strict()
      .refine((r) => r.status !== 'reviewed' || (r.reviewer !== null && r.date !== null), {
        message: 'a reviewed catalogue names its reviewer and the review date',
      }),
  })
  .strict();
export type CatalogueMeta = z.infer<typeof catalogueMetaSchema>;

export const catalogueFileSchema = z
  .object({
    meta: catalogueMetaSchema,
    messages: z.record(z.string(), z.string()),
  })
  .strict();

/** One problem found while loading catalogues: always names the file, and the key where known. */
export interface CatalogueProblem {
  file: string;
  key: string | null;
  message: string;
}

/** How complete a language is against the English reference catalogue. */
export interface LanguageStatus {
  language: string;
  name: string;
  englishName: string;
  direction: 'ltr' | 'rtl';
  review: CatalogueMeta['review'];
  missingKeys: string[];
  complete: boolean;
}
