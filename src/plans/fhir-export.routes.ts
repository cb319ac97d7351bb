import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { loadCataloguesOrThrow, type Languages } from '../i18n/loader.js';
import { PlanFhirExportService } from './fhir-export.service.js';

const params = z.object({ id: z.coerce.number().int().positive() });
const query = z.object({
  version: z.coerce.number().int().positive().optional(),
  lang: z.string().max(20).optional(),
});

/** `GET /api/plans/:id/fhir`: the plan (latest or `?version=N`) as a FHIR R4 Bundle. */
export const planFhirRoutes: FastifyPluginAsync<{
  db: Db;
  clock: Clock;
  languages?: Languages;
}> = async (app, opts) => {
  const service = new PlanFhirExportService(
    opts.db,
    opts.clock,
    opts.languages ?? loadCataloguesOrThrow(),
  );
  const api = app.withTypeProvider<ZodTypeProvider>();
  api.get(
    '/plans/:id/fhir',
    {
      config: {
        patientData: true,
        audit: { action: 'plan.export-fhir', entity: 'plan' },
      },
      schema: {
        tags: ['plans', 'fhir'],
        summary:
          'The plan as a FHIR R4 Bundle: NutritionOrder and the handout PDF (DocumentReference)',
        params,
        querystring: query,
      },
    },
    async (req, reply) => {
      const { bundle, patientId } = await service.export(req.params.id, req.query);
      req.auditInfo = { patientId };
      return reply.type('application/fhir+json; charset=utf-8').send(JSON.stringify(bundle));
    },
  );
};
