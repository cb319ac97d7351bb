import { writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { cliActor } from '../audit/actors.js';
import { recordAudit } from '../audit/audit.service.js';
import { UsageError, type Command } from '../cli/command.js';
import { systemClock } from '../clock.js';
import { AppError } from '../errors.js';
import { loadCataloguesOrThrow } from '../i18n/loader.js';
import { PlanFhirExportService } from './fhir-export.service.js';

/** `phosledger plan export-fhir PLAN [--out FILE]` */
export const planExportFhir: Command = {
  path: ['plan', 'export-fhir'],
  usage: 'PLAN [--out FILE] [--version N] [--lang LANG]',
  summary: 'write a plan as a FHIR R4 Bundle (NutritionOrder and the handout PDF) as JSON',
  minPositionals: 1,
  options: { out: { type: 'string' }, version: { type: 'string' }, lang: { type: 'string' } },
  async run(ctx) {
    const planId = Number(ctx.args.positionals[0]);
    if (!Number.isInteger(planId) || planId <= 0) {
      throw new UsageError('PLAN must be a plan id (a positive whole number)');
    }
    const v = ctx.args.values;
    const version = typeof v.version === 'string' ? Number(v.version) : undefined;
    if (version !== undefined && !(Number.isInteger(version) && version > 0)) {
      throw new UsageError('--version must be a positive whole number');
    }
    const db = await ctx.db();
    const service = new PlanFhirExportService(db, systemClock, loadCataloguesOrThrow());
    try {
      const { bundle, patientId } = await service.export(planId, {
        version,
        lang: typeof v.lang === 'string' ? v.lang : undefined,
      });
      await recordAudit(db, {
        ...cliActor(),
        action: 'plan.export-fhir',
        entity: 'plan',
        entityId: planId,
        patientId,
      });
      const json = `${JSON.stringify(bundle, null, 2)}\n`;
      if (typeof v.out === 'string' && v.out.trim() !== '') {
        const file = resolve(v.out);
        // patient data: readable by the service's own account only
        writeFileSync(file, json, { mode: 0o600 });
        ctx.stdout.write(`wrote ${file} (FHIR R4 Bundle: NutritionOrder, DocumentReference)\n`);
      } else {
        ctx.stdout.write(json);
      }
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message} (${err.code})\n`);
        return 1;
      }
      throw err;
    }
  },
};
