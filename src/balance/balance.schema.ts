import { z } from 'zod';
import { planInputSchema } from '../plans/plan.js';
import { nutrientsSchema } from '../plans/summary.schema.js';

/**
 * The balancing answer for the OpenAPI document (mirrors `BalanceResult` in balance.ts; a test
 * parses real answers with it and requires nothing to be lost).
 */
export const balanceResultSchema = z.object({
  status: z
    .enum(['optimal', 'relaxed', 'unchanged'])
    .describe('relaxed: no plan meets every limit; the proposal is the nearest one (see relaxed)'),
  before: nutrientsSchema.describe('the balanced day, or the plan average per day'),
  after: nutrientsSchema,
  days: z.array(
    z.object({
      day: z.number().int(),
      label: z.string(),
      before: nutrientsSchema,
      after: nutrientsSchema,
    }),
  ),
  changes: z.array(
    z.object({
      day: z.number().int().describe('numbered from 1'),
      occasion: z.string(),
      foodId: z.number().int(),
      foodName: z.string(),
      gramsBefore: z.number().describe('0 for a food the proposal adds'),
      gramsAfter: z.number().describe('0 for a food the proposal removes'),
      measureBefore: z.string().nullable(),
      measureAfter: z.string().nullable(),
    }),
  ),
  binding: z.array(
    z.object({
      limit: z.string(),
      price: z.number().describe('mg of absorbable phosphorus per unit, from the LP duals'),
      unit: z.string(),
      day: z.number().int(),
      explanation: z.string(),
    }),
  ),
  relaxed: z.array(
    z.object({
      limit: z.string(),
      by: z.number(),
      unit: z.string(),
      day: z.number().int(),
      explanation: z.string(),
    }),
  ),
  proposal: planInputSchema.describe(
    'the whole plan with the changes, as PUT /api/plans/:id accepts it',
  ),
  objective: z.enum(['typical', 'high']),
  balanced: z.object({ days: z.array(z.number().int()) }),
  notes: z.array(z.string()),
  solver: z.object({ name: z.string(), status: z.string(), ms: z.number() }),
  caution: z.string(),
  saved: z
    .object({ version: z.number().int() })
    .nullable()
    .describe('the new plan version when accept was asked, else null'),
});
