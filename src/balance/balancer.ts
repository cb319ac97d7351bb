/**
 * Balances one day or a whole plan (pure; the solver is handed in): solves the programme of
 * balance-model.ts, falls back to the elastic model when no plan meets every limit, prices the
 * binding limits from the duals of the LP with the food choices fixed, and re-checks the
 * proposal with the product's own summary before anyone sees it.
 */
import type { BinderPrescription } from '../binders/binder.js';
import { AppError } from '../errors.js';
import type { Food } from '../foods/food.js';
import type { Targets } from '../patients/targets.js';
import type { PlanContent } from '../plans/plan.js';
import type { SummarySettings } from '../plans/summary-types.js';
import {
  BALANCE_CAUTION,
  type BalanceResult,
  type BalancingSettings,
  type ItemChoice,
  type PlacedCandidate,
} from './balance.js';
import { buildBalanceModel, type BalanceModel } from './balance-model.js';
import { describeResult, type Solved } from './explain.js';
import { solveByBlocks, splitBlocks, type LpResult, type LpSolver } from './lp-model.js';

export interface BalanceProblem {
  plan: PlanContent;
  /** 0-based indexes of the days to balance. */
  days: number[];
  /** Food values as eaten (prepared values may be passed in here in place of the table's). */
  foods: ReadonlyMap<number, Food>;
  targets: Targets;
  settings: SummarySettings;
  /** Only for the re-check summary: the prescription is never changed. */
  binder: BinderPrescription | null;
  balancing: BalancingSettings;
  robust: boolean;
  choices: readonly ItemChoice[];
  candidates: readonly PlacedCandidate[];
}

/** Seconds one MIP may take before the best plan found so far is used. */
const TIME_LIMIT_S = 5;
/**
 * The search stops within 0.1% (or 0.1 mg) of the best possible plan: absorbable phosphorus is
 * an estimate good to tens of percent, and proving the last 0.1% costs most of the time.
 */
const MIP_REL_GAP = 1e-3;
const MIP_ABS_GAP_MG = 0.1;
const FEAS_TOL = 1e-6;

/** The point that keeps the plan as it is: every item kept at its amount, no food added. */
function currentPoint(m: BalanceModel): Float64Array {
  const x = new Float64Array(m.lp.vars.length);
  for (const s of m.slots) if (s.onVar !== null && s.item !== null) x[s.onVar] = 1;
  return x;
}

function feasibleAt(m: BalanceModel, x: Float64Array): boolean {
  return m.lp.rows.every((r, i) => {
    const v = m.lp.rowValue(i, x);
    return v >= r.lower - FEAS_TOL && v <= r.upper + FEAS_TOL;
  });
}

function solveMip(solver: LpSolver, m: BalanceModel): LpResult {
  // No answer exists when even the continuous relaxation has none: skip the integer search.
  const relaxed = solveByBlocks(solver, m.lp.relaxed());
  if (relaxed.status === 'infeasible') return relaxed;
  const r = solveByBlocks(solver, m.lp, {
    timeLimitS: TIME_LIMIT_S,
    mipRelGap: MIP_REL_GAP,
    mipAbsGap: MIP_ABS_GAP_MG,
  });
  if (r.status !== 'optimal' && r.status !== 'limit') return r;
  // The plan as it stands is a point of the model: never propose something worse than it.
  const now = currentPoint(m);
  if (feasibleAt(m, now) && m.lp.objectiveAt(now) <= r.objective + 1e-9) {
    return { ...r, values: now, objective: m.lp.objectiveAt(now) };
  }
  return r;
}

/**
 * The LP with the food choices (kept, removed, added) fixed at the MIP's answer and the amounts
 * free to move in continuous grams within their ranges: its row duals price each limit.
 */
function pricingDuals(solver: LpSolver, m: BalanceModel, mip: LpResult): Float64Array | null {
  const binaries = new Set<number>();
  for (const s of m.slots) if (s.onVar !== null) binaries.add(s.onVar);
  const lp = m.lp.copy((v, i) =>
    binaries.has(i)
      ? {
          ...v,
          integer: false,
          lower: Math.round(mip.values[i]!),
          upper: Math.round(mip.values[i]!),
        }
      : { ...v, integer: false },
  );
  const r = solveByBlocks(solver, lp);
  return r.status === 'optimal' ? r.rowDuals : null;
}

/**
 * The days whose limits no plan can meet even in continuous amounts (their block of the LP
 * relaxation has no answer, or a limit on fixed amounts only is broken): only those get slacks.
 */
function daysWithoutAnswer(solver: LpSolver, m: BalanceModel): Set<number> {
  const dayOfRow = new Map(m.limits.map((l) => [l.row, l.day]));
  const days = new Set<number>();
  m.lp.rows.forEach((r, i) => {
    const broken = r.terms.size === 0 && (r.lower > 1e-9 || r.upper < -1e-9);
    if (broken && dayOfRow.has(i)) days.add(dayOfRow.get(i)!);
  });
  for (const b of splitBlocks(m.lp.relaxed())) {
    if (b.rows.length === 0 || solver.solve(b.model).status !== 'infeasible') continue;
    for (const row of b.rows) if (dayOfRow.has(row)) days.add(dayOfRow.get(row)!);
  }
  return days;
}

/** Balances the chosen days; throws only for a solver failure or a proposal the summary refutes. */
export function balancePlan(problem: BalanceProblem, solver: LpSolver): BalanceResult {
  const t0 = performance.now();
  const base = {
    plan: problem.plan,
    days: problem.days,
    foods: problem.foods,
    targets: problem.targets,
    absorption: problem.settings.absorption,
    settings: problem.balancing,
    robust: problem.robust,
    choices: problem.choices,
    candidates: problem.candidates,
    binder: problem.binder,
  };
  let model = buildBalanceModel({ ...base, elastic: false });
  let mip = solveMip(solver, model);
  let elastic = false;
  if (mip.status === 'infeasible') {
    elastic = true;
    const days = daysWithoutAnswer(solver, model);
    model = buildBalanceModel({
      ...base,
      elastic: true,
      ...(days.size > 0 ? { elasticDays: days } : {}),
    });
    mip = solveMip(solver, model);
    if (mip.status === 'infeasible' && days.size > 0) {
      // a day whose relaxation has an answer but whose whole steps do not: every day elastic
      model = buildBalanceModel({ ...base, elastic: true });
      mip = solveMip(solver, model);
    }
  }
  if (mip.status !== 'optimal' && mip.status !== 'limit') {
    throw new AppError(
      'PHL_BALANCE_SOLVER_FAILED',
      500,
      `the optimiser could not balance this plan (${mip.solverStatus})`,
    );
  }
  const solved: Solved = {
    model,
    values: mip.values,
    duals: pricingDuals(solver, model, mip),
    elastic,
    solverName: solver.name,
    solverStatus: mip.solverStatus,
    ms: performance.now() - t0,
  };
  return { ...describeResult(problem, solved), caution: BALANCE_CAUTION };
}
