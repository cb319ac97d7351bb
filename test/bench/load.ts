/**
 * Load: 200 connections on 127.0.0.1 (autocannon) against food search, the plan summary and the
 * handout routes, signed in, over a WAL database file with the full USDA SR28 (IFCT 2017 when
 * SR28 is missing). Prints requests/s, p99 latency and errors per route, with the same figures
 * for /api/health on the same server as the baseline. Zero errors is the goal.
 *
 *   npm run bench -- load                                    60 s per route (the goal setting)
 *   PHOSLEDGER_LOAD_SECONDS=5 npm run bench -- load          a quick run
 *   PHOSLEDGER_LOAD_CONNECTIONS=50 ...                       fewer connections
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { findImporter } from '../../data-import/registry.js';
import { SESSION_COOKIE } from '../../src/auth/auth.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { createTestContext } from '../helpers/context.js';
import { hasSr28, SR28_DIR } from '../helpers/shared.js';
import type { BenchSection } from './sections.js';
import { fmt } from './stats.js';

interface AutocannonResult {
  requests: { average: number; total: number };
  latency: { p99: number; p50: number; average: number };
  errors: number;
  timeouts: number;
  non2xx: number;
  statusCodeStats?: Record<string, { count: number }>;
}
type Autocannon = (opts: object) => Promise<AutocannonResult>;

function positiveInt(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name} must be a positive whole number`);
  return n;
}

// Search terms a dietitian might type (common practice, no source): prefixes and whole words.
const TERMS = [
  'milk',
  'chee',
  'cheddar',
  'egg',
  'bread',
  'rice',
  'chicken',
  'beef',
  'bean',
  'lentil',
  'yog',
  'apple',
  'banana',
  'cola',
  'ham',
  'sausage',
  'pota',
  'tofu',
  'oat',
  'salmon',
];

export const loadBench: BenchSection = {
  name: 'load',
  title: 'search, plan summary and handouts under concurrent connections (autocannon)',
  async run() {
    const seconds = positiveInt('PHOSLEDGER_LOAD_SECONDS', 60);
    const connections = positiveInt('PHOSLEDGER_LOAD_CONNECTIONS', 200);
    let autocannon: Autocannon;
    try {
      const name = 'autocannon'; // dev dependency without types, imported by name
      autocannon = ((await import(name)) as { default: Autocannon }).default;
    } catch {
      console.log('   autocannon is not installed (npm install): section skipped');
      return;
    }
    const dir = mkdtempSync(join(tmpdir(), 'phl-load-'));
    const db = openDb(join(dir, 'load.sqlite'));
    try {
      await migrateToLatest(db);
      const format = hasSr28 ? 'usda-sr28' : 'ifct2017';
      const imported = await findImporter(format)!.run(db, hasSr28 ? SR28_DIR : undefined);
      if (!imported.ok) throw new Error(`import failed: ${imported.fatal.message}`);
      const ctx = await createTestContext({ db });
      const foods = db.sqlite.prepare('SELECT id FROM food ORDER BY id LIMIT 30').all() as Array<{
        id: number;
      }>;
      const patient = await ctx.inject({
        method: 'POST',
        url: '/api/patients',
        payload: {
          label: 'LOAD (invented)',
          language: 'en',
          weightKg: 70,
          ckdStage: '5',
          dialysis: 'hemodialysis',
          diabetes: false,
          labs: [],
        },
      });
      if (patient.statusCode !== 201) throw new Error(`patient: ${patient.body}`);
      let k = 0;
      const plan = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${patient.json().id}/plans`,
        payload: {
          name: 'Load week (invented)',
          days: Array.from({ length: 7 }, (_, d) => ({
            label: `Day ${d + 1}`,
            occasions: ['Breakfast', 'Lunch', 'Snack', 'Dinner', 'Supper'].map((name) => ({
              name,
              items: Array.from({ length: 6 }, () => ({
                foodId: foods[k++ % foods.length]!.id,
                grams: 40 + (k % 7) * 15,
              })),
            })),
          })),
        },
      });
      if (plan.statusCode !== 201) throw new Error(`plan: ${plan.body}`);
      const planId = (plan.json().planId ?? plan.json().id ?? plan.json().header?.id) as number;

      const address = await ctx.app.listen({ host: '127.0.0.1', port: 0 });
      const headers = { cookie: `${SESSION_COOKIE}=${ctx.sessionToken}` };
      const routes = new Set(ctx.app.routeInventory.map((r) => `${r.method} ${r.url}`));
      const targets: Array<{ label: string; path: string; vary?: boolean }> = [
        {
          label: 'GET /api/foods?q= (search, 20 terms)',
          path: '/api/foods?q=milk&limit=20',
          vary: true,
        },
        { label: 'GET /api/plans/:id/summary', path: `/api/plans/${planId}/summary` },
      ];
      if (routes.has('GET /plans/:id/handout'))
        targets.push({ label: 'GET /plans/:id/handout (HTML)', path: `/plans/${planId}/handout` });
      if (routes.has('GET /api/plans/:id/handout.pdf'))
        targets.push({
          label: 'GET /api/plans/:id/handout.pdf',
          path: `/api/plans/${planId}/handout.pdf`,
        });
      else console.log('   handout routes not registered: only search and summary measured');

      console.log(
        `   ${connections} connections, ${seconds} s per route; foods: ${format} (${fmt(imported.imported)}); database file in WAL mode`,
      );
      const run = async (label: string, path: string, vary = false, duration = seconds) => {
        let i = 0;
        const r = await autocannon({
          url: `${address}${path}`,
          connections,
          duration,
          headers,
          ...(vary
            ? {
                requests: [
                  {
                    setupRequest: (req: { path: string }) => ({
                      ...req,
                      path: `/api/foods?q=${TERMS[i++ % TERMS.length]}&limit=20`,
                    }),
                  },
                ],
              }
            : {}),
        });
        const errors = r.errors + r.timeouts + r.non2xx;
        console.log(
          `   ${label.padEnd(40)} ${fmt(r.requests.average).padStart(8)} req/s  p50 ${fmt(r.latency.p50)} ms  p99 ${fmt(r.latency.p99)} ms  errors ${errors}${errors > 0 ? `  (non-2xx ${r.non2xx}, timeouts ${r.timeouts}, socket ${r.errors})` : ''}`,
        );
        return r.requests.average;
      };
      const baseline = await run(
        'GET /api/health (baseline, public)',
        '/api/health',
        false,
        Math.min(seconds, 10),
      );
      for (const t of targets) {
        const rps = await run(t.label, t.path, t.vary ?? false);
        console.log(`   ${''.padEnd(40)} ratio to baseline ${fmt(rps / baseline, 3)}`);
      }
      const audited = (
        db.sqlite.prepare('SELECT count(*) AS n FROM audit_event').get() as { n: number }
      ).n;
      console.log(`   audit events written during the run: ${fmt(audited)}`);
      await ctx.app.close();
    } finally {
      await db.close();
      rmSync(dir, { recursive: true, force: true });
    }
  },
};
