/**
 * The settings registry: every key, its zod schema, its cited default. Adding a setting is one
 * entry in SETTINGS below (schema, default, source); the service, the routes and validation
 * follow from it.
 */
import type { z } from 'zod';
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

export interface SettingDefinition<T> {
  schema: z.ZodType<T>;
  default: T;
  /** Where the default comes from (guideline, paper) or "common practice, no source". */
  source: string;
  description: string;
}

/** Declares one setting; keeps the value type tied to its schema. */
export function defineSetting<T>(def: SettingDefinition<T>): SettingDefinition<T> {
  return def;
}

export const SETTINGS = {
  absorption: defineSetting({
    schema: absorptionFractionsSchema,
    default: DEFAULT_ABSORPTION_FRACTIONS,
    source: Object.entries(ABSORPTION_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'Fractions of phosphorus absorbed by source (0-1, low <= typical <= high); a clinic may set its own.',
  }),
  clinic: defineSetting({
    schema: clinicSchema,
    default: DEFAULT_CLINIC,
    source: "no source: the clinic's own details (empty until filled in)",
    description: 'Clinic name, contact and dietitian shown on handouts and reports.',
  }),
  thresholds: defineSetting({
    schema: thresholdsSchema,
    default: DEFAULT_THRESHOLDS,
    source: Object.entries(THRESHOLD_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'Cut-offs for binder pairing (minimum and high-load absorbable P per occasion), the high-ratio flag, swaps and contributors.',
  }),
  balancing: defineSetting({
    schema: balancingSettingsSchema,
    default: DEFAULT_BALANCING,
    source: Object.entries(BALANCING_SOURCES)
      .map(([k, v]) => `${k}: ${v}`)
      .join(' | '),
    description:
      'How plan balancing moves amounts (whole or half household measures, gram steps, allowed range), how many new foods a day may gain, the closeness penalty, and optional per-meal protein and calcium rules.',
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
}
