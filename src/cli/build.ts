// `npm run build`: compiles the program to dist/ (same folder layout, one .js per .ts, no
// bundling, so stack traces name the source files), bundles the client screens and writes the
// command list that `phosledger --help` reads. Runs on `npm install` through `prepare`.
import { readdirSync, rmSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { build } from 'esbuild';
import { BUILT_ASSETS_DIR, bundleClient } from '../web/assets.js';
import { DIST_DIR, PROJECT_ROOT, projectPath } from '../paths.js';
import { writeCommandManifest } from './manifest.js';

/** Browser code is bundled separately; tests and the build script itself are not shipped. */
const NOT_SERVER_CODE = [
  projectPath('src', 'web', 'client'),
  projectPath('src', 'cli', 'build.ts'),
];

function typeScriptFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (NOT_SERVER_CODE.some((skip) => path === skip)) return [];
    if (statSync(path).isDirectory()) return typeScriptFiles(path);
    return path.endsWith('.ts') && !path.endsWith('.d.ts') ? [path] : [];
  });
}

const started = performance.now();
rmSync(DIST_DIR, { recursive: true, force: true });
const entryPoints = ['src', 'data-import', 'migrations'].flatMap((d) =>
  typeScriptFiles(projectPath(d)),
);
await build({
  entryPoints,
  outdir: DIST_DIR,
  outbase: PROJECT_ROOT,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  sourcemap: 'linked',
  logLevel: 'warning',
});
await bundleClient(BUILT_ASSETS_DIR, true);
await writeCommandManifest();
console.log(
  `built ${entryPoints.length} modules and the client screens into ${relative(PROJECT_ROOT, DIST_DIR)}/ ` +
    `in ${Math.round(performance.now() - started)} ms`,
);
