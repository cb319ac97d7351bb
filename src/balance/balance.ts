/**
 * Balancing a day or a whole plan: the clinic's settings, the dietitian's choices per item and
 * the candidate foods (zod schemas at the edge), and the answer's shape.
 */
import { z } from 'zod';
import type { Nutrients } from '../plans/summary-types.js';
import type { PlanInput } from '../plans/plan.js';

/** The `balancing` setting: how proposals move and what they weigh. */
export const balancingSettingsSchema = z
  .object({
    /** Household measures move in whole or half units. */
    measureStep: z.enum(['whole', 'half']),
    /** Items without a household measure move in steps of this many grams. */
    gramStepG: z.number().positive().max(100),
    /** An adjustable item stays within these shares of its current amount (0.5 = 50%). */
    minShare: z.number().min(0.1).max(1),
    maxShare: z.number().min(1).max(5),
    /** How many new foods one day may gain. */
    maxNewFoodsPerDay: z.number().int().min(0).max(10),
    /** Closeness penalty: mg of absorbable phosphorus counted per 100 g moved away from the current amounts. */
    deviationPenaltyMgPer100g: z.number().min(0).max(100),
    /** Penalty for each new food, in mg of absorbable phosphorus (a new food is a new habit). */
    newFoodPenaltyMg: z.number().min(0).max(1000),
    /** Each main meal carries at least this share of the day's protein (null = no rule). */
    mealProteinMinShare: z.number().min(0).max(0.5).nullable(),
    /** Calcium from food at most this many mg a day (null = no limit). */
    calciumMaxMg: z.number().positive().max(5000).nullable(),
    /** A candidate food is offered up to this many grams (and at most two of its portions). */
    candidateMaxGrams: z.number().positive().max(1000),
  })
  .strict();
export type BalancingSettings = z.infer<typeof balancingSettingsSchema>;

export const DEFAULT_BALANCING: BalancingSettings = {
  measureStep: 'whole', // common practice, no source: a patient follows whole units best
  gramStepG: 5, // common practice, no source: a kitchen scale reads in 5 g steps or finer
  minShare: 0.5, // common practice, no source
  maxShare: 2, // common practice, no source
  maxNewFoodsPerDay: 2, // common practice, no source
  deviationPenaltyMgPer100g: 10, // common practice, no source: below the 20-300 mg absorbable P per 100 g of protein foods, above fruit and vegetables
  newFoodPenaltyMg: 20, // common practice, no source
  mealProteinMinShare: null, // off unless the clinic sets it (e.g. 0.2)
  calciumMaxMg: null, // off unless the clinic sets it
  candidateMaxGrams: 250, // common practice, no source
};

export const BALANCING_SOURCES: Record<keyof BalancingSettings, string> = {
  measureStep: 'common practice, no source',
  gramStepG: 'common practice, no source',
  minShare: 'common practice, no source',
  maxShare: 'common practice, no source',
  maxNewFoodsPerDay: 'common practice, no source',
  deviationPenaltyMgPer100g: 'common practice, no source (a weighting, not a measurement)',
  newFoodPenaltyMg: 'common practice, no source (a weighting, not a measurement)',
  mealProteinMinShare: 'set by the clinic; no default',
  calciumMaxMg:
    'set by the clinic; KDOQI 2003 Guideline 5 limits total elemental calcium to 2,000 mg/day including binders',
  candidateMaxGrams: 'common practice, no source',
};

/** What the dietitian says about one item of the plan (days and items numbered from 1). */
export const itemChoiceSchema = z
  .object({
    day: z.number().int().min(1),
    occasion: z.number().int().min(1),
    item: z.number().int().min(1),
    mode: z.enum(['keep', 'adjust']),
    minShare: z.number().min(0.1).max(1).optional(),
    maxShare: z.number().min(1).max(5).optional(),
    removable: z.boolean().optional(),
  })
  .strict();
export type ItemChoice = z.infer<typeof itemChoiceSchema>;

/** A food the proposal may add, to the occasion of that name (on one day, or on every balanced day). */
export const candidateInputSchema = z
  .object({
    foodId: z.number().int().positive(),
    occasion: z.string().trim().min(1).max(60),
    day: z.number().int().min(1).optional(),
    maxGrams: z.number().positive().max(1000).optional(),
  })
  .strict();
export type CandidateInput = z.infer<typeof candidateInputSchema>;

/** The request of the HTTP route (the CLI builds the same). */
export const balanceRequestSchema = z
  .object({
    day: z.number().int().min(1).optional(),
    robust: z.boolean().optional(),
    accept: z.boolean().optional(),
    items: z.array(itemChoiceSchema).max(500).optional(),
    /** Foods picked by the dietitian; without them the product's own swap candidates are used. */
    candidates: z.array(candidateInputSchema).max(300).optional(),
    /** Use the swap candidates for the heaviest loads as well (default: when no candidates are given). */
    swapCandidates: z.boolean().optional(),
    settings: balancingSettingsSchema.partial().optional(),
  })
  .strict();
export type BalanceRequest = z.infer<typeof balanceRequestSchema>;

/** A candidate placed in the plan (0-based day and occasion). */
export interface PlacedCandidate {
  foodId: number;
  day: number;
  occasion: number;
  maxGrams?: number;
}

export type LimitKey =
  | 'proteinG.min'
  | 'proteinG.max'
  | 'energyKcal.min'
  | 'energyKcal.max'
  | 'sodiumMg.max'
  | 'potassiumMg.max'
  | 'phosphorusMg.max'
  | 'calciumMg.max'
  | 'mealProtein.min';

export interface BindingLimit {
  /** `day 1 proteinG.min`, `day 2 mealProtein.min Lunch`. */
  limit: string;
  /** mg of absorbable phosphorus per `unit` (objective units: closeness penalty included). */
  price: number;
  unit: string;
  day: number;
  explanation: string;
}

export interface RelaxedLimit {
  limit: string;
  /** How far the nearest plan misses it, in `unit`. */
  by: number;
  unit: string;
  day: number;
  explanation: string;
}

export interface BalanceChange {
  day: number;
  occasion: string;
  foodId: number;
  foodName: string;
  gramsBefore: number;
  gramsAfter: number;
  /** Household measure before and after ("2 x slice"), or null for grams. */
  measureBefore: string | null;
  measureAfter: string | null;
}

export interface BalanceDay {
  day: number;
  label: string;
  before: Nutrients;
  after: Nutrients;
}

export interface BalanceResult {
  status: 'optimal' | 'relaxed' | 'unchanged';
  /** The balanced day's totals (or the plan's average per day when the whole plan was balanced). */
  before: Nutrients;
  after: Nutrients;
  days: BalanceDay[];
  changes: BalanceChange[];
  binding: BindingLimit[];
  relaxed: RelaxedLimit[];
  /** The whole plan with the changes, as `plan create` and the plan routes accept it. */
  proposal: PlanInput;
  objective: 'typical' | 'high';
  balanced: { days: number[] };
  notes: string[];
  solver: { name: string; status: string; ms: number };
  caution: string;
}

export const BALANCE_CAUTION =
  'A suggestion for the dietitian to review, not a prescription: it never goes below the protein target to save phosphorus, never changes the phosphate binder prescription, and its absorbable phosphorus is an estimate. Check it with the patient and the care team before using it.';
