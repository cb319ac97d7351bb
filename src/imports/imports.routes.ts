import { createWriteStream } from 'node:fs';
import { statfs } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { pipeline } from 'node:stream/promises';
import multipart from '@fastify/multipart';
import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { unpackLimitsFromEnv } from '../../data-import/importer.js';
import { findImporter, importers } from '../../data-import/registry.js';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { DiaryAuditService } from '../diary/diary.service.js';
import { AppError, BadRequestError, NotFoundError } from '../errors.js';
import { importFieldsSchema, MAX_IMPORT_BYTES, type ImportJob } from './imports.js';
import { ImportJobs } from './imports.service.js';

/** Refuses an upload the temp folder has no room for (its declared length, plus 64 MiB). */
async function refuseWithoutDisk(lengthBytes: number): Promise<void> {
  if (!(lengthBytes > 0)) return;
  const free = await statfs(tmpdir()).then(
    (s) => s.bavail * s.bsize,
    () => Number.POSITIVE_INFINITY,
  );
  const need = lengthBytes + 64 * 1024 * 1024;
  if (free < need) {
    throw new AppError(
      'PHL_IMPORT_DISK_SPACE',
      507,
      `not enough free disk to receive this upload: it needs about ${Math.ceil(need / 1024 ** 2)} MiB in the temporary folder, ${Math.floor(free / 1024 ** 2)} MiB are free`,
    );
  }
}

function toJobJson(j: ImportJob) {
  return { ...j };
}

/**
 * Food-table imports from an uploaded file: `POST /api/imports` (multipart: fields `format` and
 * optional `release` first, then the file in field `file`) answers 202 with the job at once; the
 * import runs in the background and `GET /api/imports/:id` shows its progress and result.
 */
export const importRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  await app.register(multipart, {
    throwFileSizeLimit: false,
    limits: { fileSize: MAX_IMPORT_BYTES, files: 1, fields: 5, fieldSize: 200 },
  });
  // After an import, diary audits' name indexes and foods are rebuilt for the new tables.
  // Unpack limits from the environment, read once here (defaults in DEFAULT_UNPACK_LIMITS).
  const limits = unpackLimitsFromEnv(process.env);
  const jobs = new ImportJobs(opts.db, opts.clock, limits, (signal) =>
    new DiaryAuditService(opts.db, opts.clock, { longRunning: true }).prepare({ signal }),
  );
  app.addHook('onClose', async () => {
    jobs.stop();
    await jobs.idle();
  });
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/imports/formats',
    { schema: { tags: ['imports'], summary: 'Food-table formats an upload can be imported as' } },
    async () =>
      importers
        .filter((i) => !i.pathOptional)
        .map((i) => ({ format: i.format, title: i.title, where: i.where, pathHint: i.pathHint })),
  );

  api.get(
    '/imports',
    {
      schema: {
        tags: ['imports'],
        summary: 'Upload imports since the server started, newest first',
      },
    },
    async () => jobs.list().map(toJobJson),
  );

  api.get(
    '/imports/:id',
    {
      schema: {
        tags: ['imports'],
        summary: 'One upload import: state, progress (bytes read) and, when finished, the result',
        params: z.object({ id: z.coerce.number().int().positive() }),
      },
    },
    async (req) => {
      const job = jobs.get(req.params.id);
      if (!job) throw new NotFoundError('import', req.params.id);
      return toJobJson(job);
    },
  );

  api.post(
    '/imports',
    {
      // The file is streamed to disk by the multipart reader (never buffered); this route's own
      // limit is the largest upload plus room for the form fields.
      bodyLimit: MAX_IMPORT_BYTES + 1024 * 1024,
      config: {
        role: 'admin',
        audit: { action: 'import.start', entity: 'import', idParam: false },
      },
      schema: {
        tags: ['imports'],
        summary: 'Start importing an uploaded food table (multipart: format, release?, then file)',
        description:
          'The file is saved to a temporary folder and imported in the background in one transaction: a failed import changes nothing. Poll GET /api/imports/:id for progress.',
      },
    },
    async (req, reply) => {
      if (!req.isMultipart()) {
        throw new BadRequestError(
          'PHL_IMPORT_UPLOAD',
          'send multipart/form-data with the file in field "file"',
        );
      }
      await refuseWithoutDisk(Number(req.headers['content-length'] ?? 0));
      // One import at a time, one waiting: refused before a byte of the upload is saved.
      jobs.reserve();
      let reserved = true;
      const fields: Record<string, string> = {};
      let job: ImportJob | undefined;
      try {
        for await (const part of req.parts()) {
          if (part.type !== 'file') {
            if (typeof part.value === 'string') fields[part.fieldname] = part.value;
            continue;
          }
          if (job) throw new BadRequestError('PHL_IMPORT_UPLOAD', 'send one file per import');
          const parsed = importFieldsSchema.safeParse(fields);
          if (!parsed.success) {
            throw new BadRequestError(
              'PHL_IMPORT_UPLOAD',
              `${parsed.error.issues.map((i) => `${i.path.join('.') || 'fields'}: ${i.message}`).join('; ')} (send the fields before the file)`,
            );
          }
          const importer = findImporter(parsed.data.format);
          if (!importer || importer.pathOptional) {
            throw new BadRequestError(
              'PHL_IMPORT_FORMAT',
              `unknown format '${parsed.data.format}'; one of: ${importers
                .filter((i) => !i.pathOptional)
                .map((i) => i.format)
                .join(', ')}`,
            );
          }
          reserved = false; // start() owns the reservation from here
          job = await jobs.start(
            importer,
            {
              fileName: part.filename || 'upload',
              sink: {
                async saveTo(path) {
                  let bytes = 0;
                  part.file.on('data', (c: Buffer) => (bytes += c.length));
                  await pipeline(part.file, createWriteStream(path));
                  if (part.file.truncated) {
                    throw new AppError(
                      'PHL_IMPORT_TOO_LARGE',
                      413,
                      `the file is larger than ${MAX_IMPORT_BYTES} bytes`,
                    );
                  }
                  if (bytes === 0)
                    throw new BadRequestError('PHL_IMPORT_EMPTY', 'the uploaded file is empty');
                  return bytes;
                },
              },
            },
            { release: parsed.data.release, startedBy: req.user?.username ?? null },
          );
        }
      } finally {
        if (reserved) jobs.release();
      }
      if (!job)
        throw new BadRequestError('PHL_IMPORT_UPLOAD', 'no file in the upload (field "file")');
      req.auditInfo = { entityId: job.id, details: { format: job.format } };
      return reply.status(202).send(toJobJson(job));
    },
  );
};
