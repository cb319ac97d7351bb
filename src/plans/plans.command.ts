import { readFileSync } from 'node:fs';
import { systemClock } from '../clock.js';
import type { Db } from '../db/database.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { guarded, UsageError, type Command, type CommandContext } from '../cli/command.js';
import { settingsSource } from './plan-settings-source.js';
import { PlanService, toPlanVersionJson } from './plans.service.js';
import type { Nutrients, PlanSummary } from './summary-types.js';

function service(db: Db) {
  return new PlanService(db.kysely, systemClock, new FoodRepository(db.kysely), settingsSource(db));
}

function positiveInt(text: string | undefined, what: string): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n <= 0)
    throw new UsageError(`${what} must be a positive whole number`);
  return n;
}

function versionOpt(ctx: CommandContext): number | undefined {
  const v = ctx.args.values.version;
  return typeof v === 'string' ? positiveInt(v, '--version') : undefined;
}

export const planList: Command = {
  path: ['plan', 'list'],
  usage: '[--patient ID] [--json]',
  summary: 'list meal plans',
  options: { json: { type: 'boolean' }, patient: { type: 'string' } },
  async run(ctx) {
    const p = ctx.args.values.patient;
    const patientId = typeof p === 'string' ? positiveInt(p, '--patient') : undefined;
    const plans = await service(await ctx.db()).list(patientId);
    if (ctx.args.values.json) {
      const json = plans.map((h) => ({
        id: h.id,
        patientId: h.patientId,
        name: h.name,
        days: h.days,
      }));
      ctx.stdout.write(`${JSON.stringify(json, null, 2)}\n`);
      return;
    }
    if (plans.length === 0) ctx.stdout.write('no plans yet\n');
    for (const h of plans) {
      ctx.stdout.write(
        `${String(h.id).padStart(5)}  patient ${h.patientId}  ${h.name}  (${h.days} day${h.days === 1 ? '' : 's'}, version ${h.latestVersion}${h.isDemo ? ', demo data' : ''})\n`,
      );
    }
  },
};

function line(label: string, n: Nutrients): string {
  const a = n.absorbablePhosphorusMg;
  return (
    `${label.padEnd(22)} P ${Math.round(n.phosphorusMg)} mg (absorbable ${Math.round(a.low)}-${Math.round(a.high)}, typ. ${Math.round(a.typical)}), ` +
    `protein ${n.proteinG.toFixed(1)} g, P:protein ${n.phosphorusProteinRatioMgPerG?.toFixed(1) ?? '-'} mg/g, ` +
    `K ${Math.round(n.potassiumMg)} mg, Na ${Math.round(n.sodiumMg)} mg, Ca ${Math.round(n.calciumMg)} mg, ${Math.round(n.energyKcal)} kcal`
  );
}

export function summaryText(s: PlanSummary): string {
  const out: string[] = [
    `${s.name}  (plan ${s.planId}, version ${s.version}, patient ${s.patientId})`,
  ];
  for (const d of s.days) {
    out.push('', `${d.label}: ${d.status.level === 'on-target' ? 'on target' : 'needs attention'}`);
    for (const o of d.occasions) {
      out.push(`  ${line(`${o.name}${o.time ? ` ${o.time}` : ''}`, o.nutrients)}`);
      for (const it of o.items) {
        const flags = [
          it.flags.additive ? 'additive' : '',
          it.flags.highRatio ? 'high ratio' : '',
        ].filter(Boolean);
        const qty = it.measure
          ? `${it.measure.count} x ${it.measure.description} (${it.grams} g)`
          : `${it.grams} g`;
        out.push(
          `      ${it.label} - ${qty}: P ${it.nutrients.phosphorusMg ?? '-'} mg${flags.length ? ` [${flags.join(', ')}]` : ''}`,
        );
        const prep = it.preparation;
        if (prep && prep.factors)
          out.push(
            `        ${prep.label} (${prep.weightBasis === 'plate' ? 'plate' : 'raw'} weight; ${prep.tableGrams} g raw = ${prep.plateGrams} g cooked): ` +
              `P x${prep.factors.phosphorus.typical}, K x${prep.factors.potassium.typical}, protein x${prep.factors.protein.typical}`,
          );
      }
    }
    out.push(`  ${line('day total', d.nutrients)}`);
    for (const m of d.status.messages) out.push(`  ! ${m}`);
  }
  out.push('', line('plan average per day', s.average.nutrients));
  out.push('', 'top phosphorus contributors:');
  for (const c of s.topContributors) {
    out.push(
      `  ${c.name}: ${Math.round(c.phosphorusMg)} mg P (${(c.share * 100).toFixed(0)}%), absorbable typ. ${Math.round(c.absorbablePhosphorusMgTypical)} mg`,
    );
  }
  const b = s.binders;
  if (b.prescription && b.ingredient) {
    out.push(
      '',
      `binder: ${b.ingredient.displayName} ${b.prescription.unitStrengthMg} mg, ${b.prescription.units} ${b.prescription.schedule === 'per-day' ? 'a day' : 'with each meal'}`,
    );
    for (const o of b.perOccasion) out.push(`  ${o.day} ${o.occasion}: ${o.units}  (${o.reason})`);
    for (const d of b.days) for (const x of d.disagreements) out.push(`  ! ${d.day}: ${x.message}`);
    if (b.elementalCalciumMgPerDay > 0)
      out.push(
        `  elemental calcium from the binder: ${Math.round(b.elementalCalciumMgPerDay)} mg/day (KDOQI 2003 limit ${b.limits.fromBindersMaxMg} mg)`,
      );
  } else {
    out.push('', 'binder: no prescription on record');
  }
  out.push('', s.caution);
  return `${out.join('\n')}\n`;
}

export const planSummary: Command = {
  path: ['plan', 'summary'],
  usage: '<planId> [--version N] [--json]',
  summary: 'totals per occasion and day against the targets, contributors and binder schedule',
  minPositionals: 1,
  options: { json: { type: 'boolean' }, version: { type: 'string' } },
  async run(ctx) {
    const id = positiveInt(ctx.args.positionals[0], '<planId>');
    const version = versionOpt(ctx);
    return guarded(ctx, async () => {
      const s = await service(await ctx.db()).getSummary(id, version);
      ctx.stdout.write(ctx.args.values.json ? `${JSON.stringify(s, null, 2)}\n` : summaryText(s));
    });
  },
};

export const planShow: Command = {
  path: ['plan', 'show'],
  usage: '<planId> [--version N] [--json]',
  summary: 'show a plan version as saved (items, grams, household measures, labels)',
  minPositionals: 1,
  options: { json: { type: 'boolean' }, version: { type: 'string' } },
  async run(ctx) {
    const id = positiveInt(ctx.args.positionals[0], '<planId>');
    const version = versionOpt(ctx);
    return guarded(ctx, async () => {
      const { header, version: v } = await service(await ctx.db()).get(id, version);
      const json = toPlanVersionJson(header, v);
      if (ctx.args.values.json) {
        ctx.stdout.write(`${JSON.stringify(json, null, 2)}\n`);
        return;
      }
      const names = new Map(v.foods.map((f) => [f.id, f.name]));
      const out = [
        `${json.name}  (plan ${json.id}, version ${json.version} of ${json.latestVersion}, saved ${json.savedAt})`,
      ];
      if (json.note) out.push(`note: ${json.note}`);
      for (const d of json.days) {
        out.push(d.label);
        for (const o of d.occasions) {
          out.push(`  ${o.name}${o.time ? ` ${o.time}` : ''}`);
          for (const it of o.items) {
            const qty = it.measure
              ? `${it.measure.count} x ${it.measure.description} = ${it.grams} g`
              : `${it.grams} g`;
            out.push(
              `    ${it.label ?? names.get(it.foodId) ?? it.foodId}: ${qty}  [food ${it.foodId}]` +
                (it.preparation
                  ? `  ${it.preparation}${it.weightBasis ? ` (${it.weightBasis} weight)` : ''}`
                  : ''),
            );
          }
        }
      }
      ctx.stdout.write(`${out.join('\n')}\n`);
    });
  },
};

export const planCreate: Command = {
  path: ['plan', 'create'],
  usage: '--patient ID --file plan.json',
  summary: 'create a plan from a JSON file ({name, days: [{label, occasions: [...]}]})',
  options: { patient: { type: 'string' }, file: { type: 'string' }, json: { type: 'boolean' } },
  async run(ctx) {
    const patientId = positiveInt(ctx.args.values.patient as string | undefined, '--patient');
    const file = ctx.args.values.file;
    if (typeof file !== 'string') throw new UsageError('--file is required');
    let input: unknown;
    try {
      input = JSON.parse(readFileSync(file, 'utf8'));
    } catch (err) {
      ctx.stderr.write(`phosledger: cannot read ${file}: ${(err as Error).message}\n`);
      return 1;
    }
    return guarded(ctx, async () => {
      const { header, version } = await service(await ctx.db()).create(patientId, input);
      ctx.stdout.write(
        ctx.args.values.json
          ? `${JSON.stringify(toPlanVersionJson(header, version), null, 2)}\n`
          : `plan ${header.id} created (version ${version.version})\n`,
      );
    });
  },
};

export const planCommands: Command[] = [planList, planSummary, planShow, planCreate];
