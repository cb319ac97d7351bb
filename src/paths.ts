import { existsSync } from 'node:fs';
import { dirname, join, sep } from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * Where the product's own files are. Every module that reads a template, locale, client module
 * or the default database asks here, so the same code runs from the TypeScript sources (tests,
 * `tsx`) and from the compiled copy under `dist/` (the `bin` and `npm start`).
 */
function findProjectRoot(from: string): string {
  for (let dir = from; ; dir = dirname(dir)) {
    if (existsSync(join(dir, 'package.json')) && existsSync(join(dir, 'templates'))) return dir;
    if (dirname(dir) === dir) throw new Error(`phosledger: no project folder above ${from}`);
  }
}

const HERE = dirname(fileURLToPath(import.meta.url));

/** The checkout's top folder (holds package.json, templates/, db/). */
export const PROJECT_ROOT = findProjectRoot(HERE);

/** True when this process runs the compiled JavaScript under dist/. */
export const RUNNING_COMPILED = HERE.startsWith(join(PROJECT_ROOT, 'dist') + sep);

/** A path inside the checkout, e.g. `projectPath('templates', 'handout')`. */
export function projectPath(...segments: string[]): string {
  return join(PROJECT_ROOT, ...segments);
}

/** Where `npm run build` writes the compiled program, the client bundles and the command list. */
export const DIST_DIR = projectPath('dist');
