/**
 * The settings registry: every key, its zod schema, its cited default. Adding a setting is one
 * entry in SETTINGS below (schema, default, source); the service, the routes and validation
 * follow from it.
 */
import type { z } from 'zod';
import type { Role } from '../auth/auth.js';
import {
  BALANCING_SOURCES,
  DEFAULT_BALANCING,
  balancingSettingsSchema,
} from '../balance/balance.js';
import {
  ABSORPTION_SOURCES,
  DEFAULT_ABSORPTION_FRACTIONS,
  absorptionFractionsSchema,
} from '../phosphorus/absorption.js';
import {
  DEFAULT_CLINIC,
  DEFAULT_THRESHOLDS,
  THRESHOLD_SOURCES,
  clinicSchema,
  thresholdsSchema,
} from '../plans/plan-settings.js';
import { DEFAULT_LAB_BANDS, LAB_BAND_SOURCES, labBandsSchema } from '../patients/lab-bands.js';

export interface SettingDefinition<T> {
  schema: z.ZodType<T>;
  default: T;
  /** Where the default comes from (guideline, paper) or "common practice, no source". */
  source: string;
  description: string;
  /**
   * Who may change it: figures that change what the tool estimates for every patient, and the
   * clinic details printed on every handout, are the admin's; reading is open to every user.
   */
  editableBy: Role;
}

/** Declares one setting; keeps the value type tied to its schema. */
export function defineSetting<T>(def: SettingDefinition<T>): SettingDefinition<T> {
  return def;
}

/**
 * Absorption fractions a clinic may set: the schema's 0-1 and low <= typical <= high, and a
 * typical fraction above 0 for every source. Every source of dietary phosphorus is partly
 * absorbed (see ABSORPTION_SOURCES); a 0 would show no absorbable phosphorus at all and
 * under-state every load.
 */
const plausibleAbsorption = absorptionFractionsSchema.superRefine((value, ctx) => {
  for (const [source, range] of Object.entries(value)) {
    if (range.typical <= 0) {
      ctx.addIssue({
        code: 'custom',
        path: [source, 'typical'],
        message: 'must be above 0: every source of phosphorus is partly absorbed',
      });
    }
  }
});

/** Thresholds whose binder cut-offs agree: the high-load mark cannot be under the no-binder mark. */
const consistentThresholds = thresholdsSchema.superRefine((value, ctx) => {
  if (value.highLoadOccasionMg < value.binderMinAbsorbableMgPerOccasion) {
    ctx.addIssue({
      code: 'custom',
      path: ['highLoadOccasionMg'],
      message: 'must be at least binderMinAbsorbableMgPerOccasion',
    });
  }
});

export const SETTINGS = {
  absorption: defineSetting({
    schema: plausibleAbsorption,
    default: DEFAULT_ABSORPTION_FRACTIONS,
    source: Object.entries(ABSORPTION_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'Fractions of phosphorus absorbed by source (0-1, low <= typical <= high, typical above 0); a clinic may set its own.',
    editableBy: 'admin',
  }),
  clinic: defineSetting({
    schema: clinicSchema,
    default: DEFAULT_CLINIC,
    source: "no source: the clinic's own details (empty until filled in)",
    description: 'Clinic name, contact and dietitian shown on handouts and reports.',
    editableBy: 'admin',
  }),
  thresholds: defineSetting({
    schema: consistentThresholds,
    default: DEFAULT_THRESHOLDS,
    source: Object.entries(THRESHOLD_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'Cut-offs for binder pairing (minimum and high-load absorbable P per occasion), the high-ratio flag, swaps and contributors.',
    editableBy: 'admin',
  }),
  labBands: defineSetting({
    schema: labBandsSchema,
    default: DEFAULT_LAB_BANDS,
    source: Object.entries(LAB_BAND_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'Reference or target band per lab result (canonical units: phosphate and calcium mg/dL, PTH pg/mL, albumin g/dL, potassium and bicarbonate mmol/L, 25-OH vitamin D ng/mL), off and on dialysis, drawn behind the trend charts.',
    editableBy: 'admin',
  }),
  balancing: defineSetting({
    schema: balancingSettingsSchema,
    default: DEFAULT_BALANCING,
    source: Object.entries(BALANCING_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'How plan balancing moves amounts (whole or half household measures, gram steps, allowed range), how many new foods a day may gain, the closeness penalty, and optional per-meal protein and calcium rules.',
    editableBy: 'admin',
  }),
} as const;

export type SettingKey = keyof typeof SETTINGS;
export type SettingValue<K extends SettingKey> =
  (typeof SETTINGS)[K] extends SettingDefinition<infer T> ? T : never;

export function isSettingKey(key: string): key is SettingKey {
  return Object.prototype.hasOwnProperty.call(SETTINGS, key);
}

/** A setting as the API shows it. */
export interface SettingView<T = unknown> {
  key: string;
  value: T;
  isDefault: boolean;
  updatedAt: string | null;
  default: T;
  source: string;
  description: string;
  editableBy: Role;
}
