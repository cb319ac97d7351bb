/**
 * The compiled program (what `phosledger` and `npm start` run): built afresh from the sources,
 * it answers `--help` with every command and starts the server on an empty database (first
 * start imports the embedded table and seeds the invented demo patient), serving the health
 * check, a screen and its client bundle. No expected values from a source: the figures checked
 * are the product's own (command names, status codes).
 */
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const BIN = join(ROOT, 'dist/src/cli/bin.js');

describe('the compiled program', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'phl-compiled-'));
    const built = spawnSync('npm', ['run', 'build'], { cwd: ROOT, encoding: 'utf8' });
    expect(built.status, built.stderr).toBe(0);
  }, 120_000);
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('lists every command without loading them', () => {
    const r = spawnSync(process.execPath, [BIN, '--help'], { encoding: 'utf8' });
    expect(r.status).toBe(0);
    for (const c of [
      'serve',
      'foods search',
      'plan balance',
      'plan export-fhir',
      'labs add',
      'users unlock',
    ])
      expect(r.stdout).toContain(`phosledger ${c}`);
  });

  it('starts on an empty database and serves the API, a screen and its bundle', async () => {
    const child = spawn(process.execPath, [BIN, 'serve', '--port', '0'], {
      env: {
        ...process.env,
        PHOSLEDGER_DB: join(dir, 'db', 'phosledger.sqlite'),
        PHOSLEDGER_LOG_LEVEL: 'silent',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    let err = '';
    child.stderr.on('data', (d: Buffer) => (err += d.toString()));
    try {
      const base = await new Promise<string>((resolve, reject) => {
        const timer = setTimeout(
          () => reject(new Error(`no start in 90 s: ${out} ${err}`)),
          90_000,
        );
        child.stdout.on('data', (d: Buffer) => {
          out += d.toString();
          const m = /listening on (http:\/\/\S+)/.exec(out);
          if (m) {
            clearTimeout(timer);
            resolve(m[1] as string);
          }
        });
        child.once('exit', (code) => reject(new Error(`exited ${code}: ${out} ${err}`)));
      });
      expect((await fetch(`${base}/api/health`)).status).toBe(200);
      expect((await fetch(`${base}/signin`)).status).toBe(200);
      const bundle = await fetch(`${base}/assets/builder.js`);
      expect(bundle.status).toBe(200);
      expect((await bundle.text()).length).toBeGreaterThan(1000);
      // still running after the first-start steps (imports, demo seed, start-up preparation)
      await new Promise((r) => setTimeout(r, 1500));
      expect(child.exitCode, err).toBeNull();
    } finally {
      child.kill('SIGTERM');
    }
  }, 120_000);
});
