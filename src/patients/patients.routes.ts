import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { patientInputSchema, patientUpdateSchema } from './patient.js';
import { PatientService } from './patients.service.js';
import { toPatientJson } from './patient.json.js';

declare module 'fastify' {
  interface FastifyContextConfig {
    /** The route reads or writes patient data (health information): guarded and audited. */
    patientData?: boolean;
  }
}

const idParams = z.object({ id: z.coerce.number().int().positive() });

/** Patient records and their targets, under `/api/patients` (every route is patient data). */
export const patientRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  const service = new PatientService(opts.db.kysely, opts.clock);
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/patients',
    {
      config: {
        patientData: true,
        audit: { action: 'patient.list', entity: 'patient', idParam: false },
      },
      schema: { tags: ['patients'], summary: 'Every patient record (label, stage, modality)' },
    },
    async () =>
      (await service.list()).map((p) => ({
        id: p.id,
        label: p.label,
        name: p.name,
        language: p.language,
        weightKg: p.weightKg,
        ckdStage: p.ckdStage,
        dialysis: p.dialysis,
        diabetes: p.diabetes,
        isDemo: p.isDemo,
        updatedAt: p.updatedAt,
      })),
  );

  api.post(
    '/patients',
    {
      config: {
        patientData: true,
        audit: { action: 'patient.create', entity: 'patient', idParam: false },
      },
      schema: {
        tags: ['patients'],
        summary: 'Create a patient record',
        description:
          'Weight is the one the clinician chose for targets (kg, 20-300). Dialysis means stage 5. Lab results in mg/dL or mmol/L are converted with IUPAC atomic weights.',
        body: patientInputSchema,
      },
    },
    async (req, reply) => {
      const p = await service.create(req.body, { by: req.user?.username ?? null });
      req.auditInfo = { entityId: p.id, patientId: p.id };
      return reply.status(201).send(toPatientJson(p));
    },
  );

  api.get(
    '/patients/:id',
    {
      config: { patientData: true, audit: { action: 'patient.read', entity: 'patient' } },
      schema: {
        tags: ['patients'],
        summary: 'One patient with computed targets',
        params: idParams,
      },
    },
    async (req) => toPatientJson(await service.get(req.params.id)),
  );

  api.patch(
    '/patients/:id',
    {
      config: { patientData: true, audit: { action: 'patient.update', entity: 'patient' } },
      schema: {
        tags: ['patients'],
        summary: 'Change fields of a patient record (the merged record is validated again)',
        params: idParams,
        body: patientUpdateSchema,
      },
    },
    async (req) =>
      toPatientJson(await service.update(req.params.id, req.body, req.user?.username ?? null)),
  );

  api.get(
    '/patients/:id/targets',
    {
      config: { patientData: true, audit: { action: 'patient.targets.read', entity: 'patient' } },
      schema: {
        tags: ['patients'],
        summary: 'Daily targets with the source of each default and any dietitian override',
        params: idParams,
      },
    },
    async (req) => service.targets(req.params.id),
  );
};
