import type { FastifyPluginAsync, FastifyReply } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { recordAudit } from '../audit/audit.service.js';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { usernameSchema } from './auth.js';
import { setSessionCookie } from './auth.plugin.js';
import type { AuthService } from './auth.service.js';
import { PUBLIC_AUTH_BODY_LIMIT_BYTES } from '../server/body-limits.js';
import { MAX_PASSWORD_LENGTH, passwordProblem } from './password.js';

function escapeHtml(s: string): string {
  return s.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );
}

/**
 * The set-up screens share the consult screens' stylesheet and frame (top bar, card, footer)
 * and work without script: a plain form post.
 */
function page(title: string, body: string): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)} · phosledger</title>
<link rel="icon" href="data:,">
<link rel="stylesheet" href="/assets/app.css">
</head>
<body>
<a class="skip" href="#main">Skip to content</a>
<header class="topbar">
  <a class="wordmark" href="/"><span class="wordmark-p" aria-hidden="true">P</span>phosledger</a>
</header>
<main id="main" tabindex="-1">
<section class="signin card" aria-labelledby="setup-h">
<h1 id="setup-h">${escapeHtml(title)}</h1>
${body}
</section>
</main>
<footer class="foot"><p>phosledger estimates; it does not prescribe. Every figure is for the care team to check against local guidance.</p></footer>
</body>
</html>
`;
}

function formPage(token: string, message: string | null, username = ''): string {
  return page(
    'Create the clinic admin account',
    `<p class="muted">This link works once. The admin account manages dietitian accounts, the clinic settings and reads the audit log.</p>
<form id="setup-form" method="post" action="/setup">
<input type="hidden" name="token" value="${escapeHtml(token)}">
<div class="field">
  <label for="setup-username">Username</label>
  <input id="setup-username" name="username" autocomplete="username" required value="${escapeHtml(username)}">
</div>
<div class="field">
  <label for="setup-password">Password (at least 12 characters; a few unrelated words work well)</label>
  <input id="setup-password" type="password" name="password" autocomplete="new-password" required>
</div>
<div class="field">
  <label for="setup-password2">Password again</label>
  <input id="setup-password2" type="password" name="password2" autocomplete="new-password" required>
</div>
<button class="btn btn-primary" type="submit">Create admin</button>
<div class="status${message ? ' error' : ''}" id="setup-status" role="status" aria-live="polite">${message ? escapeHtml(message) : ''}</div>
</form>`,
  );
}

/**
 * The set-up pages send their origin with the form post (`same-origin` referrer policy): under
 * the site-wide `no-referrer` a browser posts with `Origin: null`, which the cross-site check
 * must refuse. The page links nowhere else, so nothing leaves with it.
 */
const html = (reply: FastifyReply, status: number, body: string) =>
  reply
    .status(status)
    .header('referrer-policy', 'same-origin')
    .type('text/html; charset=utf-8')
    .send(body);

/**
 * First-run set-up: while no admin exists, the server prints a one-time link
 * (`/setup?token=...`) on its console; opening it shows a form that creates the admin.
 */
export const setupRoutes: FastifyPluginAsync<{ db: Db; clock: Clock; auth: AuthService }> = async (
  app,
  { db, clock, auth },
) => {
  app.addContentTypeParser(
    'application/x-www-form-urlencoded',
    { parseAs: 'string', bodyLimit: PUBLIC_AUTH_BODY_LIMIT_BYTES },
    (_req, body, done) => {
      done(null, Object.fromEntries(new URLSearchParams(body as string)));
    },
  );
  const api = app.withTypeProvider<ZodTypeProvider>();
  const tokenSchema = z.string().min(1).max(200);

  api.get(
    '/setup',
    {
      config: { public: true },
      schema: { hide: true, querystring: z.object({ token: tokenSchema.optional() }) },
    },
    async (req, reply) => {
      if (!(await auth.setupNeeded())) {
        return html(reply, 409, page('Set-up is done', '<p><a href="/">Sign in</a>.</p>'));
      }
      const token = req.query.token ?? '';
      if (!(await auth.setupTokenValid(token))) {
        return html(
          reply,
          403,
          page(
            'This set-up link is not valid',
            '<p>It has been used or has expired. Restart the server to print a new link, or run <code>phosledger users add NAME --role admin</code> on the server.</p>',
          ),
        );
      }
      return html(reply, 200, formPage(token, null));
    },
  );

  const formSchema = z.object({
    token: tokenSchema,
    username: z.string().max(200),
    password: z.string().max(MAX_PASSWORD_LENGTH * 4),
    password2: z.string().max(MAX_PASSWORD_LENGTH * 4),
  });

  api.post(
    '/setup',
    {
      bodyLimit: PUBLIC_AUTH_BODY_LIMIT_BYTES,
      config: { public: true },
      schema: { hide: true, body: formSchema },
    },
    async (req, reply) => {
      const { token, username, password, password2 } = req.body;
      if (!(await auth.setupNeeded())) {
        return html(reply, 409, page('Set-up is done', '<p><a href="/">Sign in</a>.</p>'));
      }
      if (!(await auth.setupTokenValid(token))) {
        return html(
          reply,
          403,
          page('This set-up link is not valid', '<p>Restart the server for a new one.</p>'),
        );
      }
      const name = usernameSchema.safeParse(username);
      const problem = !name.success
        ? `username: ${name.error.issues[0]?.message ?? 'invalid'}`
        : password !== password2
          ? 'the two passwords differ'
          : passwordProblem(password, name.data);
      if (problem) return html(reply, 400, formPage(token, problem, username));
      // Another post with the same link may have won the race: say so on the page.
      const result = await auth.trySetup(token, username, password);
      if (!result.ok) {
        const { statusCode, message } = result.error;
        return statusCode === 400
          ? html(reply, 400, formPage(token, message, username))
          : html(reply, statusCode, page('Set-up was not done', `<p>${escapeHtml(message)}.</p>`));
      }
      const { signedIn } = result;
      setSessionCookie(req, reply, auth.policy, signedIn.token);
      await recordAudit(
        db,
        {
          userId: signedIn.user.id,
          action: 'setup.admin-created',
          entity: 'user',
          entityId: signedIn.user.id,
        },
        clock,
      );
      return html(
        reply,
        201,
        page(
          'Admin account created',
          `<p>You are signed in as ${escapeHtml(signedIn.user.username)}. <a class="btn btn-primary" href="/patients">Open phosledger</a></p>`,
        ),
      );
    },
  );

  api.get(
    '/api/setup',
    {
      config: { public: true },
      schema: { tags: ['accounts'], summary: 'Whether the first admin still has to be created' },
    },
    async () => ({ setupNeeded: await auth.setupNeeded() }),
  );

  api.post(
    '/api/setup',
    {
      bodyLimit: PUBLIC_AUTH_BODY_LIMIT_BYTES,
      config: { public: true },
      schema: {
        tags: ['accounts'],
        summary: 'Create the first admin with the one-time set-up token printed at start',
        body: z.object({
          token: tokenSchema,
          username: z.string().min(1).max(64),
          password: z.string().min(1).max(MAX_PASSWORD_LENGTH),
        }),
      },
    },
    async (req, reply) => {
      const signedIn = await auth.completeSetup(
        req.body.token,
        req.body.username,
        req.body.password,
      );
      setSessionCookie(req, reply, auth.policy, signedIn.token);
      await recordAudit(
        db,
        {
          userId: signedIn.user.id,
          action: 'setup.admin-created',
          entity: 'user',
          entityId: signedIn.user.id,
        },
        clock,
      );
      return reply.status(201).send({
        user: signedIn.user,
        csrfToken: signedIn.session.csrfToken,
        idleExpiresAt: signedIn.session.idleExpiresAt,
        absoluteExpiresAt: signedIn.session.absoluteExpiresAt,
      });
    },
  );
};
