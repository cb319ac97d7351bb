import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { cliActor } from '../audit/actors.js';
import { recordAudit } from '../audit/audit.service.js';
import { systemClock } from '../clock.js';
import type { Db } from '../db/database.js';
import { guarded, UsageError, type Command } from '../cli/command.js';
import { analyteLabel, toLabListItem } from './lab-results.js';
import { LabService } from './labs.service.js';

function service(db: Db) {
  return new LabService(db.kysely, systemClock);
}

function patientId(text: string | undefined): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n <= 0)
    throw new UsageError('PATIENT must be a patient id (a positive whole number)');
  return n;
}

export const labsAdd: Command = {
  path: ['labs', 'add'],
  usage: 'PATIENT --analyte A --value V --unit U --date YYYY-MM-DD',
  summary: 'record one lab result as written on the report (converted with UCUM)',
  minPositionals: 1,
  options: {
    analyte: { type: 'string' },
    value: { type: 'string' },
    unit: { type: 'string' },
    date: { type: 'string' },
  },
  async run(ctx) {
    const id = patientId(ctx.args.positionals[0]);
    const v = ctx.args.values;
    for (const k of ['analyte', 'value', 'unit', 'date'] as const) {
      if (typeof v[k] !== 'string') throw new UsageError(`--${k} is required`);
    }
    const value = Number(v.value);
    if (String(v.value).trim() === '' || !Number.isFinite(value))
      throw new UsageError('--value must be a number');
    return guarded(ctx, async () => {
      const db = await ctx.db();
      const actor = cliActor();
      const r = await service(db).add(
        id,
        { analyte: v.analyte, value, unit: v.unit, date: v.date },
        actor.username,
      );
      await recordAudit(db, {
        ...actor,
        action: 'labs.add',
        entity: 'patient',
        entityId: id,
        patientId: id,
      });
      ctx.stdout.write(
        `${r.date} ${analyteLabel(r.analyte)} ${r.value} ${r.unit} = ${r.canonicalValue} ${r.canonicalUnit} recorded\n`,
      );
    });
  },
};

export const labsList: Command = {
  path: ['labs', 'list'],
  usage: 'PATIENT [--json]',
  summary: "list a patient's lab results, newest first, as entered and in the canonical unit",
  minPositionals: 1,
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const id = patientId(ctx.args.positionals[0]);
    return guarded(ctx, async () => {
      const db = await ctx.db();
      const list = await service(db).list(id);
      const actor = cliActor();
      await recordAudit(db, {
        ...actor,
        action: 'labs.list',
        entity: 'patient',
        entityId: id,
        patientId: id,
      });
      if (ctx.args.values.json) {
        ctx.stdout.write(`${JSON.stringify(list.map(toLabListItem), null, 2)}\n`);
        return;
      }
      if (list.length === 0) ctx.stdout.write('no results recorded\n');
      for (const r of list) {
        ctx.stdout.write(
          `${r.date}  ${analyteLabel(r.analyte).padEnd(22)} ${r.value} ${r.unit}  (${r.canonicalValue} ${r.canonicalUnit})  ${r.source}\n`,
        );
      }
    });
  },
};

export const labsImport: Command = {
  path: ['labs', 'import'],
  usage: 'FILE [--json]',
  summary: 'import a FHIR R4 Bundle (JSON) of Observations; patients matched by their identifier',
  minPositionals: 1,
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const file = ctx.args.positionals[0] ?? '';
    let doc: unknown;
    try {
      doc = JSON.parse(readFileSync(file, 'utf8'));
    } catch (err) {
      ctx.stderr.write(`phosledger: cannot read ${file} as JSON: ${(err as Error).message}\n`);
      return 1;
    }
    return guarded(ctx, async () => {
      const db = await ctx.db();
      const actor = cliActor();
      const r = await service(db).importBundle(doc, {
        by: actor.username,
        source: 'file',
        sourceRef: `file ${basename(file)}`,
      });
      for (const p of r.patientIds) {
        await recordAudit(db, {
          ...actor,
          action: 'labs.import.patient',
          entity: 'patient',
          entityId: p,
          patientId: p,
        });
      }
      await recordAudit(db, {
        ...actor,
        action: 'labs.import',
        entity: 'lab_result',
        details: { imported: r.imported, duplicates: r.duplicates, rejected: r.rejected.length },
      });
      const out = { imported: r.imported, duplicates: r.duplicates, rejected: r.rejected };
      if (ctx.args.values.json) {
        ctx.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
        return;
      }
      ctx.stdout.write(
        `${r.imported} imported, ${r.duplicates} already stored, ${r.rejected.length} refused\n`,
      );
      for (const x of r.rejected) ctx.stdout.write(`  ${x.reason}\n`);
    });
  },
};

export const labCommands: Command[] = [labsAdd, labsList, labsImport];
