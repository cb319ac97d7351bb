import type { InjectOptions, LightMyRequestResponse } from 'fastify';
import { fixedClock, type Clock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { buildApp, type App } from '../../src/server/app.js';

/** A fresh app over a fresh migrated in-memory database, for HTTP tests. */
export interface TestContext {
  app: App;
  db: Db;
  clock: Clock;
  /**
   * app.inject as a signed-in dietitian (session cookie and CSRF header added once accounts
   * exist); use `app.inject` directly to test anonymous access.
   */
  inject(opts: InjectOptions): Promise<LightMyRequestResponse>;
  close(): Promise<void>;
}

export async function createTestContext(opts: { db?: Db } = {}): Promise<TestContext> {
  const db = opts.db ?? (await openMemoryDb());
  const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time
  const app = await buildApp({ db, clock });
  await app.ready();
  return {
    app,
    db,
    clock,
    inject: (o) => app.inject(o),
    async close() {
      await app.close();
      await db.close();
    },
  };
}
