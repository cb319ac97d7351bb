import type { FastifyInstance } from 'fastify';
import { registerAudit } from '../audit/audit.hook.js';
import { auditRoutes, patientDataRoutes } from '../audit/audit.routes.js';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { authRoutes } from './auth.routes.js';
import { registerAuth, type AuthOptions } from './auth.plugin.js';
import { setupRoutes } from './setup.routes.js';

export type { AuthOptions } from './auth.plugin.js';

/**
 * Accounts and audit for the whole app. Call on the root instance before any route: it adds
 * the global auth hook (401 on every route without `config.public`), CSRF and role checks,
 * security headers, the audit hook (`config.audit`), and the session, set-up, user admin and
 * audit routes.
 */
export async function registerSecurity(
  app: FastifyInstance,
  deps: { db: Db; clock: Clock; auth?: AuthOptions },
): Promise<void> {
  const auth = await registerAuth(app, { db: deps.db, clock: deps.clock, ...deps.auth });
  registerAudit(app, deps);
  await app.register(authRoutes, { prefix: '/api', db: deps.db, clock: deps.clock, auth });
  await app.register(auditRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(patientDataRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(setupRoutes, { db: deps.db, clock: deps.clock, auth });
}
