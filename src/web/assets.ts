import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

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

export interface Asset {
  body: Buffer;
  contentType: string;
  etag: string;
}

/** Bundled client modules and the stylesheet, keyed by URL path under /assets/. */
export type AssetMap = ReadonlyMap<string, Asset>;

const CLIENT_DIR = fileURLToPath(new URL('./client/', import.meta.url));
const STYLE_FILE = fileURLToPath(new URL('./styles/app.css', import.meta.url));

function asset(body: Buffer, contentType: string): Asset {
  const etag = `"${createHash('sha256').update(body).digest('base64url').slice(0, 22)}"`;
  return { body, contentType, etag };
}

let cached: Promise<AssetMap> | undefined;

/**
 * Bundles every page module with esbuild in memory (once per process: about 100 ms), one file
 * per screen, minified, targeting current browsers. Nothing is
 * written to disk and nothing is fetched from the network at run time.
 */
export function loadAssets(): Promise<AssetMap> {
  cached ??= bundleAssets();
  return cached;
}

async function bundleAssets(): Promise<AssetMap> {
  const result = await build({
    entryPoints: PAGE_MODULES.map((p) => `${CLIENT_DIR}pages/${p}.ts`),
    bundle: true,
    // One self-contained file per screen: a few kB repeated across screens costs less than
    // the request waterfall that shared chunks add to the first paint.
    splitting: false,
    format: 'esm',
    minify: true,
    target: ['chrome110', 'firefox115', 'safari16'],
    outdir: '/assets',
    entryNames: '[name]',
    write: false,
    logLevel: 'silent',
    legalComments: 'none',
  });
  const map = new Map<string, Asset>();
  for (const file of result.outputFiles) {
    const name = file.path.slice(file.path.lastIndexOf('/assets/'));
    map.set(name, asset(Buffer.from(file.contents), 'text/javascript; charset=utf-8'));
  }
  const css = await readFile(STYLE_FILE);
  map.set('/assets/app.css', asset(css, 'text/css; charset=utf-8'));
  return map;
}
