import type { Clock } from '../src/clock.js';
import type { Db } from '../src/db/database.js';
import { auditImport, SYSTEM_FIRST_START } from '../src/audit/actors.js';
import { ifct2017 } from './ifct2017.js';

/** What the first-start import needs from the server that runs it. */
export interface DefaultTableContext {
  db: Db;
  clock: Clock;
  io: { stdout: NodeJS.WritableStream; stderr: NodeJS.WritableStream };
}

/**
 * First start: with no food table in the database, import the embedded default (IFCT 2017,
 * shipped as an npm package) so the program is useful at once. Does nothing afterwards.
 */
export async function importDefaultFoodTable(ctx: DefaultTableContext): Promise<void> {
  const row = ctx.db.sqlite.prepare('select count(*) as n from food_source').get() as { n: number };
  if (row.n > 0) return;
  const out = ctx.io.stdout;
  out.write(`first start: importing ${ifct2017.title} ...\n`);
  let lastPct = -1;
  const result = await ifct2017.run(ctx.db, undefined, {
    clock: ctx.clock,
    onProgress: (p) => {
      const pct = Math.floor((100 * p.bytesDone) / Math.max(1, p.bytesTotal) / 25) * 25;
      if (pct > lastPct) {
        lastPct = pct;
        out.write(`  ${pct}% (${p.rows} foods)\n`);
      }
    },
  });
  await auditImport(ctx.db, result, SYSTEM_FIRST_START, ctx.clock);
  if (!result.ok) {
    ctx.io.stderr.write(
      `first start: the default food table could not be imported: ${result.fatal.message}\n` +
        'the server starts without foods; import a table with `phosledger import`\n',
    );
    return;
  }
  out.write(
    `first start: imported ${result.imported} foods, ${result.values} values (${ifct2017.format} ${result.release})\n`,
  );
}
