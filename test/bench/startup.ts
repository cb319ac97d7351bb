// Benchmark section: whole-process start-up figures (no expected values, so no source to name;
// the goals are the product's own).
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

/** The compiled command (`npm run build`) and the same command run from the sources by tsx. */
export const COMPILED_BIN = fileURLToPath(new URL('../../dist/src/cli/bin.js', import.meta.url));
export const SOURCE_BIN = fileURLToPath(new URL('../../src/cli/dev-bin.js', import.meta.url));

function timeCommand(bin: string, args: string[], env: NodeJS.ProcessEnv): number {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [bin, ...args], { env, encoding: 'utf8' });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`${args.join(' ')} failed: ${r.stderr}`);
  return ms;
}

function median(bin: string, args: string[], env: NodeJS.ProcessEnv, runs: number): number {
  return percentile(
    Array.from({ length: runs }, () => timeCommand(bin, args, env)),
    50,
  );
}

/** Milliseconds from spawning `serve` to the first answered /api/health on `dbFile`. */
export function timeServerReady(bin: string, dbFile: string): Promise<number> {
  const env = { ...process.env, PHOSLEDGER_DB: dbFile, PHOSLEDGER_LOG_LEVEL: 'silent' };
  return new Promise<number>((resolve, reject) => {
    const t0 = performance.now();
    const child = spawn(process.execPath, [bin, 'serve', '--port', '0', '--no-demo'], {
      env,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`server did not start in 120 s: ${out}`));
    }, 120_000);
    child.stdout.on('data', async (d: Buffer) => {
      out += d.toString();
      const m = /listening on (http:\/\/\S+)/.exec(out);
      if (!m) return;
      child.stdout.removeAllListeners('data');
      for (;;) {
        try {
          if ((await fetch(`${m[1]}/api/health`)).ok) break;
        } catch {
          /* not yet */
        }
      }
      const ms = performance.now() - t0;
      clearTimeout(timer);
      child.kill('SIGTERM');
      child.once('exit', () => resolve(ms));
    });
  });
}

async function medianServerReady(bin: string, dbFile: string, runs: number): Promise<number> {
  const times: number[] = [];
  for (let i = 0; i < runs; i += 1) times.push(await timeServerReady(bin, dbFile));
  return percentile(times, 50);
}

export const startupBench: BenchSection = {
  name: 'startup',
  title: 'Whole-process start-up: compiled (dist/) against the sources run by tsx, same run',
  async run() {
    const dir = mkdtempSync(join(tmpdir(), 'phosledger-startup-'));
    try {
      const dbFile = join(dir, 'bench.sqlite');
      const env = { ...process.env, PHOSLEDGER_DB: dbFile, PHOSLEDGER_LOG_LEVEL: 'silent' };
      await timeServerReady(COMPILED_BIN, dbFile); // first start imports the embedded table
      const rows: [string, number, number, number][] = [
        [
          'phosledger --help',
          median(COMPILED_BIN, ['--help'], env, 7),
          median(SOURCE_BIN, ['--help'], env, 3),
          300,
        ],
        [
          'foods search egg --json (embedded table)',
          median(COMPILED_BIN, ['foods', 'search', 'egg', '--json'], env, 7),
          median(SOURCE_BIN, ['foods', 'search', 'egg', '--json'], env, 3),
          500,
        ],
        [
          'serve: ready to answer, existing database',
          await medianServerReady(COMPILED_BIN, dbFile, 5),
          await medianServerReady(SOURCE_BIN, dbFile, 3),
          1500,
        ],
      ];
      for (const [what, compiled, sources, goal] of rows) {
        console.log(
          `   ${what.padEnd(44)} compiled median ${fmt(compiled)} ms (goal < ${fmt(goal)} ms: ${compiled < goal ? 'met' : 'NOT met'}); from sources ${fmt(sources)} ms; ratio ${fmt(compiled / sources, 2)}`,
        );
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  },
};
