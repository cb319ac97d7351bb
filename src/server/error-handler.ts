import type { FastifyError, FastifyInstance } from 'fastify';
import { hasZodFastifySchemaValidationErrors } from 'fastify-type-provider-zod';
import { AppError } from '../errors.js';

/** The stable JSON error shape: `{error: {code, message, details?}}`. */
export interface ErrorBody {
  error: { code: string; message: string; details?: unknown };
}

/** One error handler: validation and known errors pass through, everything else is a bare 500. */
export function registerErrorHandler(app: FastifyInstance): void {
  app.setErrorHandler((err: FastifyError, request, reply) => {
    if (hasZodFastifySchemaValidationErrors(err)) {
      const issues = err.validation.map((v) => ({
        path: `${err.validationContext ?? 'request'}${v.instancePath.replaceAll('/', '.') || ''}`,
        message: v.message ?? 'invalid',
      }));
      const body: ErrorBody = {
        error: {
          code: 'PHL_REQUEST_INVALID',
          message: issues.map((i) => `${i.path}: ${i.message}`).join('; '),
          details: issues,
        },
      };
      return reply.status(400).send(body);
    }
    if (err instanceof AppError) {
      const body: ErrorBody = { error: { code: err.code, message: err.message } };
      if (err.details !== undefined) body.error.details = err.details;
      return reply.status(err.statusCode).send(body);
    }
    const status = err.statusCode ?? 500;
    if (status >= 400 && status < 500) {
      // Fastify's own client errors (bad JSON, body too large, unsupported media type).
      const body: ErrorBody = {
        error: {
          code: err.code ? `PHL_HTTP_${err.code}` : 'PHL_HTTP_BAD_REQUEST',
          message: err.message,
        },
      };
      return reply.status(status).send(body);
    }
    request.log.error({ err: { type: err.name, code: err.code } }, 'unhandled error');
    const body: ErrorBody = { error: { code: 'PHL_INTERNAL', message: 'internal error' } };
    return reply.status(500).send(body);
  });
  app.setNotFoundHandler((request, reply) => {
    const body: ErrorBody = {
      error: {
        code: 'PHL_ROUTE_NOT_FOUND',
        message: `no route ${request.method} ${request.url.split('?')[0]}`,
      },
    };
    return reply.status(404).send(body);
  });
}
