import Fastify, { type FastifyInstance, type FastifyServerOptions } from 'fastify';
import swagger from '@fastify/swagger';
import swaggerUi from '@fastify/swagger-ui';
import {
  jsonSchemaTransform,
  serializerCompiler,
  validatorCompiler,
  type ZodTypeProvider,
} from 'fastify-type-provider-zod';
import type { Clock } from '../clock.js';
import type { Config } from '../config.js';
import type { Db } from '../db/database.js';
import { registerSecurity, type AuthOptions } from '../auth/security.js';
import { foodRoutes } from '../foods/foods.routes.js';
import { patientRoutes } from '../patients/patients.routes.js';
import { labRoutes } from '../patients/labs.routes.js';
import { planFhirRoutes } from '../plans/fhir-export.routes.js';
import { planRoutes } from '../plans/plans.routes.js';
import { balanceRoutes } from '../balance/balance.routes.js';
import { planDraftRoutes } from '../plans/drafts.routes.js';
import { diaryRoutes } from '../diary/diary.routes.js';
import { additivesRoutes } from '../additives/additives.routes.js';
import { settingsRoutes } from '../settings/settings.routes.js';
import { importRoutes } from '../imports/imports.routes.js';
import { redirectScreensToSignIn, webRoutes } from '../web/web.routes.js';
import { handoutRoutes } from '../handouts/handouts.routes.js';
import { DEFAULT_BODY_LIMIT_BYTES } from './body-limits.js';
import { glossaryRoutes } from '../glossary/glossary.routes.js';
import { withUserWording } from '../i18n/user-wording.js';
import { registerErrorHandler } from './error-handler.js';
import { registerTurns } from './turns.js';

/** Everything the server needs from outside; tests pass a fresh in-memory database. */
export interface AppDeps {
  db: Db;
  clock: Clock;
  config?: Partial<Config>;
  /** Fastify logger options; tests pass false. Never log bodies: they may hold patient data. */
  logger?: FastifyServerOptions['logger'];
  /** Session timeouts, lock-out and password cost; tests pass cheap hashing. */
  auth?: AuthOptions;
  /** Serve HTTPS with this PEM key and certificate (`serve --tls-cert/--tls-key`). */
  https?: { key: Buffer; cert: Buffer };
  /** Believe X-Forwarded-* from a proxy on loopback (PHOSLEDGER_TRUST_PROXY=1). */
  trustProxy?: boolean;
}

declare module 'fastify' {
  interface FastifyContextConfig {
    /** Route answers without a signed-in user (health, sign-in, static assets, docs). */
    public?: boolean;
  }
}

export type App = FastifyInstance;

/** Builds the HTTP application without listening. */
export async function buildApp(deps: AppDeps): Promise<App> {
  const options = {
    logger: deps.logger ?? false,
    // Routes that take more (diary upload) raise it themselves; file uploads stream to disk.
    bodyLimit: DEFAULT_BODY_LIMIT_BYTES,
    ...(deps.trustProxy ? { trustProxy: ['127.0.0.1', '::1'] } : {}),
  };
  const app = (
    deps.https ? Fastify({ ...options, https: deps.https }) : Fastify(options)
  ) as FastifyInstance;
  app.setValidatorCompiler(validatorCompiler);
  app.setSerializerCompiler(serializerCompiler);
  registerErrorHandler(app);
  await registerSecurity(app, {
    db: deps.db,
    clock: deps.clock,
    ...(deps.auth ? { auth: deps.auth } : {}),
  });
  registerTurns(app);
  // Reference tables may say "from memory"; what users read says "assumed (no published figure)".
  app.addHook('preSerialization', async (_req, _reply, payload) => withUserWording(payload));
  redirectScreensToSignIn(app);

  await app.register(swagger, {
    openapi: {
      info: {
        title: 'phosledger API',
        description: 'Dietary phosphate load planner. Estimates only; the care team decides.',
        version: '0.1.0',
      },
    },
    transform: jsonSchemaTransform,
  });
  await app.register(swaggerUi, { routePrefix: '/api/docs', uiConfig: { deepLinking: false } });

  const api = app.withTypeProvider<ZodTypeProvider>();
  api.get('/api/health', { config: { public: true }, schema: { tags: ['system'] } }, async () => ({
    status: 'ok' as const,
    time: deps.clock.now().toISOString(),
  }));
  await app.register(foodRoutes, { prefix: '/api', db: deps.db });
  await app.register(patientRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(labRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(planRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(planFhirRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(balanceRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(planDraftRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(diaryRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(additivesRoutes, { prefix: '/api' });
  await app.register(settingsRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(handoutRoutes, { db: deps.db, clock: deps.clock });
  await app.register(glossaryRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(importRoutes, { prefix: '/api', db: deps.db, clock: deps.clock });
  await app.register(webRoutes);
  return app;
}
