import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { Readable } from 'node:stream';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AuditService, auditCsvHeader, auditCsvLine } from './audit.service.js';
import { auditQuerySchema } from './audit.js';
import { PatientDataService } from './patient-data.service.js';

/** Admin view and export of the audit log. Reading the log is itself recorded. */
export const auditRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (
  app,
  { db, clock },
) => {
  const service = new AuditService(db);
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/admin/audit',
    {
      config: { role: 'admin', audit: { action: 'audit.view', entity: 'audit', idParam: false } },
      schema: {
        tags: ['audit'],
        summary: 'Audit events, newest first (page with `before`)',
        querystring: auditQuerySchema,
      },
    },
    async (req) => {
      const events = await service.list(req.query);
      const last = events[events.length - 1];
      return {
        events,
        nextBefore: events.length === req.query.limit && last ? last.id : null,
      };
    },
  );

  const exportQuery = auditQuerySchema
    .omit({ before: true, limit: true })
    .extend({ format: z.enum(['csv', 'jsonl']).default('csv') });

  api.get(
    '/admin/audit/export',
    {
      config: { role: 'admin', audit: { action: 'audit.export', entity: 'audit', idParam: false } },
      schema: {
        tags: ['audit'],
        summary: 'The whole audit log (or a filtered part) as CSV or JSON lines',
        querystring: exportQuery,
      },
    },
    async (req, reply) => {
      const { format, ...filter } = req.query;
      const events = service.export(filter);
      async function* lines() {
        if (format === 'csv') yield auditCsvHeader();
        for await (const e of events)
          yield format === 'csv' ? auditCsvLine(e) : `${JSON.stringify(e)}\n`;
      }
      const stamp = clock.now().toISOString().slice(0, 10);
      reply
        .type(format === 'csv' ? 'text/csv; charset=utf-8' : 'application/x-ndjson; charset=utf-8')
        .header(
          'content-disposition',
          `attachment; filename="phosledger-audit-${stamp}.${format}"`,
        );
      return reply.send(Readable.from(lines()));
    },
  );
};

/** Export (JSON) and erasure of one patient's data. Erasure is for admins. */
export const patientDataRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (
  app,
  { db, clock },
) => {
  const service = new PatientDataService(db, clock);
  const api = app.withTypeProvider<ZodTypeProvider>();
  const params = z.object({ id: z.coerce.number().int().positive() });

  api.get(
    '/patients/:id/export',
    {
      config: { audit: { action: 'patient.export', entity: 'patient' } },
      schema: {
        tags: ['patients'],
        summary: "Everything stored about one patient, as JSON (the patient's right of access)",
        params,
      },
    },
    async (req, reply) => {
      const data = service.export(req.params.id, req.user!);
      reply.header(
        'content-disposition',
        `attachment; filename="phosledger-patient-${req.params.id}.json"`,
      );
      return data;
    },
  );

  api.post(
    '/patients/:id/erase',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['patients'],
        summary:
          'Delete one patient with plans and diaries; audit events stay under an opaque reference',
        params,
        body: z.object({ confirm: z.literal('erase') }),
      },
    },
    async (req) => service.erase(req.params.id, req.user!),
  );
};
