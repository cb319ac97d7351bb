/**
 * Turns a solved balancing programme into what the dietitian reads (pure): the proposal as a
 * plan input, the changes, the day totals before and after from the product's own summary, the
 * binding limits with their prices, and, when no plan met every limit, how far the nearest one
 * misses each. Every limit reported as met is re-checked on the summary of the proposal.
 */
import { AppError } from '../errors.js';
import { resolvePlan, type PlanInput } from '../plans/plan.js';
import { summarizePlan } from '../plans/summary.js';
import type { DaySummary, PlanSummary } from '../plans/summary-types.js';
import type {
  BalanceChange,
  BalanceResult,
  BindingLimit,
  LimitKey,
  RelaxedLimit,
} from './balance.js';
import type { BalanceModel, LimitRow, Slot } from './balance-model.js';
import type { BalanceProblem } from './balancer.js';

export interface Solved {
  model: BalanceModel;
  values: Float64Array;
  duals: Float64Array | null;
  elastic: boolean;
  solverName: string;
  solverStatus: string;
  ms: number;
}

interface Amount {
  grams: number;
  count: number | null;
}

const LIMIT_WORDS: Record<LimitKey, { what: string; step: number; unit: string; min: boolean }> = {
  'proteinG.min': { what: 'protein', step: 1, unit: 'g', min: true },
  'proteinG.max': { what: 'protein', step: 1, unit: 'g', min: false },
  'energyKcal.min': { what: 'energy', step: 100, unit: 'kcal', min: true },
  'energyKcal.max': { what: 'energy', step: 100, unit: 'kcal', min: false },
  'sodiumMg.max': { what: 'sodium', step: 100, unit: 'mg', min: false },
  'potassiumMg.max': { what: 'potassium', step: 100, unit: 'mg', min: false },
  'phosphorusMg.max': { what: 'total phosphorus', step: 100, unit: 'mg', min: false },
  'calciumMg.max': { what: 'calcium from food', step: 100, unit: 'mg', min: false },
  'mealProtein.min': { what: 'protein at this meal', step: 1, unit: 'g', min: true },
};

const r1 = (x: number) => Math.round(x * 10) / 10;
/** Strips floating-point noise from sums of steps (0.1 + 0.2) without moving real amounts. */
const clean = (x: number) => Math.round(x * 1e6) / 1e6;

function amountOf(slot: Slot, x: Float64Array): Amount {
  const steps = slot.stepVar === null ? 0 : Math.round(x[slot.stepVar]!);
  const on = slot.onVar === null ? 1 : Math.round(x[slot.onVar]!);
  if (on === 0) return { grams: 0, count: slot.measure ? 0 : null };
  if (slot.item === null) {
    return {
      grams: clean(slot.stepG * steps),
      count: slot.stepUnits === null ? null : clean(slot.stepUnits * steps),
    };
  }
  return {
    grams: clean(slot.gramsBefore + slot.stepG * steps),
    count:
      slot.measure && slot.stepUnits !== null
        ? clean(slot.measure.countBefore + slot.stepUnits * steps)
        : null,
  };
}

function proposalOf(problem: BalanceProblem, solved: Solved): PlanInput {
  const amounts = new Map<string, Amount>();
  const added = new Map<string, { slot: Slot; amount: Amount }[]>();
  for (const s of solved.model.slots) {
    const a = amountOf(s, solved.values);
    if (s.item !== null) amounts.set(`${s.day}/${s.occasion}/${s.item}`, a);
    else if (a.grams > 0) {
      const k = `${s.day}/${s.occasion}`;
      added.set(k, [...(added.get(k) ?? []), { slot: s, amount: a }]);
    }
  }
  const days = problem.plan.days.map((d, di) => ({
    label: d.label,
    occasions: d.occasions.map((o, oi) => {
      const items: PlanInput['days'][number]['occasions'][number]['items'] = [];
      o.items.forEach((it, ii) => {
        const a = amounts.get(`${di}/${oi}/${ii}`) ?? {
          grams: it.grams,
          count: it.measure?.count ?? null,
        };
        if (a.grams <= 0) return;
        // The item keeps how it is cooked, and which weight its grams are.
        const prep = it.preparation
          ? {
              preparation: it.preparation,
              ...(it.weightBasis ? { weightBasis: it.weightBasis } : {}),
            }
          : {};
        items.push(
          it.measure
            ? {
                foodId: it.foodId,
                measure: { portionId: it.measure.portionId, count: a.count ?? it.measure.count },
                label: it.label,
                ...prep,
              }
            : { foodId: it.foodId, grams: a.grams, label: it.label, ...prep },
        );
      });
      for (const { slot, amount } of added.get(`${di}/${oi}`) ?? []) {
        items.push(
          slot.measure && amount.count !== null
            ? {
                foodId: slot.foodId,
                measure: { portionId: slot.measure.portionId, count: amount.count },
                label: null,
              }
            : { foodId: slot.foodId, grams: amount.grams, label: null },
        );
      }
      return { name: o.name, kind: o.kind, time: o.time, items };
    }),
  }));
  const which =
    problem.days.length === problem.plan.days.length && problem.days.length > 1
      ? 'the whole plan'
      : `day${problem.days.length > 1 ? 's' : ''} ${problem.days.map((d) => d + 1).join(', ')}`;
  return {
    name: problem.plan.name,
    days,
    note: `Balanced ${which} by the optimiser (${problem.robust ? 'high-end' : 'typical'} absorption); a suggestion reviewed and accepted by the dietitian.`,
  };
}

function changesOf(problem: BalanceProblem, solved: Solved): BalanceChange[] {
  const out: BalanceChange[] = [];
  for (const s of solved.model.slots) {
    const a = amountOf(s, solved.values);
    if (Math.abs(a.grams - s.gramsBefore) < 1e-6) continue;
    const measureText = (count: number | null) =>
      s.measure && count !== null && count > 0 ? `${count} x ${s.measure.description}` : null;
    out.push({
      day: s.day + 1,
      occasion: problem.plan.days[s.day]!.occasions[s.occasion]!.name,
      foodId: s.foodId,
      foodName: problem.foods.get(s.foodId)?.name ?? String(s.foodId),
      gramsBefore: r1(s.gramsBefore),
      gramsAfter: r1(a.grams),
      measureBefore: measureText(s.item === null ? null : (s.measure?.countBefore ?? null)),
      measureAfter: measureText(a.count),
    });
  }
  return out;
}

function limitName(problem: BalanceProblem, l: LimitRow): string {
  const occ =
    l.occasion === null ? '' : ` ${problem.plan.days[l.day]!.occasions[l.occasion]!.name}`;
  return `day ${l.day + 1} ${l.key}${occ}`;
}

/** The value a limit is about, from the summary of the proposal (unrounded where it matters). */
function summaryValue(day: DaySummary, l: LimitRow, share: number): number {
  const n = day.nutrients;
  switch (l.key) {
    case 'proteinG.min':
    case 'proteinG.max':
      return n.proteinG;
    case 'energyKcal.min':
    case 'energyKcal.max':
      return n.energyKcal;
    case 'sodiumMg.max':
      return n.sodiumMg;
    case 'potassiumMg.max':
      return n.potassiumMg;
    case 'phosphorusMg.max':
      return n.phosphorusMg;
    case 'calciumMg.max':
      return n.calciumMg;
    case 'mealProtein.min': // protein at the meal minus its required share of the day's
      return (day.occasions[l.occasion as number]?.nutrients.proteinG ?? 0) - share * n.proteinG;
  }
}

/** Met according to the summary: its own status for targets, the rounded totals otherwise. */
function metInSummary(day: DaySummary, l: LimitRow, share: number): boolean {
  // Calcium's row bounds calcium from food (the clinic's cap, or the target less the binder's
  // calcium), so it is checked on the value, not on the summary's diet-and-binder status.
  const check = day.status.checks.find((c) => l.key.startsWith(`${c.target}.`));
  if (check && l.key !== 'mealProtein.min' && l.key !== 'calciumMg.max') {
    return LIMIT_WORDS[l.key].min ? check.status !== 'below' : check.status !== 'above';
  }
  const v = summaryValue(day, l, share);
  const tol = l.key === 'mealProtein.min' ? 0.02 : 0.05; // the summary rounds to 0.01 g / 0.1 mg
  return LIMIT_WORDS[l.key].min ? v >= l.bound - tol : v <= l.bound + tol;
}

function relaxedOf(problem: BalanceProblem, solved: Solved, after: PlanSummary): RelaxedLimit[] {
  const share = problem.balancing.mealProteinMinShare ?? 0;
  const out: RelaxedLimit[] = [];
  for (const l of solved.model.limits) {
    if (l.slack === null || solved.values[l.slack]! <= 1e-6) continue;
    const day = after.days[l.day] as DaySummary;
    if (metInSummary(day, l, share)) continue; // the slack only took up the model's safety margin
    const w = LIMIT_WORDS[l.key];
    const v = summaryValue(day, l, share);
    const by = Math.max(0, w.min ? l.bound - v : v - l.bound);
    // small misses keep two decimals, so a real miss never reads as 0
    const byShown = by < 1 ? Math.ceil(by * 100) / 100 : w.unit === 'g' ? r1(by) : Math.round(by);
    out.push({
      limit: limitName(problem, l),
      by: byShown,
      unit: w.unit,
      day: l.day + 1,
      explanation: `Day ${l.day + 1}: no plan within the allowed ranges keeps ${w.what} ${w.min ? 'at or above' : 'at or under'} ${l.bound} ${w.unit}; the nearest plan ${w.min ? 'falls short by' : 'goes over by'} ${byShown} ${w.unit}.`,
    });
  }
  return out;
}

function bindingOf(problem: BalanceProblem, solved: Solved): BindingLimit[] {
  if (!solved.duals) return [];
  const out: BindingLimit[] = [];
  for (const l of solved.model.limits) {
    if (l.slack !== null && solved.values[l.slack]! > 1e-6) continue;
    const dual = solved.duals[l.row] ?? 0;
    if (Math.abs(dual) < 1e-6) continue;
    const w = LIMIT_WORDS[l.key];
    const price = r1(Math.abs(dual) * w.step);
    const stepText = `${w.step} ${w.unit}`;
    const where =
      l.occasion === null
        ? `day ${l.day + 1}`
        : `${problem.plan.days[l.day]!.occasions[l.occasion]!.name} on day ${l.day + 1}`;
    const explanation = w.min
      ? `Each extra ${stepText} of ${w.what} (${where}) costs about ${price} mg of absorbable phosphorus.`
      : `${w.what[0]!.toUpperCase()}${w.what.slice(1)} is at its limit (${l.bound} ${w.unit}, ${where}): each ${stepText} more allowed would save about ${price} mg of absorbable phosphorus, each ${stepText} less would cost about as much.`;
    out.push({
      limit: limitName(problem, l),
      price,
      unit: `mg absorbable phosphorus per ${stepText} of ${w.what}`,
      day: l.day + 1,
      explanation,
    });
  }
  return out;
}

function recheck(problem: BalanceProblem, solved: Solved, after: PlanSummary): void {
  const share = problem.balancing.mealProteinMinShare ?? 0;
  const broken = solved.model.limits
    .filter((l) => l.slack === null || solved.values[l.slack]! <= 1e-6)
    .filter((l) => !metInSummary(after.days[l.day] as DaySummary, l, share))
    .map((l) => limitName(problem, l));
  if (broken.length > 0) {
    throw new AppError(
      'PHL_BALANCE_RECHECK_FAILED',
      500,
      `the proposal failed its re-check by the plan summary (${broken.join(', ')}); nothing is proposed`,
    );
  }
}

function summarize(problem: BalanceProblem, content: BalanceProblem['plan']): PlanSummary {
  return summarizePlan(
    { ...content, planId: 0, patientId: 0, version: 0 },
    problem.foods,
    problem.targets,
    problem.settings,
    problem.binder,
  );
}

export function describeResult(
  problem: BalanceProblem,
  solved: Solved,
): Omit<BalanceResult, 'caution'> {
  const proposal = proposalOf(problem, solved);
  const resolved = resolvePlan(proposal, problem.foods);
  if (!resolved.ok) {
    throw new AppError(
      'PHL_BALANCE_RECHECK_FAILED',
      500,
      `the proposal does not resolve: ${resolved.issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`,
    );
  }
  const before = summarize(problem, problem.plan);
  const after = summarize(problem, resolved.value);
  recheck(problem, solved, after);
  const changes = changesOf(problem, solved);
  const relaxed = relaxedOf(problem, solved, after);
  const single = problem.days.length === 1 ? (problem.days[0] as number) : null;
  const pick = (s: PlanSummary) =>
    single === null ? s.average.nutrients : s.days[single]!.nutrients;
  const notes = [...new Set(solved.model.notes)];
  if (solved.solverStatus !== 'Optimal')
    notes.push(
      `The optimiser stopped at its time limit: this is the best plan it found (${solved.solverStatus}).`,
    );
  if (relaxed.length > 0)
    notes.push(
      `These limits conflict with each other and the allowed ranges: ${relaxed.map((r) => r.limit).join(', ')}. The proposal is the nearest plan; the care team decides which limit gives.`,
    );
  notes.push(
    'The phosphate binder prescription is not changed; the binder schedule follows the new meals.',
  );
  return {
    status: relaxed.length > 0 ? 'relaxed' : changes.length === 0 ? 'unchanged' : 'optimal',
    before: pick(before),
    after: pick(after),
    days: problem.days.map((d) => ({
      day: d + 1,
      label: problem.plan.days[d]!.label,
      before: before.days[d]!.nutrients,
      after: after.days[d]!.nutrients,
    })),
    changes,
    binding: bindingOf(problem, solved),
    relaxed,
    proposal,
    objective: problem.robust ? 'high' : 'typical',
    balanced: { days: problem.days.map((d) => d + 1) },
    notes,
    solver: {
      name: solved.solverName,
      status: solved.solverStatus,
      ms: Math.round(solved.ms * 10) / 10,
    },
  };
}
