import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { labResultInputSchema, toLabListItem } from './lab-results.js';
import { LabService } from './labs.service.js';
import { TrendService } from './trends.service.js';

const idParams = z.object({ id: z.coerce.number().int().positive() });

/** A FHIR R4 Bundle (JSON): checked entry by entry by the importer, which names what it refuses. */
const bundleBody = z.looseObject({ resourceType: z.string() });

/**
 * Lab results: `/api/patients/:id/labs` (list, add, latest per analyte) and
 * `/api/labs/import` (a FHIR R4 Bundle of Observations). Every route is patient data, audited.
 */
export const labRoutes: FastifyPluginAsync<{ db: Db; clock: Clock }> = async (app, opts) => {
  const service = new LabService(opts.db.kysely, opts.clock);
  const trends = new TrendService(opts.db, opts.clock);
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/patients/:id/labs',
    {
      config: { patientData: true, audit: { action: 'labs.list', entity: 'patient' } },
      schema: {
        tags: ['labs'],
        summary: 'Lab results, newest first: as entered and in the canonical unit',
        params: idParams,
      },
    },
    async (req) => (await service.list(req.params.id)).map(toLabListItem),
  );

  api.post(
    '/patients/:id/labs',
    {
      config: { patientData: true, audit: { action: 'labs.add', entity: 'patient' } },
      schema: {
        tags: ['labs'],
        summary: 'Add one result as typed (implausible values are refused)',
        description:
          'analyte: phosphate, calcium, pth, albumin, potassium, bicarbonate, vitamin-d-25oh; unit as written on the report (e.g. mg/dL, mmol/L, mEq/L, pg/mL, pmol/L, g/L, nmol/L); converted with UCUM.',
        params: idParams,
        body: labResultInputSchema,
      },
    },
    async (req, reply) => {
      const r = await service.add(req.params.id, req.body, req.user?.username ?? null);
      return reply.status(201).send(toLabListItem(r));
    },
  );

  api.get(
    '/patients/:id/labs/latest',
    {
      config: { patientData: true, audit: { action: 'labs.latest', entity: 'patient' } },
      schema: {
        tags: ['labs'],
        summary: 'The latest result of each analyte, in its canonical unit',
        params: idParams,
      },
    },
    async (req) => service.latestCanonical(req.params.id),
  );

  api.get(
    '/patients/:id/trends',
    {
      config: { patientData: true, audit: { action: 'labs.trends', entity: 'patient' } },
      schema: {
        tags: ['labs'],
        summary:
          'Results over time with the clinic band, corrected calcium, plan versions (planned daily absorbable phosphorus) and binder changes',
        params: idParams,
      },
    },
    async (req) => trends.trends(req.params.id),
  );

  api.post(
    '/labs/import',
    {
      config: {
        patientData: true,
        audit: { action: 'labs.import', entity: 'lab_result', idParam: false },
      },
      schema: {
        tags: ['labs'],
        summary: 'Import a FHIR R4 Bundle of Observations (LOINC codes, UCUM units)',
        description:
          'Patients are matched by the identifier stored on their record. Accepted entries are stored in one transaction; unknown codes, units and patients come back per entry; results already stored (same analyte, time and value) count as duplicates.',
        body: bundleBody,
      },
    },
    async (req) => {
      const by = req.user?.username ?? null;
      const r = await service.importBundle(req.body, { by, source: 'fhir', sourceRef: null });
      // one event per patient written to, so each patient's access history shows the import
      for (const patientId of r.patientIds) {
        await req.audit('labs.import.patient', {
          patientId,
          entity: 'patient',
          entityId: patientId,
        });
      }
      req.auditInfo = {
        details: { imported: r.imported, duplicates: r.duplicates, rejected: r.rejected.length },
      };
      return { imported: r.imported, duplicates: r.duplicates, rejected: r.rejected };
    },
  );
};
