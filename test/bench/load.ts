/**
 * Load: 200 connections on 127.0.0.1 (autocannon) against food search, the plan summary and the
 * handout routes, signed in, over a WAL database file with the full USDA SR28 (IFCT 2017 when
 * SR28 is missing). The server runs in its own process (load-server.ts). Prints requests/s, p50
 * and p99 latency and errors per route, with /api/health on the same server as the baseline.
 * Zero errors is the goal (a request unanswered after autocannon's 10 s counts as an error).
 *
 *   npm run bench -- load                                    60 s per route (the goal setting)
 *   PHOSLEDGER_LOAD_SECONDS=5 npm run bench -- load          a quick run
 *   PHOSLEDGER_LOAD_CONNECTIONS=50 ...                       fewer connections
 */
import { spawn } from 'node:child_process';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import type { BenchSection } from './sections.js';
import { fmt } from './stats.js';

interface AutocannonResult {
  requests: { average: number; total: number };
  latency: { p99: number; p50: number };
  errors: number;
  timeouts: number;
  non2xx: number;
}
type Autocannon = (opts: object) => Promise<AutocannonResult>;

interface Ready {
  address: string;
  cookie: string;
  planId: number;
  routes: string[];
  format: string;
  foods: number;
}

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

const SERVER = fileURLToPath(new URL('./load-server.ts', import.meta.url));

export const loadBench: BenchSection = {
  name: 'load',
  title: 'search, plan summary and handouts under 200 concurrent connections (autocannon)',
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
    const child = spawn(process.execPath, ['--import', 'tsx', SERVER], {
      stdio: ['pipe', 'pipe', 'inherit'],
    });
    const lines = createInterface({ input: child.stdout! });
    const audited = new Promise<string>((resolve) => {
      lines.on('line', (l) => {
        if (l.startsWith('AUDITED ')) resolve(l.slice(8));
      });
    });
    try {
      const ready = await new Promise<Ready>((resolve, reject) => {
        child.once('exit', (code) => reject(new Error(`load server exited (${code})`)));
        lines.on('line', (l) => {
          if (l.startsWith('READY ')) resolve(JSON.parse(l.slice(6)) as Ready);
        });
      });
      const routes = new Set(ready.routes);
      const targets: Array<{ label: string; path: string; vary?: boolean }> = [
        {
          label: 'GET /api/foods?q= (search, 20 terms)',
          path: '/api/foods?q=milk&limit=20',
          vary: true,
        },
        { label: 'GET /api/plans/:id/summary', path: `/api/plans/${ready.planId}/summary` },
      ];
      if (routes.has('GET /plans/:id/handout'))
        targets.push({
          label: 'GET /plans/:id/handout (HTML)',
          path: `/plans/${ready.planId}/handout`,
        });
      if (routes.has('GET /api/plans/:id/handout.pdf'))
        targets.push({
          label: 'GET /api/plans/:id/handout.pdf',
          path: `/api/plans/${ready.planId}/handout.pdf`,
        });
      if (targets.length === 2) console.log('   handout routes not registered: not measured');
      console.log(
        `   ${connections} connections, ${seconds} s per route; foods: ${ready.format} (${fmt(ready.foods)}); server in its own process, database file in WAL mode`,
      );
      const run = async (label: string, path: string, vary = false, duration = seconds) => {
        let i = 0;
        const r = await autocannon({
          url: `${ready.address}${path}`,
          connections,
          duration,
          headers: { cookie: ready.cookie },
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
        // autocannon's `errors` already counts timeouts
        const errors = r.errors + r.non2xx;
        console.log(
          `   ${label.padEnd(40)} ${fmt(r.requests.average).padStart(8)} req/s  p50 ${fmt(r.latency.p50)} ms  p99 ${fmt(r.latency.p99)} ms  errors ${errors}${errors > 0 ? ` (${r.timeouts} timed out after 10 s, ${r.non2xx} non-2xx)` : ''}`,
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
        console.log(
          `   ${''.padEnd(40)} ${fmt(rps / Math.max(baseline, 1e-9), 3)} of the baseline's req/s`,
        );
      }
    } finally {
      child.stdin!.end();
      const n = await Promise.race([
        audited,
        new Promise<string>((r) => setTimeout(() => r('?'), 10_000)),
      ]);
      console.log(`   audit events written during the run: ${n}`);
      child.kill('SIGTERM');
    }
  },
};
