import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Db } from '../db/database.js';
import { NotFoundError } from '../errors.js';
import { foodSearchQuerySchema } from './food.js';
import { toFoodHit, toFoodJson } from './food.json.js';
import { FoodRepository } from './foods.repository.js';
import { FoodService } from './foods.service.js';
import { PhosphorusService } from '../phosphorus/phosphorus.service.js';
import { toPhosphorusJson } from '../phosphorus/phosphorus.json.js';
import {
  foodPreparationJsonSchema,
  toFoodPreparationJson,
} from '../preparation/preparation.json.js';

export const foodRoutes: FastifyPluginAsync<{ db: Db }> = async (app, { db }) => {
  const repo = new FoodRepository(db.kysely);
  const service = new FoodService(repo);
  const phosphorus = new PhosphorusService(db);
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/foods',
    {
      schema: {
        tags: ['foods'],
        summary: 'Type-ahead food search',
        querystring: foodSearchQuerySchema,
      },
    },
    async (req) => {
      const foods = await service.search(req.query);
      const profiles = await phosphorus.profiles(foods);
      return foods.map((f) => ({
        ...toFoodHit(f),
        phosphorus: toPhosphorusJson(
          profiles.get(f.id) as NonNullable<ReturnType<typeof profiles.get>>,
        ),
      }));
    },
  );

  api.get(
    '/foods/:id',
    {
      schema: {
        tags: ['foods'],
        summary: 'One food with every stored nutrient, portions and provenance',
        params: z.object({ id: z.coerce.number().int().positive() }),
        // Only the preparation fields are spelled out; the rest passes through as it always did.
        response: { 200: z.looseObject(foodPreparationJsonSchema.shape) },
      },
    },
    async (req) => {
      const food = await repo.getFood(req.params.id);
      if (!food) throw new NotFoundError('food', req.params.id);
      const [nutrients, source] = await Promise.all([
        repo.getAllNutrients(food.id),
        repo.getProvenance(food.sourceId),
      ]);
      const profile = await phosphorus.profile(food);
      return {
        ...toFoodJson(food),
        phosphorus: toPhosphorusJson(profile),
        ...toFoodPreparationJson(food),
        nutrients: nutrients.map((n) => ({
          code: n.code,
          name: n.name,
          unit: n.unit,
          tag: n.tag,
          valuePer100g: n.value_per_100g,
          derivationCode: n.derivation_code,
          sourceCode: n.source_code,
        })),
        provenance: source
          ? {
              format: source.format,
              table: source.name,
              release: source.release,
              licence: source.licence,
              url: source.url,
              importedAt: source.imported_at,
              codeInTable: food.code,
            }
          : null,
      };
    },
  );

  api.get('/sources', { schema: { tags: ['foods'], summary: 'Imported food tables' } }, async () =>
    (await repo.listSources()).map((s) => ({
      id: s.id,
      format: s.format,
      name: s.name,
      release: s.release,
      licence: s.licence,
      url: s.url,
      importedAt: s.imported_at,
      foods: s.food_count,
      nutrientValues: s.nutrient_value_count,
      portions: s.portion_count,
      skipped: s.skipped_count,
    })),
  );
};
