import { readFileSync } from 'node:fs';
import { cliActor } from '../audit/actors.js';
import { recordAudit } from '../audit/audit.service.js';
import { systemClock } from '../clock.js';
import { AppError } from '../errors.js';
import { UsageError, type Command } from '../cli/command.js';
import { PatientService } from './patients.service.js';
import { toPatientJson } from './patient.json.js';

export const patientList: Command = {
  path: ['patient', 'list'],
  usage: '[--json]',
  summary: 'list patient records (label, stage, modality)',
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const list = await new PatientService((await ctx.db()).kysely, systemClock).list();
    if (ctx.args.values.json) {
      const json = list.map((p) => ({
        id: p.id,
        label: p.label,
        ckdStage: p.ckdStage,
        dialysis: p.dialysis,
        isDemo: p.isDemo,
      }));
      ctx.stdout.write(`${JSON.stringify(json, null, 2)}\n`);
      return;
    }
    if (list.length === 0) ctx.stdout.write('no patients yet\n');
    for (const p of list) {
      ctx.stdout.write(
        `${String(p.id).padStart(5)}  ${p.label}  CKD ${p.ckdStage}${p.dialysis === 'none' ? '' : ` (${p.dialysis})`}${p.diabetes ? ', diabetes' : ''}, ${p.weightKg} kg${p.isDemo ? '  [demo data]' : ''}\n`,
      );
    }
  },
};

export const patientShow: Command = {
  path: ['patient', 'show'],
  usage: '<id> [--json]',
  summary: 'show a patient record with its targets and their sources',
  minPositionals: 1,
  options: { json: { type: 'boolean' } },
  async run(ctx) {
    const id = Number(ctx.args.positionals[0]);
    if (!Number.isInteger(id) || id <= 0)
      throw new UsageError('<id> must be a positive whole number');
    try {
      const p = toPatientJson(
        await new PatientService((await ctx.db()).kysely, systemClock).get(id),
      );
      if (ctx.args.values.json) {
        ctx.stdout.write(`${JSON.stringify(p, null, 2)}\n`);
        return;
      }
      const out = [
        `${p.label}${p.name ? ` (${p.name})` : ''}${p.isDemo ? '  [demo data]' : ''}`,
        `CKD ${p.ckdStage}, ${p.dialysis === 'none' ? 'not on dialysis' : p.dialysis}, ${p.diabetes ? 'diabetes' : 'no diabetes'}, weight for targets ${p.weightKg} kg, language ${p.language}`,
        `identifier: ${p.identifier ? `${p.identifier.system ?? '(no system)'} | ${p.identifier.value}` : 'not set'}`,
        ...p.labs.map(
          (l) =>
            `  ${l.date} ${l.analyte} ${l.value} ${l.unit}${l.unit === l.canonicalUnit ? '' : ` = ${l.canonicalValue} ${l.canonicalUnit}`}`,
        ),
        `targets per day (${p.targetsCaution}):`,
        ...Object.entries(p.targets).map(
          ([k, t]) =>
            `  ${k}: ${t.min ?? '-'} to ${t.max ?? '-'} ${t.unit} (${t.setBy}); ${t.source}${t.note ? `. ${t.note}` : ''}`,
        ),
      ];
      ctx.stdout.write(`${out.join('\n')}\n`);
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message}\n`);
        return 1;
      }
      throw err;
    }
  },
};

export const patientCreate: Command = {
  path: ['patient', 'create'],
  usage: '--file patient.json',
  summary: 'create a patient record from a JSON file',
  options: { file: { type: 'string' } },
  async run(ctx) {
    const file = ctx.args.values.file;
    if (typeof file !== 'string') throw new UsageError('--file is required');
    let input: unknown;
    try {
      input = JSON.parse(readFileSync(file, 'utf8'));
    } catch (err) {
      ctx.stderr.write(`phosledger: cannot read ${file}: ${(err as Error).message}\n`);
      return 1;
    }
    try {
      const p = await new PatientService((await ctx.db()).kysely, systemClock).create(input);
      ctx.stdout.write(`patient ${p.id} created\n`);
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message}\n`);
        return 1;
      }
      throw err;
    }
  },
};

export const patientSetIdentifier: Command = {
  path: ['patient', 'set-identifier'],
  usage: '<id> --value V [--system URI] | <id> --clear',
  summary:
    "set the identifier the clinic's record system uses for the patient (FHIR results are matched by it)",
  minPositionals: 1,
  options: { value: { type: 'string' }, system: { type: 'string' }, clear: { type: 'boolean' } },
  async run(ctx) {
    const id = Number(ctx.args.positionals[0]);
    if (!Number.isInteger(id) || id <= 0)
      throw new UsageError('<id> must be a positive whole number');
    const { value, system, clear } = ctx.args.values;
    if (!clear && typeof value !== 'string')
      throw new UsageError('--value (or --clear) is required');
    const identifier = clear
      ? null
      : { system: typeof system === 'string' ? system : null, value: String(value) };
    try {
      const db = await ctx.db();
      const actor = cliActor();
      const p = await new PatientService(db.kysely, systemClock).update(
        id,
        { identifier },
        actor.username,
      );
      await recordAudit(db, {
        ...actor,
        action: 'patient.update',
        entity: 'patient',
        entityId: id,
        patientId: id,
      });
      ctx.stdout.write(
        p.identifier
          ? `patient ${p.id} identifier set: ${p.identifier.system ?? '(no system)'} | ${p.identifier.value}\n`
          : `patient ${p.id} identifier cleared\n`,
      );
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message}\n`);
        return 1;
      }
      throw err;
    }
  },
};

export const patientCommands: Command[] = [
  patientList,
  patientShow,
  patientCreate,
  patientSetIdentifier,
];
