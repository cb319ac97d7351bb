import type { FastifyPluginAsync, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { FoodRepository } from '../foods/foods.repository.js';
import '../patients/patients.routes.js'; // declares config.patientData for these routes too
import { PlanService } from '../plans/plans.service.js';
import { SwapService } from '../plans/swaps.service.js';
import { balanceRequestSchema } from './balance.js';
import { balanceResultSchema } from './balance.schema.js';
import { BalanceService } from './balance.service.js';
import { balanceSettingsSource } from './balance-settings-source.js';

async function planPatient(db: Db, req: FastifyRequest) {
  const id = Number((req.params as { id?: string }).id);
  if (!Number.isInteger(id)) return null;
  const r = await db.kysely
    .selectFrom('plan')
    .select('patient_id')
    .where('id', '=', id)
    .executeTakeFirst();
  return r?.patient_id ?? null;
}

/** Balancing a plan: the proposal and its explanation; with `accept`, a new version. */
export const balanceRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  const foods = new FoodRepository(opts.db.kysely);
  const settings = balanceSettingsSource(opts.db);
  const plans = new PlanService(opts.db.kysely, opts.clock, foods, settings);
  const swaps = new SwapService(opts.db.kysely, foods, settings);
  const service = new BalanceService(opts.db.kysely, foods, settings, plans, swaps);
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.post(
    '/plans/:id/balance',
    {
      config: {
        patientData: true,
        audit: { action: 'plan.balance', entity: 'plan', patientOf: planPatient },
      },
      schema: {
        tags: ['plans'],
        summary:
          'Balance a day (or the whole plan): protein and energy in range, limits kept, least absorbable phosphorus',
        description:
          'Mixed-integer optimisation (HiGHS) over household-measure or gram steps of the latest version. Answers the changes, day totals before and after (from the plan summary), binding limits priced from the LP duals with the food choices fixed, and, when no plan meets every limit, how far the nearest one misses each. A suggestion for the dietitian: it never goes below the protein target to save phosphorus and never changes the binder prescription. With accept: true the proposal is saved as a new plan version.',
        params: z.object({ id: z.coerce.number().int().positive() }),
        body: balanceRequestSchema,
        response: { 200: balanceResultSchema },
      },
    },
    async (req) => {
      const result = await service.balance(req.params.id, req.body);
      req.auditInfo = {
        details: {
          status: result.status,
          day: req.body.day ?? null,
          changes: result.changes.length,
          savedVersion: result.saved?.version ?? null,
        },
      };
      return result;
    },
  );
};
