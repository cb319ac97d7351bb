import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { DIST_DIR, projectPath, RUNNING_COMPILED } from '../paths.js';
import { staticAsset, type StaticAsset } from '../server/static-asset.js';

/** One page's client module; the bundle is built from `src/web/client/pages/<name>.ts`. */
export const PAGE_MODULES = [
  'signin',
  'patients',
  'patient',
  'builder',
  'diary',
  'handout',
  'imports',
  'settings',
] as const;
export type PageModule = (typeof PAGE_MODULES)[number];

export type Asset = StaticAsset;

/** Bundled client modules and the stylesheet, keyed by URL path under /assets/. */
export type AssetMap = ReadonlyMap<string, Asset>;

const CLIENT_DIR = projectPath('src', 'web', 'client');
const STYLE_FILE = projectPath('src', 'web', 'styles', 'app.css');
/** Where `npm run build` writes the bundles the compiled server serves. */
export const BUILT_ASSETS_DIR = join(DIST_DIR, 'public', 'assets');

const asset = staticAsset;

let cached: Promise<AssetMap> | undefined;

/**
 * The client bundles and the stylesheet, once per process. The compiled program serves the
 * bundles `npm run build` wrote; the TypeScript sources (tests, development) bundle them in
 * memory with esbuild (about 100 ms), so a changed client module is never served stale.
 */
export function loadAssets(): Promise<AssetMap> {
  cached ??= RUNNING_COMPILED ? readBuiltAssets() : bundleInMemory();
  return cached;
}

/** Bundles every page module: one self-contained, minified file per screen. */
export async function bundleClient(outdir: string, write: boolean) {
  const { build } = await import('esbuild');
  return build({
    entryPoints: PAGE_MODULES.map((p) => join(CLIENT_DIR, 'pages', `${p}.ts`)),
    bundle: true,
    // One self-contained file per screen: a few kB repeated across screens costs less than
    // the request waterfall that shared chunks add to the first paint.
    splitting: false,
    format: 'esm',
    minify: true,
    target: ['chrome110', 'firefox115', 'safari16'],
    outdir,
    entryNames: '[name]',
    write,
    logLevel: 'silent',
    legalComments: 'none',
  });
}

async function bundleInMemory(): Promise<AssetMap> {
  const result = await bundleClient('/assets', false);
  const map = new Map<string, Asset>();
  for (const file of result.outputFiles ?? []) {
    const name = file.path.slice(file.path.lastIndexOf('/assets/'));
    map.set(name, asset(Buffer.from(file.contents), 'text/javascript; charset=utf-8'));
  }
  map.set('/assets/app.css', asset(await readFile(STYLE_FILE), 'text/css; charset=utf-8'));
  return map;
}

async function readBuiltAssets(): Promise<AssetMap> {
  const map = new Map<string, Asset>();
  for (const page of PAGE_MODULES) {
    const body = await readFile(join(BUILT_ASSETS_DIR, `${page}.js`));
    map.set(`/assets/${page}.js`, asset(body, 'text/javascript; charset=utf-8'));
  }
  map.set('/assets/app.css', asset(await readFile(STYLE_FILE), 'text/css; charset=utf-8'));
  return map;
}
