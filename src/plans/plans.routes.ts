import type { FastifyPluginAsync, FastifyReply, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { FoodRepository } from '../foods/foods.repository.js';
import '../patients/patients.routes.js'; // declares config.patientData for these routes too
import { planInputSchema } from './plan.js';
import { binderSummarySchema, planSummarySchema } from './summary.schema.js';
import { settingsSource } from './plan-settings-source.js';
import { PlanRepository } from './plans.repository.js';
import { PlanService, toPlanVersionJson } from './plans.service.js';
import { SwapService } from './swaps.service.js';
import { MAX_SWAPS } from './swaps.js';

const idParams = z.object({ id: z.coerce.number().int().positive() });
const versionQuery = z.object({ version: z.coerce.number().int().positive().optional() });

async function planPatient(db: Db, req: FastifyRequest) {
  const id = Number((req.params as { id?: string }).id);
  if (!Number.isInteger(id)) return null;
  return new PlanRepository(db.kysely).patientIdOf(id);
}

export function toPlanListEntry(h: {
  id: number;
  patientId: number;
  name: string;
  days: number;
  latestVersion: number;
  isDemo: boolean;
  updatedAt: string;
}) {
  return {
    id: h.id,
    patientId: h.patientId,
    name: h.name,
    days: h.days,
    latestVersion: h.latestVersion,
    isDemo: h.isDemo,
    updatedAt: h.updatedAt,
  };
}

/**
 * Plans, their immutable versions, summaries, binder schedules and swaps. Every route that
 * touches a patient's plan carries `config.patientData` and an audit entry.
 */
export const planRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  const foods = new FoodRepository(opts.db.kysely);
  const settings = settingsSource(opts.db);
  const service = new PlanService(opts.db.kysely, opts.clock, foods, settings);
  const swaps = new SwapService(opts.db.kysely, foods, settings);
  const api = app.withTypeProvider<ZodTypeProvider>();
  const audit = (action: string) => ({ action, entity: 'plan', patientOf: planPatient });

  api.get(
    '/plans',
    {
      config: { patientData: true, audit: { action: 'plan.list', entity: 'plan', idParam: false } },
      schema: {
        tags: ['plans'],
        summary: 'Every plan: id, patient, name, number of days',
        querystring: z.object({ patientId: z.coerce.number().int().positive().optional() }),
      },
    },
    async (req) => (await service.list(req.query.patientId)).map(toPlanListEntry),
  );

  api.get(
    '/patients/:patientId/plans',
    {
      config: { patientData: true, audit: { action: 'plan.list', entity: 'plan', idParam: false } },
      schema: {
        tags: ['plans'],
        summary: "A patient's plans",
        params: z.object({ patientId: z.coerce.number().int().positive() }),
      },
    },
    async (req) => (await service.list(req.params.patientId)).map(toPlanListEntry),
  );

  api.post(
    '/patients/:patientId/plans',
    {
      config: {
        patientData: true,
        audit: { action: 'plan.create', entity: 'plan', idParam: false },
      },
      schema: {
        tags: ['plans'],
        summary: 'Create a plan (its first version) for a patient',
        description:
          "Each item gives grams, or a household measure of that same food ({portionId, count}) converted with the table's gram weight. Unknown foods, quantities <= 0 or over 5 kg and measures of another food are refused with 400 naming the field; nothing is saved.",
        params: z.object({ patientId: z.coerce.number().int().positive() }),
        body: planInputSchema,
      },
    },
    async (req, reply) => {
      const { header, version } = await service.create(req.params.patientId, req.body);
      req.auditInfo = { entityId: header.id, patientId: header.patientId };
      return reply.status(201).send(toPlanVersionJson(header, version));
    },
  );

  api.get(
    '/plans/:id',
    {
      config: { patientData: true, audit: audit('plan.read') },
      schema: {
        tags: ['plans'],
        summary: 'A plan (latest version, or ?version=N)',
        params: idParams,
        querystring: versionQuery,
      },
    },
    async (req) => {
      const { header, version } = await service.get(req.params.id, req.query.version);
      return toPlanVersionJson(header, version);
    },
  );

  api.put(
    '/plans/:id',
    {
      config: { patientData: true, audit: audit('plan.save') },
      schema: {
        tags: ['plans'],
        summary: 'Save a new version of a plan (earlier versions stay unchanged)',
        params: idParams,
        body: planInputSchema,
      },
    },
    async (req) => {
      const { header, version } = await service.save(req.params.id, req.body);
      return toPlanVersionJson(header, version);
    },
  );

  api.get(
    '/plans/:id/versions',
    {
      config: { patientData: true, audit: audit('plan.versions.read') },
      schema: {
        tags: ['plans'],
        summary: 'Saved versions of a plan, oldest first',
        params: idParams,
      },
    },
    async (req) => service.versions(req.params.id),
  );

  api.get(
    '/plans/:id/versions/:version',
    {
      config: { patientData: true, audit: audit('plan.read') },
      schema: {
        tags: ['plans'],
        summary: 'One saved version exactly as it was saved',
        params: z.object({
          id: z.coerce.number().int().positive(),
          version: z.coerce.number().int().positive(),
        }),
      },
    },
    async (req) => {
      const { header, version } = await service.get(req.params.id, req.params.version);
      return toPlanVersionJson(header, version);
    },
  );

  api.get(
    '/plans/:id/summary',
    {
      config: { patientData: true, audit: audit('plan.summary.read') },
      schema: {
        tags: ['plans'],
        summary:
          'Totals per item, occasion, day and plan average against the targets; contributors, flags, binder schedule',
        description:
          'Computed from what the version froze when it was saved, so a past consult shows again exactly. Estimates only.',
        params: idParams,
        querystring: versionQuery,
        response: { 200: planSummarySchema },
      },
    },
    async (req, reply) => {
      // Serialised (and gzipped) once per immutable version; large plans are ~150 KB of JSON.
      const gzip = /\bgzip\b/.test(String(req.headers['accept-encoding'] ?? ''));
      const bytes = await service.getSummaryBytes(
        req.params.id,
        req.query.version,
        gzip ? 'gzip' : 'identity',
      );
      const raw: FastifyReply = reply; // bytes of the schema's shape: Fastify sends a Buffer as is
      raw.header('vary', 'accept-encoding').type('application/json; charset=utf-8');
      if (gzip) raw.header('content-encoding', 'gzip');
      return raw.send(bytes);
    },
  );

  api.get(
    '/plans/:id/binders',
    {
      config: { patientData: true, audit: audit('plan.binders.read') },
      schema: {
        tags: ['plans'],
        summary:
          'The prescribed binder spread over the occasions, with reasons, timing and calcium load',
        params: idParams,
        querystring: versionQuery,
        response: { 200: binderSummarySchema },
      },
    },
    async (req) => (await service.getSummary(req.params.id, req.query.version)).binders,
  );

  api.get(
    '/plans/:id/swaps',
    {
      config: { patientData: true, audit: audit('plan.swaps.read') },
      schema: {
        tags: ['plans'],
        summary: 'Swaps for each top phosphorus contributor of the plan, from the imported tables',
        params: idParams,
        querystring: versionQuery.extend({
          limit: z.coerce.number().int().min(1).max(MAX_SWAPS).default(MAX_SWAPS),
        }),
      },
    },
    async (req) => {
      const summary = await service.getSummary(req.params.id, req.query.version);
      const out = [];
      for (const c of summary.topContributors) {
        const exists = (await foods.getFoods([c.foodId])).has(c.foodId);
        out.push({
          contributor: c,
          swaps: exists ? await swaps.findSwaps(c.foodId, req.query.limit) : null,
        });
      }
      return out;
    },
  );

  api.get(
    '/swaps/:foodId',
    {
      schema: {
        tags: ['plans'],
        summary:
          'Up to five foods of the same group with clearly less absorbable phosphorus per g protein (or per portion)',
        params: z.object({ foodId: z.coerce.number().int().positive() }),
        querystring: z.object({
          limit: z.coerce.number().int().min(1).max(MAX_SWAPS).default(MAX_SWAPS),
        }),
      },
    },
    async (req) => swaps.findSwaps(req.params.foodId, req.query.limit),
  );
};
