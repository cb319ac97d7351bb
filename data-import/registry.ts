import { fdcCsv } from './fdc-csv.js';
import { fdcJson } from './fdc-json.js';
import { ifct2017 } from './ifct2017.js';
import type { Importer } from './importer.js';
import { offCsv } from './off-csv.js';
import { offJsonl } from './off-jsonl.js';
import { productsCsv } from './products-csv.js';
import { usdaSr28 } from './usda-sr28.js';

/** Every import format, by its name on the command line. Add a new format here. */
export const importers: readonly Importer[] = [
  ifct2017,
  usdaSr28,
  fdcCsv,
  fdcJson,
  offCsv,
  offJsonl,
  productsCsv,
];

export function findImporter(format: string): Importer | undefined {
  return importers.find((i) => i.format === format);
}
