import { toAuditJson } from './diary.json.js';
import multipart from '@fastify/multipart';
import type { FastifyPluginAsync, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError, BadRequestError } from '../errors.js';
import { PatientService } from '../patients/patients.service.js';
import '../patients/patients.routes.js';
import { DiaryAuditService, type AuditInput } from './diary.service.js';
import { DIARY_LIMITS } from './reader.js';
import { renderDiaryReportHtml } from './report-html.js';
import { renderDiaryReportPdf } from './report-pdf.js';
import { diaryReportView } from './report-view.js';

const formatSchema = z.enum(['csv', 'text', 'auto']).default('auto');
const dateOrderSchema = z.enum(['dmy', 'mdy']).optional();

export const diaryTextBodySchema = z
  .object({
    text: z
      .string()
      .max(DIARY_LIMITS.maxBytes, `text must be at most ${DIARY_LIMITS.maxBytes} characters`),
    format: formatSchema,
    dateOrder: dateOrderSchema,
    patientId: z.number().int().positive().nullable().optional(),
  })
  .strict();

const multipartFieldsSchema = z.object({
  format: formatSchema,
  dateOrder: dateOrderSchema,
  patientId: z.coerce.number().int().positive().optional(),
});

/** `5`, `5.pdf` or `5.html`. */
const auditParams = z.object({
  id: z
    .string()
    .regex(/^\d{1,12}(\.(pdf|html|json))?$/, 'id must be a number, optionally with .pdf or .html'),
});
const matchParams = z.object({
  id: z.coerce.number().int().positive(),
  line: z.coerce.number().int().positive(),
});
export const changeMatchBodySchema = z
  .object({
    foodId: z.number().int().positive(),
    /** 'confirm' keeps the matched food, 'change' picks another; both are remembered. */
    action: z.enum(['confirm', 'change']).optional(),
    remember: z.boolean().default(true),
    /** Which food of the line (0 = the first), when the line names several. */
    part: z.number().int().min(0).max(50).optional(),
    /** The amount eaten as the reviewer enters it ("30 g", "2 slices"); replaces the diary's. */
    quantity: z.string().trim().min(1).max(100).optional(),
  })
  .strict();

async function readUpload(req: FastifyRequest): Promise<AuditInput> {
  const fields: Record<string, string> = {};
  let bytes: Uint8Array | undefined;
  for await (const part of req.parts()) {
    if (part.type === 'file') {
      if (bytes) throw new BadRequestError('PHL_DIARY_UPLOAD', 'send one diary file per audit');
      const buf = await part.toBuffer();
      if (part.file.truncated) {
        throw new AppError(
          'PHL_DIARY_TOO_LARGE',
          413,
          `the diary file is larger than ${DIARY_LIMITS.maxBytes} bytes; split it into smaller files`,
        );
      }
      bytes = buf;
      if (part.filename.toLowerCase().endsWith('.csv') && !fields.format) fields.format = 'csv';
    } else if (typeof part.value === 'string') {
      fields[part.fieldname] = part.value;
    }
  }
  if (!bytes)
    throw new BadRequestError('PHL_DIARY_UPLOAD', "no diary file in the upload (field 'file')");
  const parsed = multipartFieldsSchema.safeParse(fields);
  if (!parsed.success) {
    throw new BadRequestError(
      'PHL_REQUEST_INVALID',
      parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '),
    );
  }
  return {
    bytes,
    format: parsed.data.format,
    ...(parsed.data.dateOrder ? { dateOrder: parsed.data.dateOrder } : {}),
    patientId: parsed.data.patientId ?? null,
  };
}

/**
 * Diary audits: upload a CSV or send text, read the saved audit as JSON, an HTML page or a
 * clinician PDF, and confirm or change the food of a line.
 */
export const diaryRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  await app.register(multipart, {
    throwFileSizeLimit: false,
    limits: { fileSize: DIARY_LIMITS.maxBytes, files: 1, fields: 10, fieldSize: 1000 },
  });
  const service = new DiaryAuditService(opts.db, opts.clock, { longRunning: true });
  const patients = new PatientService(opts.db.kysely, opts.clock);
  const api = app.withTypeProvider<ZodTypeProvider>();
  const patientOf = async (_db: Db, req: FastifyRequest) => {
    const id = Number.parseInt(String((req.params as { id?: string }).id ?? ''), 10);
    return Number.isInteger(id) ? service.patientOf(id) : null;
  };

  api.post(
    '/diary-audits',
    {
      bodyLimit: DIARY_LIMITS.maxBytes + 64 * 1024,
      config: {
        patientData: true,
        audit: { action: 'diary.create', entity: 'diary', idParam: false },
      },
      schema: {
        tags: ['diary'],
        summary: 'Audit a food diary: JSON {text} or a multipart CSV upload (field file)',
      },
    },
    async (req, reply) => {
      let input: AuditInput;
      if (req.isMultipart()) input = await readUpload(req);
      else {
        const parsed = diaryTextBodySchema.safeParse(req.body);
        if (!parsed.success) {
          throw new BadRequestError(
            'PHL_REQUEST_INVALID',
            parsed.error.issues.map((i) => `body.${i.path.join('.')}: ${i.message}`).join('; '),
          );
        }
        input = {
          text: parsed.data.text,
          format: parsed.data.format,
          ...(parsed.data.dateOrder ? { dateOrder: parsed.data.dateOrder } : {}),
          patientId: parsed.data.patientId ?? null,
        };
      }
      const saved = await service.create({ ...input, userId: req.user?.id ?? null });
      req.auditInfo = { patientId: saved.patientId, entityId: saved.id };
      return reply.status(201).send(toAuditJson(saved));
    },
  );

  api.get(
    '/diary-audits',
    {
      config: {
        patientData: true,
        audit: { action: 'diary.list', entity: 'diary', idParam: false },
      },
      schema: {
        tags: ['diary'],
        summary: 'Saved diary audits, newest first',
        querystring: z.object({ patientId: z.coerce.number().int().positive().optional() }),
      },
    },
    async (req) =>
      (await service.list(req.query.patientId)).map((r) => ({
        id: r.id,
        patientId: r.patient_id,
        status: r.status,
        entries: r.entry_count,
        matched: r.matched_count,
        createdAt: r.created_at,
      })),
  );

  api.get(
    '/diary-audits/:id',
    {
      config: { patientData: true, audit: { action: 'diary.read', entity: 'diary', patientOf } },
      schema: {
        tags: ['diary'],
        summary: 'One saved audit: JSON, or /:id.html (page) or /:id.pdf (clinician PDF)',
        params: auditParams,
      },
    },
    async (req, reply) => {
      const [idText, ext] = req.params.id.split('.');
      const saved = await service.get(Number(idText));
      if (ext === 'pdf' || ext === 'html') {
        const patient = saved.patientId === null ? null : await patients.get(saved.patientId);
        const view = diaryReportView(saved.report, {
          id: saved.id,
          patientLabel: patient?.label ?? null,
          generatedAt: saved.updatedAt,
        });
        if (ext === 'html') {
          return reply.type('text/html; charset=utf-8').send(renderDiaryReportHtml(view));
        }
        const pdf = await renderDiaryReportPdf(view, new Date(saved.updatedAt));
        return reply
          .type('application/pdf')
          .header(
            'content-disposition',
            `inline; filename="phosledger-diary-audit-${saved.id}.pdf"`,
          )
          .send(pdf);
      }
      return toAuditJson(saved);
    },
  );

  api.post(
    '/diary-audits/:id/entries/:line/match',
    {
      config: { patientData: true, audit: { action: 'diary.match', entity: 'diary', patientOf } },
      schema: {
        tags: ['diary'],
        summary: 'Confirm or change the food of one line; remembered for this clinic',
        params: matchParams,
        body: changeMatchBodySchema,
      },
    },
    async (req) =>
      toAuditJson(
        await service.changeMatch(req.params.id, req.params.line, req.body.foodId, {
          remember: req.body.remember,
          userId: req.user?.id ?? null,
          ...(req.body.part === undefined ? {} : { part: req.body.part }),
          ...(req.body.quantity === undefined ? {} : { quantity: req.body.quantity }),
        }),
      ),
  );
};
