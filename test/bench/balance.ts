/**
 * Balancing: HiGHS's first load in this process, one day of 15 items with 40 candidate foods
 * (median and p95 over 60 random invented days, warm), and a 7-day plan balanced jointly (about
 * 100 items, 40 candidates a day). Baseline: the LP relaxation of the same models solved bare.
 * Goals: one day median < 50 ms and p95 < 150 ms; 7 days median < 1 s.
 */
import { loadavg } from 'node:os';
import { buildBalanceModel } from '../../src/balance/balance-model.js';
import { balancePlan, type BalanceProblem } from '../../src/balance/balancer.js';
import { highsLoadMs, highsSolver } from '../../src/balance/highs-solver.js';
import type { LpSolver } from '../../src/balance/lp-model.js';
import { randomProblem, seeded } from '../balance/random-plans.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

function relaxation(p: BalanceProblem) {
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
    elastic: false,
  }).lp.relaxed();
}

function time(solver: LpSolver, problems: readonly BalanceProblem[]) {
  const mip: number[] = [];
  const lp: number[] = [];
  const statuses = new Map<string, number>();
  for (const p of problems) {
    let t = performance.now();
    const r = balancePlan(p, solver);
    mip.push(performance.now() - t);
    statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
    const m = relaxation(p);
    t = performance.now();
    solver.solve(m);
    lp.push(performance.now() - t);
  }
  return { mip, lp, statuses };
}

function line(label: string, r: ReturnType<typeof time>): void {
  const med = percentile(r.mip, 50);
  const lpMed = percentile(r.lp, 50);
  console.log(
    `   ${label}: median ${fmt(med, 1)} ms, p95 ${fmt(percentile(r.mip, 95), 1)} ms, max ${fmt(Math.max(...r.mip), 1)} ms` +
      ` (n = ${r.mip.length}; ${[...r.statuses].map(([s, n]) => `${n} ${s}`).join(', ')})`,
  );
  console.log(
    `   ${' '.repeat(label.length)}  baseline LP relaxation alone: median ${fmt(lpMed, 1)} ms (x${fmt(med / lpMed, 1)})`,
  );
}

export const balanceBench: BenchSection = {
  name: 'balance',
  title: 'balancing a day and a week by mixed-integer optimisation (HiGHS, WASM)',
  async run() {
    const t0 = performance.now();
    const solver = await highsSolver();
    const loaded = performance.now() - t0;
    console.log(
      `   HiGHS first load: ${fmt(highsLoadMs() ?? loaded, 1)} ms (import + WASM instantiate; once per process)`,
    );
    const rnd = seeded(42);
    const day = () => randomProblem(rnd, { days: 1, items: 15, candidates: 40 });
    let t = performance.now();
    balancePlan(day(), solver);
    console.log(
      `   first balance in the process (cold WASM code): ${fmt(performance.now() - t, 1)} ms`,
    );
    for (let i = 0; i < 10; i++) balancePlan(day(), solver); // warm-up
    line('one day, 15 items + 40 candidates', time(solver, Array.from({ length: 60 }, day)));
    const week = () => randomProblem(rnd, { days: 7, items: 14, candidates: 40 });
    t = performance.now();
    balancePlan(week(), solver);
    console.log(`   first 7-day balance (warm-up): ${fmt(performance.now() - t, 1)} ms`);
    line(
      '7 days jointly, 98 items + 280 candidates',
      time(solver, Array.from({ length: 10 }, week)),
    );
    console.log(
      `   load average while measuring: ${loadavg()
        .map((x) => x.toFixed(1))
        .join(' ')} (2 cores)`,
    );
  },
};
