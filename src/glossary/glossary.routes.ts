import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { loadCataloguesOrThrow } from '../i18n/loader.js';
import { glossaryEntryInputSchema, languageTagSchema } from './glossary.js';
import { GlossaryService } from './glossary.service.js';

const entryParams = z.object({
  foodId: z.coerce.number().int().positive('foodId must be a positive whole number'),
  language: languageTagSchema,
});
const listQuery = z
  .object({
    language: languageTagSchema.optional(),
    /** Foods whose starter names are listed too (comma-separated ids, at most 500). */
    foodIds: z
      .string()
      .regex(/^\d+(,\d+)*$/, 'foodIds must be ids separated by commas')
      .optional(),
  })
  .strict();

/**
 * The clinic's food names for handouts ("Food names"): `GET /api/glossary`, `PUT` and `DELETE
 * /api/glossary/:foodId/:language`, `GET /api/glossary.csv`, `POST /api/glossary/import`.
 * Clinic data, not patient data; writes are audited.
 */
export const glossaryRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  const service = new GlossaryService(opts.db.kysely, opts.clock, loadCataloguesOrThrow().list());
  const foods = new FoodRepository(opts.db.kysely);
  const api = app.withTypeProvider<ZodTypeProvider>();
  const audit = (action: string) => ({ action, entity: 'glossary', idParam: 'foodId' as const });

  api.get(
    '/glossary',
    {
      schema: {
        tags: ['glossary'],
        summary: "The clinic's food names per handout language (and drafted starter names)",
        querystring: listQuery,
      },
    },
    async (req) => {
      const ids = (req.query.foodIds?.split(',') ?? []).slice(0, 500).map(Number);
      const list = ids.length ? [...(await foods.getFoods(ids)).values()] : undefined;
      return service.list({ language: req.query.language, ...(list ? { foods: list } : {}) });
    },
  );

  api.put(
    '/glossary/:foodId/:language',
    {
      config: { audit: audit('glossary.set') },
      schema: {
        tags: ['glossary'],
        summary: 'Set the patient-facing name of a food in a language (kept for every patient)',
        params: entryParams,
        body: glossaryEntryInputSchema,
      },
    },
    async (req) =>
      service.set(req.params.foodId, req.params.language, req.body, req.user?.id ?? null),
  );

  api.delete(
    '/glossary/:foodId/:language',
    {
      config: { audit: audit('glossary.remove') },
      schema: { tags: ['glossary'], summary: 'Remove a food name', params: entryParams },
    },
    async (req, reply) => {
      await service.remove(req.params.foodId, req.params.language);
      return reply.code(204).send();
    },
  );

  api.get(
    '/glossary.csv',
    {
      schema: {
        tags: ['glossary'],
        summary:
          'The food names as CSV (food_source, food_code, language, name, status, table_name)',
        querystring: z.object({ language: languageTagSchema.optional() }).strict(),
      },
    },
    async (req, reply) =>
      reply
        .header('content-type', 'text/csv; charset=utf-8')
        .header('content-disposition', 'attachment; filename="phosledger-food-names.csv"')
        .send(await service.exportCsv(req.query.language)),
  );

  api.post(
    '/glossary/import',
    {
      config: { audit: { action: 'glossary.import', entity: 'glossary', idParam: false } },
      schema: {
        tags: ['glossary'],
        summary: 'Import food names from CSV: every line is checked first; all or nothing',
        body: z.object({ csv: z.string().min(1, 'csv is empty').max(5_000_000) }).strict(),
      },
    },
    async (req) => service.importCsv(req.body.csv, req.user?.id ?? null),
  );
};
