import type { Clock } from '../clock.js';
import type { Config } from '../config.js';
import { migrateToLatest, openDb, type Db } from '../db/database.js';
import { ensureBackupKey } from '../backup/signature.js';
import { acquireDbLock } from './db-lock.js';
import { exposedFileWarnings, usePrivateUmask } from './private-files.js';
import {
  afterListen,
  exposureWarning,
  loadTls,
  proxyNotice,
  trustProxyFromEnv,
  type TlsFiles,
} from '../auth/transport.js';
import { importDefaultFoodTable } from '../../data-import/first-start.js';
import { seedDemoData } from '../plans/demo-seed.js';
import { rescanOutdatedScans } from '../additives/additives.service.js';
import { preloadFonts } from '../handouts/pdf/fonts.js';
import { DiaryAuditService } from '../diary/diary.service.js';
import { buildApp } from './app.js';

export interface ServeIo {
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
}

/**
 * Opens and migrates the database, runs first-start steps, and listens. Binds 127.0.0.1 unless
 * told otherwise: the server holds health information.
 */
export async function serve(config: Config, clock: Clock, io: ServeIo, transport: TlsFiles = {}) {
  const https = loadTls(transport);
  const warning = exposureWarning(config.host, !!https);
  if (warning) io.stderr.write(`${warning}\n`);
  usePrivateUmask();
  // Held while serving: a restore under a running server is refused, not served from stale state.
  const release = acquireDbLock(config.dbFile, 'server', clock.now());
  let db: Db;
  try {
    for (const w of exposedFileWarnings(config.dbFile)) io.stderr.write(`${w}\n`);
    db = openDb(config.dbFile);
    if (config.dbFile !== ':memory:') ensureBackupKey(config.dbFile);
  } catch (err) {
    release();
    throw err;
  }
  process.once('exit', release);
  await migrateToLatest(db);
  for (const step of firstStartSteps) await step({ db, config, clock, io });
  const trustProxy = trustProxyFromEnv(process.env);
  const app = await buildApp({
    db,
    clock,
    config,
    logger: safeLogger(config.logLevel),
    trustProxy,
    ...(https ? { https } : {}),
  });
  const address = await app.listen({ host: config.host, port: config.port });
  io.stdout.write(`phosledger listening on ${address}\n${proxyNotice(trustProxy)}\n`);
  await afterListen(app, address, io.stdout);
  // Diary audits' name indexes and scoring features, built while the first requests come in.
  const stopPreparing = new AbortController();
  const preparing = new DiaryAuditService(db, clock, { longRunning: true })
    .prepare({ signal: stopPreparing.signal })
    .catch((err: unknown) => {
      io.stderr.write(`diary audit preparation failed (audits search with SQL): ${String(err)}\n`);
    });
  const close = async () => {
    stopPreparing.abort();
    await preparing;
    await app.close();
    await db.close();
    process.off('exit', release);
    release();
  };
  return { app, db, address, close };
}

export interface FirstStartContext {
  db: import('../db/database.js').Db;
  config: Config;
  clock: Clock;
  io: ServeIo;
}

/** Steps run at every start before listening (each decides itself whether it has work). */
export const firstStartSteps: Array<(ctx: FirstStartContext) => Promise<void>> = [];
// The embedded default food table comes first: later steps (the demo seed) need foods.
firstStartSteps.unshift(importDefaultFoodTable);

/**
 * Request logs carry the method, the route pattern and the status only: never query strings,
 * bodies or ids in paths, which can identify a patient.
 */
export function safeLogger(level: string) {
  return {
    level,
    serializers: {
      req: (req: { method: string; routeOptions?: { url?: string | undefined } }) => ({
        method: req.method,
        route: req.routeOptions?.url ?? 'unknown',
      }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
  };
}

// Invented demo clinic, patient and plan (skipped by --no-demo / PHOSLEDGER_NO_DEMO=1).
firstStartSteps.push(async (ctx) => {
  await seedDemoData(ctx);
});

// Stored phosphate-additive scans made with an older catalogue are redone before listening.
firstStartSteps.push(rescanOutdatedScans);

// Handout fonts are parsed once, before the first request, not during it.
firstStartSteps.push(async () => preloadFonts());
