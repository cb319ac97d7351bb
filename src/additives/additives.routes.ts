import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { ADDITIVE_CATALOGUE, ADDITIVE_CATALOGUE_VERSION } from './catalogue.js';
import { analyzeIngredients } from './ingredient-parser.js';

export const analyzeBodySchema = z.object({
  text: z.string().max(20000, 'text must be at most 20,000 characters'),
  language: z.string().max(35).nullish(),
});

/** `POST /api/ingredients/analyze` and `GET /api/additives` (the catalogue). */
export const additivesRoutes: FastifyPluginAsync = async (app) => {
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.post(
    '/ingredients/analyze',
    {
      schema: {
        tags: ['additives'],
        summary: 'Phosphate additives named in an ingredient statement',
        body: analyzeBodySchema,
      },
    },
    async (req) => ({
      ...analyzeIngredients(req.body.text, req.body.language ?? null),
      catalogueVersion: ADDITIVE_CATALOGUE_VERSION,
    }),
  );

  api.get(
    '/additives',
    { schema: { tags: ['additives'], summary: 'The phosphorus additive catalogue' } },
    async () => ({ catalogueVersion: ADDITIVE_CATALOGUE_VERSION, additives: ADDITIVE_CATALOGUE }),
  );
};
