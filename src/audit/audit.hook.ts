import type { FastifyInstance, FastifyRequest } from 'fastify';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { recordAudit } from './audit.service.js';
import type { AuditEntry } from './audit.js';

type Id = string | number | null | undefined;

/**
 * Route-level audit: `config: { audit: { action: 'plan.read', entity: 'plan' } }` records one
 * event per answered request with the signed-in user, the outcome and the patient concerned.
 */
export interface RouteAuditConfig {
  action: string;
  entity: string;
  /** Path parameter holding the entity id (default 'id'); false for none. */
  idParam?: string | false;
  /** Path parameter holding the patient id (default 'patientId', or idParam for 'patient'). */
  patientParam?: string;
  /** Finds the patient behind the entity when the path does not name it (plans, diaries). */
  patientOf?: (db: Db, request: FastifyRequest) => Id | Promise<Id>;
}

declare module 'fastify' {
  interface FastifyContextConfig {
    audit?: RouteAuditConfig;
  }
  interface FastifyRequest {
    /**
     * Records an audit event for the signed-in user now (for handlers that touch patient data
     * in ways a route-level `config.audit` cannot describe).
     */
    audit(
      action: string,
      opts: { patientId?: Id; entity: string; entityId?: Id; details?: AuditEntry['details'] },
    ): Promise<void>;
    /** Lets a handler fill in what the route-level audit cannot know (a created id). */
    auditInfo: { patientId?: Id; entityId?: Id; details?: AuditEntry['details'] } | null;
    /** True once the route's schemas accepted the request (its path ids may be logged). */
    auditParamsValid: boolean;
  }
}

/** What a logged id may look like: a number, or a short code (no free text, no markup). */
const LOGGABLE_ID = /^[A-Za-z0-9][A-Za-z0-9._:-]{0,63}$/;

/**
 * A path parameter, only once the route's schemas accepted the request and only when it looks
 * like an id: a refused request's raw path (`/api/patients/<anything>`) is never logged.
 */
function param(request: FastifyRequest, name: string | false | undefined): Id {
  if (!name || !request.auditParamsValid) return undefined;
  const params = request.params as Record<string, unknown> | undefined;
  const v = params?.[name];
  if (typeof v === 'number') return Number.isFinite(v) ? v : undefined;
  return typeof v === 'string' && LOGGABLE_ID.test(v) ? v : undefined;
}

export function registerAudit(app: FastifyInstance, deps: { db: Db; clock: Clock }): void {
  app.decorateRequest('auditInfo', null);
  app.decorateRequest('auditParamsValid', false);
  // preHandler runs only after the route's schemas accepted params, query and body.
  app.addHook('preHandler', async (request) => {
    request.auditParamsValid = true;
  });
  app.decorateRequest('audit', async function (this: FastifyRequest, action, opts) {
    await recordAudit(
      deps.db,
      {
        userId: this.user?.id ?? null,
        username: this.user?.username ?? null,
        action,
        entity: opts.entity,
        patientId: opts.patientId ?? null,
        entityId: opts.entityId ?? null,
        ...(opts.details ? { details: opts.details } : {}),
      },
      deps.clock,
    );
  });

  // onSend, not onResponse: the event is written before the data leaves, and a failed write
  // fails the request instead of leaving an unrecorded read.
  app.addHook('onSend', async (request, reply, payload) => {
    const cfg = request.routeOptions.config?.audit;
    if (!cfg || !request.user) return payload;
    const info = request.auditInfo ?? {};
    const idParam = cfg.idParam === undefined ? 'id' : cfg.idParam;
    const entityId = info.entityId ?? param(request, idParam);
    let patientId: Id = info.patientId ?? param(request, cfg.patientParam ?? 'patientId');
    if (patientId == null && cfg.entity === 'patient') patientId = entityId;
    const status = reply.statusCode;
    if (patientId == null && cfg.patientOf && status < 500 && request.auditParamsValid) {
      patientId = await cfg.patientOf(deps.db, request);
    }
    try {
      await recordAudit(
        deps.db,
        {
          userId: request.user.id,
          username: request.user.username,
          action: cfg.action,
          entity: cfg.entity,
          entityId: entityId ?? null,
          patientId: patientId ?? null,
          outcome: status < 400 ? 'ok' : status === 401 || status === 403 ? 'denied' : 'failed',
          statusCode: status,
          ...(info.details ? { details: info.details } : {}),
        },
        deps.clock,
      );
    } catch (err) {
      // Fail closed, and say so without driver text (Fastify answers errors thrown here itself,
      // bypassing the one error handler, with the raw message).
      const e = err as { name?: string; code?: string };
      request.log.error({ err: { type: e.name, code: e.code } }, 'audit write failed');
      (payload as { destroy?: () => void } | null)?.destroy?.();
      reply.code(500).header('content-type', 'application/json; charset=utf-8');
      reply.removeHeader('content-disposition');
      return JSON.stringify({
        error: {
          code: 'PHL_AUDIT_FAILED',
          message: 'the access could not be recorded in the audit log, so nothing was sent',
        },
      });
    }
    return payload;
  });
}
