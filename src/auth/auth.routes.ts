import type { FastifyPluginAsync } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { recordAudit } from '../audit/audit.service.js';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError } from '../errors.js';
import { roleSchema, signInBodySchema, userJsonSchema } from './auth.js';
import { clearSessionCookie, setSessionCookie } from './auth.plugin.js';
import type { AuthService, SignedIn } from './auth.service.js';
import { PUBLIC_AUTH_BODY_LIMIT_BYTES } from '../server/body-limits.js';
import { MAX_PASSWORD_LENGTH } from './password.js';

const sessionJsonSchema = z.object({
  user: userJsonSchema,
  csrfToken: z.string(),
  idleExpiresAt: z.string(),
  absoluteExpiresAt: z.string(),
});

function sessionJson(s: Pick<SignedIn, 'user' | 'session'>) {
  return {
    user: s.user,
    csrfToken: s.session.csrfToken,
    idleExpiresAt: s.session.idleExpiresAt,
    absoluteExpiresAt: s.session.absoluteExpiresAt,
  };
}

const passwordSchema = z.string().min(1).max(MAX_PASSWORD_LENGTH);

/** Sign-in, sign-out, the current session, password change and user administration. */
export const authRoutes: FastifyPluginAsync<{ db: Db; clock: Clock; auth: AuthService }> = async (
  app,
  { db, clock, auth },
) => {
  const api = app.withTypeProvider<ZodTypeProvider>();
  const audit = (entry: Parameters<typeof recordAudit>[1]) => recordAudit(db, entry, clock);

  app.addHook('onError', async (_request, reply, err) => {
    if (err instanceof AppError && err.code === 'PHL_AUTH_LOCKED') {
      const d = err.details as { retryAfterS?: number } | undefined;
      reply.header('retry-after', String(d?.retryAfterS ?? 60));
    }
  });

  api.post(
    '/session',
    {
      bodyLimit: PUBLIC_AUTH_BODY_LIMIT_BYTES,
      config: { public: true },
      schema: {
        tags: ['accounts'],
        summary: 'Sign in: sets the session cookie and returns the CSRF token',
        body: signInBodySchema,
        response: { 200: sessionJsonSchema },
      },
    },
    async (req, reply) => {
      let signedIn: SignedIn;
      try {
        signedIn = await auth.signIn(req.body.username, req.body.password, req.ip);
      } catch (err) {
        // The failure is recorded, then answered by the one error handler.
        const code = err instanceof AppError ? err.code : 'PHL_INTERNAL';
        await audit({
          userId: null,
          username: null,
          action: 'session.sign-in',
          entity: 'session',
          outcome: 'denied',
          details: { reason: code },
        });
        throw err;
      }
      if (req.authSession) await auth.signOut(req.authSession); // no session fixation
      setSessionCookie(req, reply, auth.policy, signedIn.token);
      await audit({
        userId: signedIn.user.id,
        username: signedIn.user.username,
        action: 'session.sign-in',
        entity: 'session',
      });
      return sessionJson(signedIn);
    },
  );

  api.get(
    '/session',
    {
      schema: {
        tags: ['accounts'],
        summary: 'The signed-in user and the CSRF token for state-changing requests',
        response: { 200: sessionJsonSchema },
      },
    },
    async (req) => sessionJson({ user: req.user!, session: req.authSession! }),
  );

  api.delete(
    '/session',
    { schema: { tags: ['accounts'], summary: 'Sign out (this browser)' } },
    async (req, reply) => {
      await auth.signOut(req.authSession!);
      clearSessionCookie(req, reply, auth.policy);
      await audit({ userId: req.user!.id, action: 'session.sign-out', entity: 'session' });
      return { signedOut: 1 };
    },
  );

  api.delete(
    '/sessions',
    { schema: { tags: ['accounts'], summary: 'Sign out everywhere (every session of this user)' } },
    async (req, reply) => {
      const n = await auth.signOutEverywhere(req.user!.id);
      clearSessionCookie(req, reply, auth.policy);
      await audit({
        userId: req.user!.id,
        action: 'session.sign-out-everywhere',
        entity: 'session',
        details: { sessions: n },
      });
      return { signedOut: n };
    },
  );

  api.put(
    '/session/password',
    {
      bodyLimit: PUBLIC_AUTH_BODY_LIMIT_BYTES,
      schema: {
        tags: ['accounts'],
        summary: 'Change your own password; signs out every other session',
        body: z.object({ currentPassword: passwordSchema, newPassword: passwordSchema }),
      },
    },
    async (req, reply) => {
      const user = req.user!;
      try {
        await auth.checkCurrentPassword(user, req.body.currentPassword, req.authSession!);
      } catch (err) {
        // Recorded like a failed sign-in; a session ended for guessing loses its cookie.
        const code = err instanceof AppError ? err.code : 'PHL_INTERNAL';
        if (code === 'PHL_AUTH_SESSION_ENDED') clearSessionCookie(req, reply, auth.policy);
        await audit({
          userId: user.id,
          action: 'user.password-change',
          entity: 'user',
          entityId: user.id,
          outcome: 'denied',
          details: { reason: code },
        });
        throw err;
      }
      await auth.setPassword(user.id, req.body.newPassword);
      await auth.signOutEverywhere(user.id);
      const fresh = await auth.openSession(user);
      setSessionCookie(req, reply, auth.policy, fresh.token);
      await audit({
        userId: user.id,
        action: 'user.password-change',
        entity: 'user',
        entityId: user.id,
      });
      return sessionJson(fresh);
    },
  );

  api.get(
    '/admin/docs-access',
    {
      config: { role: 'admin' },
      schema: { tags: ['accounts'], summary: 'Whether /api/docs answers without sign-in' },
    },
    async () => ({ public: await auth.docsPublic() }),
  );

  api.put(
    '/admin/docs-access',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['accounts'],
        summary: 'Let /api/docs (the OpenAPI description) answer without sign-in, or not',
        body: z.object({ public: z.boolean() }),
      },
    },
    async (req) => {
      await auth.setDocsPublic(req.body.public);
      await audit({
        userId: req.user!.id,
        action: 'security.docs-access',
        entity: 'setting',
        details: { public: req.body.public },
      });
      return { public: req.body.public };
    },
  );

  // user administration (admin role)
  const adminUserJson = userJsonSchema.extend({
    disabled: z.boolean(),
    createdAt: z.string(),
    lastSignInAt: z.string().nullable(),
  });

  api.get(
    '/admin/users',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['accounts'],
        summary: 'List accounts',
        response: { 200: z.array(adminUserJson) },
      },
    },
    async () => auth.listUsers(),
  );

  api.post(
    '/admin/users',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['accounts'],
        summary: 'Create an account',
        body: z.object({
          username: z.string().min(1).max(64),
          role: roleSchema,
          password: passwordSchema,
        }),
      },
    },
    async (req, reply) => {
      const user = await auth.createUser(req.body.username, req.body.role, req.body.password);
      await audit({
        userId: req.user!.id,
        action: 'user.create',
        entity: 'user',
        entityId: user.id,
        details: { role: user.role },
      });
      return reply.status(201).send(user);
    },
  );

  api.patch(
    '/admin/users/:id',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['accounts'],
        summary: 'Change role, disable or enable an account (disabling signs it out)',
        params: z.object({ id: z.coerce.number().int().positive() }),
        body: z
          .object({ role: roleSchema.optional(), disabled: z.boolean().optional() })
          .refine((b) => b.role !== undefined || b.disabled !== undefined, {
            message: 'give role or disabled',
          }),
      },
    },
    async (req) => {
      const patch = {
        ...(req.body.role !== undefined ? { role: req.body.role } : {}),
        ...(req.body.disabled !== undefined ? { disabled: req.body.disabled } : {}),
      };
      await auth.updateUser(req.params.id, patch);
      await audit({
        userId: req.user!.id,
        action: 'user.update',
        entity: 'user',
        entityId: req.params.id,
        details: patch,
      });
      const users = await auth.listUsers();
      return users.find((u) => u.id === req.params.id)!;
    },
  );

  api.post(
    '/admin/users/:id/password',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['accounts'],
        summary: "Set a user's password (signs them out everywhere)",
        params: z.object({ id: z.coerce.number().int().positive() }),
        body: z.object({ password: passwordSchema }),
      },
    },
    async (req) => {
      await auth.setPassword(req.params.id, req.body.password);
      const n = await auth.signOutEverywhere(req.params.id);
      await audit({
        userId: req.user!.id,
        action: 'user.password-reset',
        entity: 'user',
        entityId: req.params.id,
      });
      return { signedOut: n };
    },
  );

  api.delete(
    '/admin/users/:id/sessions',
    {
      config: { role: 'admin' },
      schema: {
        tags: ['accounts'],
        summary: 'Sign a user out everywhere',
        params: z.object({ id: z.coerce.number().int().positive() }),
      },
    },
    async (req) => {
      const n = await auth.signOutEverywhere(req.params.id);
      await audit({
        userId: req.user!.id,
        action: 'user.sign-out-everywhere',
        entity: 'user',
        entityId: req.params.id,
        details: { sessions: n },
      });
      return { signedOut: n };
    },
  );
};
