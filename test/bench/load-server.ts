/**
 * The server side of the load benchmark, in its own process (so autocannon and the server do not
 * share one event loop): imports a food table into a WAL database file, creates an invented
 * patient with a 7-day plan, listens on 127.0.0.1 and prints one line `READY <json>` with the
 * address, the session cookie and what to load. Ends on SIGTERM or when stdin closes.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { findImporter } from '../../data-import/registry.js';
import { SESSION_COOKIE } from '../../src/auth/auth.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { createTestContext } from '../helpers/context.js';
import { hasSr28, SR28_DIR } from '../helpers/shared.js';

const dir = mkdtempSync(join(tmpdir(), 'phl-load-'));
const db = openDb(join(dir, 'load.sqlite'));
await migrateToLatest(db);
const format = hasSr28 ? 'usda-sr28' : 'ifct2017';
const imported = await findImporter(format)!.run(db, hasSr28 ? SR28_DIR : undefined);
if (!imported.ok) throw new Error(`import failed: ${imported.fatal.message}`);
const ctx = await createTestContext({ db });
const foods = db.sqlite.prepare('SELECT id FROM food ORDER BY id LIMIT 30').all() as Array<{
  id: number;
}>;
const patient = await ctx.inject({
  method: 'POST',
  url: '/api/patients',
  payload: {
    label: 'LOAD (invented)',
    language: 'es',
    weightKg: 70,
    ckdStage: '5',
    dialysis: 'hemodialysis',
    diabetes: false,
    labs: [],
  },
});
if (patient.statusCode !== 201) throw new Error(`patient: ${patient.body}`);
let k = 0;
const plan = await ctx.inject({
  method: 'POST',
  url: `/api/patients/${patient.json().id}/plans`,
  payload: {
    name: 'Load week (invented)',
    days: Array.from({ length: 7 }, (_, d) => ({
      label: `Day ${d + 1}`,
      occasions: ['Breakfast', 'Lunch', 'Snack', 'Dinner', 'Supper'].map((name) => ({
        name,
        items: Array.from({ length: 6 }, () => ({
          foodId: foods[k++ % foods.length]!.id,
          grams: 40 + (k % 7) * 15,
        })),
      })),
    })),
  },
});
if (plan.statusCode !== 201) throw new Error(`plan: ${plan.body}`);
const body = plan.json() as { planId?: number; id?: number; header?: { id: number } };
const planId = body.planId ?? body.id ?? body.header?.id;
const address = await ctx.app.listen({ host: '127.0.0.1', port: 0 });
const routes = ctx.app.routeInventory.map((r) => `${r.method} ${r.url}`);

let closing = false;
const stop = async () => {
  if (closing) return;
  closing = true;
  const audited = (
    db.sqlite.prepare('SELECT count(*) AS n FROM audit_event').get() as { n: number }
  ).n;
  process.stdout.write(`AUDITED ${audited}\n`);
  await ctx.app.close();
  await db.close();
  rmSync(dir, { recursive: true, force: true });
  process.exit(0);
};
process.on('SIGTERM', () => void stop());
process.stdin.on('end', () => void stop());
process.stdin.resume();
process.stdout.write(
  `READY ${JSON.stringify({ address, cookie: `${SESSION_COOKIE}=${ctx.sessionToken}`, planId, routes, format, foods: imported.imported })}\n`,
);
