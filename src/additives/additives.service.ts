import type { Db } from '../db/database.js';
import { AdditiveScanRepository } from './additives.repository.js';
import { ADDITIVE_CATALOGUE_VERSION } from './catalogue.js';
import { analyzeIngredients } from './ingredient-parser.js';

export interface RescanResult {
  catalogueVersion: string;
  withStatement: number;
  rescanned: number;
  alreadyCurrent: number;
  withCountedAdditives: number;
}

/** Recomputes `food.additive_scan` for foods whose scan is missing or from an older catalogue. */
export async function rescanAdditives(
  db: Pick<Db, 'kysely'>,
  opts: {
    all?: boolean;
    pageSize?: number;
    onProgress?: (done: number, total: number) => void;
  } = {},
): Promise<RescanResult> {
  const repo = new AdditiveScanRepository(db.kysely);
  const pageSize = opts.pageSize ?? 2000;
  const total = await repo.countStatements();
  const result: RescanResult = {
    catalogueVersion: ADDITIVE_CATALOGUE_VERSION,
    withStatement: total,
    rescanned: 0,
    alreadyCurrent: 0,
    withCountedAdditives: 0,
  };
  let after = 0;
  let seen = 0;
  for (;;) {
    const page = await repo.statementsAfter(after, pageSize);
    if (page.length === 0) break;
    const updates: { id: number; scan: string; version: string }[] = [];
    for (const row of page) {
      if (!opts.all && row.additive_scan_version === ADDITIVE_CATALOGUE_VERSION) {
        result.alreadyCurrent++;
        continue;
      }
      const scan = analyzeIngredients(row.ingredients, row.ingredients_lang);
      if (scan.additives.some((a) => a.counted)) result.withCountedAdditives++;
      updates.push({ id: row.id, scan: JSON.stringify(scan), version: ADDITIVE_CATALOGUE_VERSION });
    }
    await repo.saveScans(updates);
    result.rescanned += updates.length;
    seen += page.length;
    after = (page[page.length - 1] as { id: number }).id;
    opts.onProgress?.(seen, total);
  }
  return result;
}

/**
 * Start-up step: when the catalogue changed since foods were scanned, rescan them before the
 * server answers (a no-op when every scan is current).
 */
export async function rescanOutdatedScans(ctx: {
  db: Pick<Db, 'kysely'>;
  io: { stdout: NodeJS.WritableStream };
}): Promise<void> {
  const outdated = await new AdditiveScanRepository(ctx.db.kysely).countOutdated(
    ADDITIVE_CATALOGUE_VERSION,
  );
  if (outdated === 0) return;
  const r = await rescanAdditives(ctx.db);
  ctx.io.stdout.write(
    `phosphate-additive scans brought up to catalogue ${r.catalogueVersion}: ${r.rescanned} foods rescanned\n`,
  );
}
