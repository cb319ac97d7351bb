import type { FastifyInstance, FastifyPluginAsync } from 'fastify';
import { sendStaticAsset } from '../server/static-asset.js';
import { loadAssets } from './assets.js';
import { compilePages, PAGES } from './pages.js';

/**
 * Serves the consult screens and their assets. Assets and the sign-in screen are public; every
 * screen that can show patient data goes through the sign-in hook like any API route. A page
 * request refused for want of a session is sent to the sign-in screen instead of a JSON 401.
 */
export const webRoutes: FastifyPluginAsync = async (app) => {
  const [assets, render] = await Promise.all([loadAssets(), Promise.resolve(compilePages())]);

  app.get<{ Params: { '*': string } }>(
    '/assets/*',
    { config: { public: true }, schema: { hide: true } },
    async (req, reply) => {
      const found = assets.get(`/assets/${req.params['*']}`);
      if (!found) {
        return reply.status(404).send({
          error: { code: 'PHL_WEB_ASSET_NOT_FOUND', message: `no asset ${req.params['*']}` },
        });
      }
      return sendStaticAsset(req, reply, found, 'no-cache');
    },
  );

  app.get('/', { config: { public: true }, schema: { hide: true } }, async (_req, reply) =>
    reply.redirect('/patients', 303),
  );

  for (const page of PAGES) {
    app.get<{ Params: Record<string, string> }>(
      page.url,
      { config: { public: page.public === true, webPage: true }, schema: { hide: true } },
      async (req, reply) => {
        reply.header('cache-control', 'no-store');
        return reply.type('text/html; charset=utf-8').send(render(page, req.params));
      },
    );
  }
};

/**
 * On the root instance, so it covers every HTML screen whichever plugin serves it (the handout
 * print view too): a screen refused with 401 becomes a redirect to sign-in that comes back here.
 */
export function redirectScreensToSignIn(app: FastifyInstance): void {
  app.addHook('onSend', async (req, reply, payload) => {
    if (reply.statusCode !== 401 || req.routeOptions.config?.webPage !== true) return payload;
    reply.status(303);
    reply.header('location', `/signin?next=${encodeURIComponent(req.url)}`);
    reply.header('content-type', 'text/plain; charset=utf-8');
    return 'sign in first';
  });
}

declare module 'fastify' {
  interface FastifyContextConfig {
    /** A consult screen (HTML): a 401 becomes a redirect to the sign-in screen. */
    webPage?: boolean;
  }
}
