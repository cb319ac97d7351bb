/**
 * HiGHS against an independent solver on 200 random small balancing problems (invented demo
 * data, seeded): the LP relaxation's optimum from HiGHS equals javascript-lp-solver's (a
 * JavaScript simplex with no code in common) within 1e-6 relative, and every proposal from the
 * mixed-integer programme meets, by the plan summary's own totals, each limit it reports as met.
 */
import jsLpModule from 'javascript-lp-solver';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildBalanceModel } from '../../src/balance/balance-model.js';
import { balancePlan, type BalanceProblem } from '../../src/balance/balancer.js';
import { highsSolver } from '../../src/balance/highs-solver.js';
import {
  solveByBlocks,
  splitBlocks,
  type LpModel,
  type LpSolver,
} from '../../src/balance/lp-model.js';
import { resolvePlan } from '../../src/plans/plan.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { randomProblem, seeded } from './random-plans.js';

const INSTANCES = 200;

// The package's types describe a CommonJS default; under ESM the import is the solver itself.
const jsLpSolver = ((jsLpModule as unknown as { default?: unknown }).default ?? jsLpModule) as {
  Solve(model: object): unknown;
};

/**
 * The same LP in javascript-lp-solver's JSON form. Its variables are >= 0, so each variable is
 * shifted by its lower bound (x = lower + y, y >= 0) and the rows and objective with it.
 */
function solveWithJsLp(m: LpModel): { feasible: boolean; objective: number } {
  const variables: Record<string, Record<string, number>> = {};
  const constraints: Record<string, { min?: number; max?: number }> = {};
  m.vars.forEach((v, i) => {
    if (!Number.isFinite(v.lower)) throw new Error('free variables are not drawn here');
    const col: Record<string, number> = { cost: v.cost };
    if (Number.isFinite(v.upper)) {
      constraints[`ub${i}`] = { max: v.upper - v.lower };
      col[`ub${i}`] = 1;
    }
    variables[`y${i}`] = col;
  });
  m.rows.forEach((r, j) => {
    let shift = 0;
    for (const [v, k] of r.terms) {
      shift += k * m.vars[v]!.lower;
      (variables[`y${v}`] as Record<string, number>)[`r${j}`] = k;
    }
    const c: { min?: number; max?: number } = {};
    if (Number.isFinite(r.lower)) c.min = r.lower - shift;
    if (Number.isFinite(r.upper)) c.max = r.upper - shift;
    constraints[`r${j}`] = c;
  });
  const out = jsLpSolver.Solve({ optimize: 'cost', opType: 'min', constraints, variables }) as {
    feasible: boolean;
    [k: string]: unknown;
  };
  if (!out.feasible) return { feasible: false, objective: NaN };
  const x = m.vars.map((v, i) => v.lower + Number(out[`y${i}`] ?? 0));
  return { feasible: true, objective: m.objectiveAt(x) };
}

function modelOf(p: BalanceProblem, elastic: boolean): LpModel {
  return buildBalanceModel({
    plan: p.plan,
    days: p.days,
    foods: p.foods,
    targets: p.targets,
    absorption: p.settings.absorption,
    settings: p.balancing,
    robust: p.robust,
    choices: p.choices,
    candidates: p.candidates,
    binder: p.binder,
    elastic,
  }).lp;
}

describe('HiGHS and javascript-lp-solver agree on 200 random LP relaxations (invented demo data)', () => {
  let highs: LpSolver;
  beforeAll(async () => {
    highs = await highsSolver();
  });

  it('gives the same optimum within 1e-6 relative, and the same verdict when infeasible', () => {
    const rnd = seeded(20261205);
    let compared = 0;
    let infeasible = 0;
    for (let n = 0; n < INSTANCES; n++) {
      const p = randomProblem(rnd, { days: 1, items: 3 + (n % 4), candidates: n % 4 });
      for (const elastic of [false, true]) {
        const lp = modelOf(p, elastic).relaxed();
        const a = highs.solve(lp);
        const b = solveWithJsLp(lp);
        if (a.status === 'infeasible') {
          expect(b.feasible, `instance ${n}: HiGHS infeasible, javascript-lp-solver not`).toBe(
            false,
          );
          infeasible++;
          continue;
        }
        expect(a.status).toBe('optimal');
        expect(b.feasible, `instance ${n}`).toBe(true);
        const rel = Math.abs(a.objective - b.objective) / Math.max(1, Math.abs(a.objective));
        expect(rel, `instance ${n}: ${a.objective} vs ${b.objective}`).toBeLessThan(1e-6);
        compared++;
      }
    }
    // both feasible and infeasible relaxations were drawn (the elastic one is always feasible)
    expect(compared).toBeGreaterThanOrEqual(INSTANCES);
    expect(infeasible).toBeGreaterThan(0);
  });

  it('every MIP proposal meets, in the plan summary, each limit it reports as met', () => {
    const rnd = seeded(7);
    const statuses = new Set<string>();
    for (let n = 0; n < INSTANCES; n++) {
      const p = randomProblem(rnd, { days: 1, items: 3 + (n % 4), candidates: n % 4 });
      const r = balancePlan(p, highs);
      statuses.add(r.status);
      const resolved = resolvePlan(r.proposal, p.foods);
      expect(resolved.ok).toBe(true);
      if (!resolved.ok) continue;
      const s = summarizePlan(
        { ...resolved.value, planId: 0, patientId: 0, version: 0 },
        p.foods,
        p.targets,
        p.settings,
      );
      const relaxed = new Set(r.relaxed.map((x) => x.limit.split(' ')[2]));
      for (const c of s.days[0]!.status.checks) {
        // only their maximum is a limit: the balancer never raises phosphorus or calcium to a minimum
        if ((c.target === 'phosphorusMg' || c.target === 'calciumMg') && c.status === 'below')
          continue;
        if (relaxed.has(`${c.target}.min`) || relaxed.has(`${c.target}.max`)) continue;
        expect(['within', 'not-set'], `instance ${n}: ${c.message}`).toContain(c.status);
      }
      if (p.balancing.calciumMaxMg !== null && !relaxed.has('calciumMg.max'))
        expect(s.days[0]!.nutrients.calciumMg).toBeLessThanOrEqual(p.balancing.calciumMaxMg + 0.05);
    }
    expect([...statuses].sort()).toEqual(
      ['optimal', 'relaxed', 'unchanged'].filter((x) => statuses.has(x)),
    );
    expect(statuses.has('optimal')).toBe(true);
    expect(statuses.has('relaxed')).toBe(true);
  });

  it('solves a several-day plan block by block to the same optimum as the whole programme', () => {
    // Days share no row, so the whole LP relaxation and its day blocks must agree.
    const rnd = seeded(3);
    for (let n = 0; n < 20; n++) {
      const p = randomProblem(rnd, { days: 2 + (n % 3), items: 4, candidates: 2 });
      const lp = modelOf(p, true).relaxed();
      expect(splitBlocks(lp).length).toBeGreaterThanOrEqual(p.plan.days.length);
      const whole = highs.solve(lp);
      const blocks = solveByBlocks(highs, lp);
      expect(blocks.status).toBe(whole.status);
      const rel =
        Math.abs(whole.objective - blocks.objective) / Math.max(1, Math.abs(whole.objective));
      expect(rel).toBeLessThan(1e-6);
    }
  });
});
