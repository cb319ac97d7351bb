/**
 * Plans: the pure summary of a 7-day plan (5 occasions x 6 items) once foods are loaded, against
 * a bare loop summing the same numbers; and the summary endpoint's requests per second on
 * loopback against /api/health on the same server. Goals: < 2 ms per summary, >= 2,000 req/s.
 */
import type { Food } from '../../src/foods/food.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import type { PlanContent } from '../../src/plans/plan.js';
import { PlanService } from '../../src/plans/plans.service.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { PatientService } from '../../src/patients/patients.service.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { SESSION_COOKIE } from '../../src/auth/auth.js';
import { createTestContext } from '../helpers/context.js';
import { testFood } from '../helpers/food.js';
import { hasSr28 } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

// 30 USDA SR28 foods (mixed groups); invented foods when SR28 is missing.
const NDB = [
  '01009',
  '01077',
  '01123',
  '01124',
  '05064',
  '20045',
  '18069',
  '09003',
  '11674',
  '16043',
  '01012',
  '15076',
  '10219',
  '13047',
  '11529',
  '11090',
  '09040',
  '20081',
  '12061',
  '14400',
  '01117',
  '05009',
  '15121',
  '11205',
  '11124',
  '09200',
  '20137',
  '16057',
  '18075',
  '04053',
];

function benchFoods(): Food[] {
  if (hasSr28) return sr28Foods(...NDB);
  // Invented values (no table): only the shape of the work matters when SR28 is missing.
  return NDB.map((code, i) =>
    testFood({
      id: i + 1,
      source: 'bench',
      code,
      name: `Invented food ${i}`,
      group: 'Invented',
      per100g: {
        phosphorusMg: 50 + i * 10,
        proteinG: 1 + i,
        energyKcal: 100,
        potassiumMg: 200,
        sodiumMg: 100,
        calciumMg: 50,
        waterG: 50,
      },
    }),
  );
}

function weekPlan(foods: readonly Food[]): PlanContent {
  let k = 0;
  return {
    name: 'Bench week',
    days: Array.from({ length: 7 }, (_, d) => ({
      label: `Day ${d + 1}`,
      occasions: ['Breakfast', 'Lunch', 'Snack', 'Dinner', 'Supper'].map((name) => ({
        name,
        kind: name === 'Snack' ? ('snack' as const) : ('meal' as const),
        time: null,
        items: Array.from({ length: 6 }, () => {
          const f = foods[k++ % foods.length] as Food;
          return { foodId: f.id, grams: 40 + (k % 7) * 15, measure: null, label: null };
        }),
      })),
    })),
  };
}

function timeIt(n: number, fn: () => unknown): number[] {
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const t0 = performance.now();
    fn();
    out.push(performance.now() - t0);
  }
  return out;
}

async function loadTest(
  url: string,
  cookie: string,
  seconds: number,
  extraHeaders: Record<string, string> = {},
): Promise<number> {
  let ac: ((o: object) => Promise<{ requests: { average: number }; non2xx: number }>) | undefined;
  try {
    const name = 'autocannon'; // optional dev dependency, imported by name (it ships no types)
    ac = ((await import(name)) as { default: typeof ac }).default;
  } catch {
    ac = undefined;
  }
  if (ac) {
    const r = await ac({
      url,
      connections: 10,
      duration: seconds,
      headers: { cookie, ...extraHeaders },
    });
    if (r.non2xx > 0) console.log(`   warning: ${r.non2xx} non-2xx answers from ${url}`);
    return r.requests.average;
  }
  // Fallback: 10 concurrent fetch loops.
  let count = 0;
  const end = performance.now() + seconds * 1000;
  await Promise.all(
    Array.from({ length: 10 }, async () => {
      while (performance.now() < end) {
        const res = await fetch(url, { headers: { cookie, ...extraHeaders } });
        await res.arrayBuffer();
        count++;
      }
    }),
  );
  return count / seconds;
}

export const plansBench: BenchSection = {
  name: 'plans',
  title: 'plan summary (7 days x 5 occasions x 6 items) and the summary endpoint',
  async run() {
    const foods = benchFoods();
    const map = new Map(foods.map((f) => [f.id, f]));
    const plan = weekPlan(foods);
    const targets = computeTargets({
      weightKg: 70,
      ckdStage: '5',
      dialysis: 'hemodialysis',
      diabetes: false,
      targetOverrides: {},
    });
    const settings = { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS };
    const binder = {
      ingredient: 'calcium-acetate' as const,
      unitStrengthMg: 667,
      schedule: 'per-day' as const,
      units: 6,
      otherMedicines: [],
    };
    const forSummary = { planId: 1, patientId: 1, version: 1, ...plan };
    const run = () => summarizePlan(forSummary, map, targets, settings, binder);
    let sink = 0;
    const bare = () => {
      // The same sums with no model: grams x per-100 g value for each nutrient.
      for (const d of plan.days)
        for (const o of d.occasions)
          for (const it of o.items) {
            const p = (map.get(it.foodId) as Food).per100g;
            const f = it.grams / 100;
            sink +=
              f *
              ((p.phosphorusMg ?? 0) +
                (p.proteinG ?? 0) +
                (p.potassiumMg ?? 0) +
                (p.sodiumMg ?? 0) +
                (p.calciumMg ?? 0) +
                (p.energyKcal ?? 0));
          }
    };
    timeIt(300, run);
    timeIt(300, bare);
    const s = timeIt(3000, run);
    const b = timeIt(3000, bare);
    const med = percentile(s, 50);
    const bmed = percentile(b, 50);
    console.log(
      `   foods: ${hasSr28 ? 'USDA SR28 (30 foods)' : 'invented (SR28 missing)'}; 210 items`,
    );
    console.log(
      `   summarizePlan: median ${fmt(med, 3)} ms, p95 ${fmt(percentile(s, 95), 3)} ms, p99 ${fmt(percentile(s, 99), 3)} ms (goal < 2 ms)${med < 2 ? '' : '  GOAL MISSED'}`,
    );
    console.log(
      `   bare loop:     median ${fmt(bmed, 4)} ms; ratio summary/bare ${fmt(med / Math.max(bmed, 1e-6), 0)}x${sink < 0 ? '' : ''}`,
    );

    const ctx = await createTestContext();
    try {
      const inserted = insertFoods(ctx.db, foods);
      const patient = await new PatientService(ctx.db.kysely, ctx.clock).create({
        label: 'BENCH (invented)',
        weightKg: 70,
        ckdStage: '5',
        dialysis: 'hemodialysis',
        diabetes: false,
        binder,
      });
      const svc = new PlanService(ctx.db.kysely, ctx.clock, new FoodRepository(ctx.db.kysely), {
        absorption: () => Promise.resolve(DEFAULT_ABSORPTION_FRACTIONS),
        thresholds: () => Promise.resolve(DEFAULT_THRESHOLDS),
      });
      const week = weekPlan(inserted);
      const created = await svc.create(patient.id, {
        name: week.name,
        days: week.days.map((d) => ({
          label: d.label,
          occasions: d.occasions.map((o) => ({
            name: o.name,
            items: o.items.map((i) => ({ foodId: i.foodId, grams: i.grams })),
          })),
        })),
      });
      const address = await ctx.app.listen({ host: '127.0.0.1', port: 0 });
      const cookie = `${SESSION_COOKIE}=${ctx.sessionToken ?? ''}`;
      const health = await loadTest(`${address}/api/health`, cookie, 4);
      const url = `${address}/api/plans/${created.header.id}/summary`;
      const size = (await (await fetch(url, { headers: { cookie } })).arrayBuffer()).byteLength;
      const summary = await loadTest(url, cookie, 6);
      const summaryGz = await loadTest(url, cookie, 6, { 'accept-encoding': 'gzip' });
      const goal = (x: number) => (x >= 2000 ? '' : '  GOAL MISSED');
      console.log(`   GET /api/health: ${fmt(health)} req/s (baseline, same server)`);
      console.log(
        `   GET /api/plans/:id/summary (${fmt(size / 1024)} KB JSON): ${fmt(summary)} req/s (goal >= 2,000)${goal(summary)}; ratio ${fmt(summary / health, 2)} of health`,
      );
      console.log(
        `   same, Accept-Encoding gzip (as browsers send): ${fmt(summaryGz)} req/s${goal(summaryGz)}; ratio ${fmt(summaryGz / health, 2)} of health`,
      );
    } finally {
      await ctx.close();
    }
  },
};
