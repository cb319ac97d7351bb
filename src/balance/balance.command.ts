import { systemClock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError } from '../errors.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { UsageError, type Command } from '../cli/command.js';
import { PlanService } from '../plans/plans.service.js';
import type { Nutrients } from '../plans/summary-types.js';
import { SwapService } from '../plans/swaps.service.js';
import type { BalanceResult } from './balance.js';
import { BalanceService } from './balance.service.js';
import { balanceSettingsSource } from './balance-settings-source.js';

function service(db: Db): BalanceService {
  const foods = new FoodRepository(db.kysely);
  const settings = balanceSettingsSource(db);
  const plans = new PlanService(db.kysely, systemClock, foods, settings);
  return new BalanceService(
    db.kysely,
    foods,
    settings,
    plans,
    new SwapService(db.kysely, foods, settings),
  );
}

function positiveInt(text: string | undefined, what: string): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n <= 0)
    throw new UsageError(`${what} must be a positive whole number`);
  return n;
}

function totals(label: string, n: Nutrients): string {
  const a = n.absorbablePhosphorusMg;
  return (
    `${label.padEnd(7)} absorbable P ${Math.round(a.typical)} mg (${Math.round(a.low)}-${Math.round(a.high)}), ` +
    `P ${Math.round(n.phosphorusMg)} mg, protein ${n.proteinG.toFixed(1)} g, ${Math.round(n.energyKcal)} kcal, ` +
    `Na ${Math.round(n.sodiumMg)} mg, K ${Math.round(n.potassiumMg)} mg, Ca ${Math.round(n.calciumMg)} mg`
  );
}

const STATUS_WORDS: Record<BalanceResult['status'], string> = {
  optimal: 'proposal meets every limit with the least absorbable phosphorus found',
  relaxed: 'no plan meets every limit: this is the nearest plan',
  unchanged: 'the plan is already the best within the allowed changes',
};

/** The answer as text for a terminal. */
export function balanceText(r: BalanceResult, saved: { version: number } | null): string {
  const out: string[] = [`balance (${r.objective} absorption): ${STATUS_WORDS[r.status]}`];
  for (const d of r.days) {
    out.push(
      '',
      `day ${d.day} (${d.label})`,
      `  ${totals('before', d.before)}`,
      `  ${totals('after', d.after)}`,
    );
  }
  if (r.changes.length > 0) out.push('', 'changes:');
  for (const c of r.changes) {
    const before =
      c.gramsBefore === 0
        ? 'new'
        : `${c.measureBefore ? `${c.measureBefore}, ` : ''}${c.gramsBefore} g`;
    const after =
      c.gramsAfter === 0
        ? 'removed'
        : `${c.measureAfter ? `${c.measureAfter}, ` : ''}${c.gramsAfter} g`;
    out.push(`  day ${c.day} ${c.occasion}: ${c.foodName}: ${before} -> ${after}`);
  }
  if (r.binding.length > 0) out.push('', 'binding limits:');
  for (const b of r.binding) out.push(`  ${b.explanation}`);
  if (r.relaxed.length > 0) out.push('', 'limits the nearest plan misses:');
  for (const x of r.relaxed) out.push(`  ${x.explanation}`);
  if (r.notes.length > 0) out.push('');
  for (const n of r.notes) out.push(`note: ${n}`);
  out.push(
    '',
    saved ? `saved as version ${saved.version}` : 'not saved (--accept saves it as a new version)',
  );
  out.push('', r.caution);
  return `${out.join('\n')}\n`;
}

export const planBalance: Command = {
  path: ['plan', 'balance'],
  usage: '<planId> [--day N] [--robust] [--json] [--accept]',
  summary:
    'propose amounts that meet protein, energy and the limits with the least absorbable phosphorus (a suggestion)',
  minPositionals: 1,
  options: {
    day: { type: 'string' },
    robust: { type: 'boolean' },
    json: { type: 'boolean' },
    accept: { type: 'boolean' },
  },
  async run(ctx) {
    const id = positiveInt(ctx.args.positionals[0], '<planId>');
    const d = ctx.args.values.day;
    const day = typeof d === 'string' ? positiveInt(d, '--day') : undefined;
    try {
      const r = await service(await ctx.db()).balance(id, {
        ...(day !== undefined ? { day } : {}),
        robust: ctx.args.values.robust === true,
        accept: ctx.args.values.accept === true,
      });
      const { saved, ...result } = r;
      ctx.stdout.write(
        ctx.args.values.json
          ? `${JSON.stringify({ ...result, saved }, null, 2)}\n`
          : balanceText(result, saved),
      );
    } catch (err) {
      if (err instanceof AppError) {
        ctx.stderr.write(`phosledger: ${err.message} (${err.code})\n`);
        return 1;
      }
      throw err;
    }
  },
};
