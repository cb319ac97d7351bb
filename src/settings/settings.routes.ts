import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { SettingsService } from './settings.service.js';

const params = z.object({ key: z.string().min(1).max(60) });

/** `GET /api/settings/:key`, `PUT /api/settings/:key` (body: the value), `DELETE` resets to the default. */
export const settingsRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (
  app,
  { db, clock },
) => {
  const service = new SettingsService(db, clock);
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/settings/:key',
    { schema: { tags: ['settings'], summary: 'A setting with its default and source', params } },
    async (req) => service.view(req.params.key),
  );

  api.put(
    '/settings/:key',
    {
      schema: {
        tags: ['settings'],
        summary: 'Replace a setting (validated against its schema)',
        params,
        body: z.unknown(),
      },
    },
    async (req) => service.set(req.params.key, req.body),
  );

  api.delete(
    '/settings/:key',
    { schema: { tags: ['settings'], summary: 'Reset a setting to its default', params } },
    async (req) => service.reset(req.params.key),
  );
};
