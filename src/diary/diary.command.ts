import { statSync, readFileSync, writeFileSync } from 'node:fs';
import { systemClock } from '../clock.js';
import { UsageError, type Command } from '../cli/command.js';
import { AppError } from '../errors.js';
import { PatientService } from '../patients/patients.service.js';
import { DiaryAuditService, type AuditInput } from './diary.service.js';
import { toAuditJson } from './diary.json.js';
import { DIARY_LIMITS } from './reader.js';
import { renderDiaryReportPdf } from './report-pdf.js';
import { diaryReportView } from './report-view.js';

const n0 = (x: number | null) => (x === null ? '-' : String(Math.round(x)));

export const diaryAudit: Command = {
  path: ['diary', 'audit'],
  usage:
    '<file> [--patient <id>] [--json | --pdf <out>] [--format csv|text] [--date-order dmy|mdy] [--dry-run]',
  summary: 'audit a food diary (CSV or text) for phosphorus and hidden phosphate additives',
  minPositionals: 1,
  options: {
    patient: { type: 'string' },
    json: { type: 'boolean' },
    pdf: { type: 'string' },
    format: { type: 'string' },
    'date-order': { type: 'string' },
    'dry-run': { type: 'boolean' },
  },
  async run(ctx) {
    const v = ctx.args.values;
    const file = ctx.args.positionals[0] as string;
    if (v.json && typeof v.pdf === 'string')
      throw new UsageError('give either --json or --pdf, not both');
    const patientText = v.patient;
    let patientId: number | null = null;
    if (typeof patientText === 'string') {
      patientId = Number(patientText);
      if (!Number.isInteger(patientId) || patientId <= 0)
        throw new UsageError('--patient must be a positive whole number');
    }
    const format = v.format;
    if (format !== undefined && format !== 'csv' && format !== 'text')
      throw new UsageError('--format must be csv or text');
    const order = v['date-order'];
    if (order !== undefined && order !== 'dmy' && order !== 'mdy')
      throw new UsageError('--date-order must be dmy or mdy');
    let size: number;
    try {
      size = statSync(file).size;
    } catch {
      ctx.stderr.write(`phosledger: cannot read ${file}\n`);
      return 1;
    }
    if (size > DIARY_LIMITS.maxBytes) {
      ctx.stderr.write(
        `phosledger: ${file} is ${size} bytes; the most accepted is ${DIARY_LIMITS.maxBytes} (PHL_DIARY_TOO_LARGE)\n`,
      );
      return 1;
    }
    const input: AuditInput = {
      bytes: readFileSync(file),
      format: format ?? (file.toLowerCase().endsWith('.csv') ? 'csv' : 'auto'),
      ...(order ? { dateOrder: order } : {}),
      patientId,
    };
    const db = await ctx.db();
    const service = new DiaryAuditService(db, systemClock);
    try {
      const saved = v['dry-run']
        ? {
            id: 0,
            patientId,
            createdAt: systemClock.now().toISOString(),
            updatedAt: systemClock.now().toISOString(),
            report: (await service.run(input)).report,
          }
        : await service.create(input);
      const r = saved.report;
      if (v.json) {
        ctx.stdout.write(`${JSON.stringify(toAuditJson(saved), null, 2)}\n`);
      } else if (typeof v.pdf === 'string') {
        const patient =
          patientId === null
            ? null
            : await new PatientService(db.kysely, systemClock).get(patientId);
        const view = diaryReportView(r, {
          id: saved.id,
          patientLabel: patient?.label ?? null,
          generatedAt: saved.updatedAt,
        });
        writeFileSync(v.pdf, await renderDiaryReportPdf(view, new Date(saved.updatedAt)));
        ctx.stdout.write(`wrote ${v.pdf}${saved.id ? ` (audit ${saved.id})` : ''}\n`);
      } else {
        const lines = [
          saved.id
            ? `diary audit ${saved.id} (${r.status})`
            : `diary audit, not saved (${r.status})`,
          ...r.days.map(
            (d) =>
              `${(d.date ?? d.label).padEnd(12)} P ${n0(d.nutrients.phosphorusMg)} mg, absorbable ${n0(d.nutrients.absorbablePhosphorusMg.low)}-${n0(d.nutrients.absorbablePhosphorusMg.high)} mg, additive ${n0(d.nutrients.additivePhosphorusMg)} mg; ${d.entryCount} entries, ${d.unmatchedCount} unmatched`,
          ),
          ...r.entries
            .filter((e) => e.hidden)
            .map((e) => `hidden additive, line ${e.line}: ${e.text} -> ${e.match?.name ?? ''}`),
          ...r.unmatched.map(
            (l) => `unmatched, line ${l}: ${r.entries.find((e) => e.line === l)?.text ?? ''}`,
          ),
          ...r.skipped.map((s) => `not read, line ${s.line}: ${s.message}`),
          r.caution,
        ];
        ctx.stdout.write(`${lines.join('\n')}\n`);
      }
      return 0;
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message} (${err.code})\n`);
        return 1;
      }
      throw err;
    }
  },
};

export const diaryCommands: Command[] = [diaryAudit];
