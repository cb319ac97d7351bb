import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { NotFoundError } from '../errors.js';
import { FoodRepository } from '../foods/foods.repository.js';
import '../patients/patients.routes.js'; // declares config.patientData for these routes too
import { PlanDraftRepository } from './drafts.repository.js';
import { planInputSchema } from './plan.js';
import { settingsSource } from './plan-settings-source.js';
import { PlanService } from './plans.service.js';

const idParams = z.object({ id: z.coerce.number().int().positive() });

/**
 * The plate ledger's autosave: `PUT /api/plans/:id/draft` keeps the plan as being edited
 * (checked exactly as a save) and answers its summary, without adding a version; `GET` gives
 * it back with `stale: true` when a version was saved after it; `DELETE` drops it. Saving a
 * version (`PUT /api/plans/:id`) replaces the draft.
 */
export const planDraftRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  const plans = new PlanService(
    opts.db.kysely,
    opts.clock,
    new FoodRepository(opts.db.kysely),
    settingsSource(opts.db),
  );
  const drafts = new PlanDraftRepository(opts.db.kysely);
  const patientOf = async (_db: Db, req: { params: unknown }) => {
    const id = Number((req.params as { id?: string }).id);
    if (!Number.isInteger(id) || id <= 0) return null;
    try {
      return (await plans.header(id)).patientId;
    } catch {
      return null;
    }
  };
  const audit = (action: string) => ({ action, entity: 'plan', patientOf });
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/plans/:id/draft',
    {
      config: { patientData: true, audit: audit('plan.draft.read') },
      schema: { tags: ['plans'], summary: "The plan's unsaved draft, if any", params: idParams },
    },
    async (req) => {
      const header = await plans.header(req.params.id);
      const d = await drafts.get(req.params.id);
      if (!d) throw new NotFoundError('plan draft', req.params.id);
      return { ...d, stale: d.baseVersion !== header.latestVersion };
    },
  );

  api.put(
    '/plans/:id/draft',
    {
      config: { patientData: true, audit: audit('plan.draft.save') },
      schema: {
        tags: ['plans'],
        summary: 'Autosave the plan being edited (no new version) and get its summary',
        params: idParams,
        body: planInputSchema,
      },
    },
    async (req) => {
      const header = await plans.header(req.params.id);
      const summary = await plans.previewSummary(req.params.id, req.body);
      const at = opts.clock.now().toISOString();
      await drafts.put(
        {
          planId: req.params.id,
          baseVersion: header.latestVersion,
          input: req.body,
          by: req.user?.id ?? null,
        },
        at,
      );
      return { baseVersion: header.latestVersion, updatedAt: at, summary };
    },
  );

  api.delete(
    '/plans/:id/draft',
    {
      config: { patientData: true, audit: audit('plan.draft.discard') },
      schema: { tags: ['plans'], summary: 'Drop the unsaved draft', params: idParams },
    },
    async (req, reply) => {
      await plans.header(req.params.id);
      await drafts.remove(req.params.id);
      return reply.code(204).send();
    },
  );
};
