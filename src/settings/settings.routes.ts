import type { FastifyPluginAsync, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import type { SettingView } from './settings.js';
import { RESET, SettingsService } from './settings.service.js';

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

  /** Old and new values, as JSON text, in the audit event (settings hold no patient data). */
  const recordChange = (
    req: FastifyRequest,
    change: { before: SettingView; after: SettingView },
  ): SettingView => {
    req.auditInfo = {
      details: {
        old: JSON.stringify(change.before.value),
        new: JSON.stringify(change.after.value),
        oldIsDefault: change.before.isDefault,
        newIsDefault: change.after.isDefault,
      },
    };
    return change.after;
  };

  api.put(
    '/settings/:key',
    {
      config: { audit: { action: 'setting.update', entity: 'setting', idParam: 'key' } },
      schema: {
        tags: ['settings'],
        summary: 'Replace a setting (validated against its schema; admin-only settings say so)',
        params,
        body: z.unknown(),
      },
    },
    async (req) =>
      recordChange(req, await service.change(req.user!.role, req.params.key, req.body)),
  );

  api.delete(
    '/settings/:key',
    {
      config: { audit: { action: 'setting.reset', entity: 'setting', idParam: 'key' } },
      schema: { tags: ['settings'], summary: 'Reset a setting to its default', params },
    },
    async (req) => recordChange(req, await service.change(req.user!.role, req.params.key, RESET)),
  );
};
