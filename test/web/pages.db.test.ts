// Sources: none needed for numbers (checks structure: labels, public routes, no external URLs);
// page data is invented demo data.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PAGE_MODULES } from '../../src/web/assets.js';
import { PAGES } from '../../src/web/pages.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

/** A page URL with its parameters filled in (ids need not exist: the shell loads its data). */
const concrete = (url: string) => url.replace(':id', '1');
const protectedPages = PAGES.filter((p) => !p.public).map((p) => concrete(p.url));

describe('consult screens over HTTP', () => {
  let ctx: TestContext;
  beforeAll(async () => {
    ctx = await createTestContext();
  });
  afterAll(async () => {
    await ctx.close();
  });

  it('sends an anonymous visitor of every patient screen to sign-in, and back afterwards', async () => {
    expect(protectedPages).toContain('/plans/1');
    for (const url of protectedPages) {
      const res = await ctx.app.inject({ url });
      expect(res.statusCode, url).toBe(303);
      expect(res.headers.location).toBe(`/signin?next=${encodeURIComponent(url)}`);
      expect(res.body).not.toContain('<main');
    }
  });

  it('sends an anonymous visitor of a handout print view to sign-in, with its language kept', async () => {
    // The handout view is served by the handouts routes, not the screen list above.
    const url = '/plans/1/handout?lang=es';
    const res = await ctx.app.inject({ url });
    expect(res.statusCode).toBe(303);
    expect(res.headers.location).toBe(`/signin?next=${encodeURIComponent(url)}`);
    // The API stays JSON: scripts get a 401 they can act on.
    const api = await ctx.app.inject({ url: '/api/plans/1/handout.pdf' });
    expect(api.statusCode).toBe(401);
    expect(api.json().error.code).toBe('PHL_AUTH_REQUIRED');
  });

  it('serves the sign-in screen and the assets without a session', async () => {
    const signin = await ctx.app.inject({ url: '/signin' });
    expect(signin.statusCode).toBe(200);
    expect(signin.body).toContain('<label for="signin-username">Username</label>');
    for (const name of ['app.css', ...PAGE_MODULES.map((m) => `${m}.js`)]) {
      const res = await ctx.app.inject({ url: `/assets/${name}` });
      expect(res.statusCode, name).toBe(200);
      expect(res.body.length).toBeGreaterThan(100);
    }
    const missing = await ctx.app.inject({ url: '/assets/nothing.js' });
    expect(missing.statusCode).toBe(404);
    expect(missing.json().error.code).toBe('PHL_WEB_ASSET_NOT_FOUND');
  });

  it('answers an unchanged asset with 304 to its ETag', async () => {
    const first = await ctx.app.inject({ url: '/assets/builder.js' });
    const etag = String(first.headers.etag);
    const again = await ctx.app.inject({
      url: '/assets/builder.js',
      headers: { 'if-none-match': etag },
    });
    expect(again.statusCode).toBe(304);
  });

  it('serves the handout fonts and stylesheet with an ETag and answers 304 when unchanged', async () => {
    for (const url of [
      '/handouts/assets/fonts/arabic-regular.ttf',
      '/handouts/assets/handout.css',
    ]) {
      const first = await ctx.app.inject({ url });
      expect(first.statusCode, url).toBe(200);
      expect(first.headers.etag, url).toMatch(/^"[\w-]{22}"$/);
      expect(first.headers['cache-control'], url).toMatch(/^public, max-age=\d+$/);
      const again = await ctx.app.inject({
        url,
        headers: { 'if-none-match': String(first.headers.etag) },
      });
      expect(again.statusCode, url).toBe(304);
      expect(again.body).toBe('');
    }
  });

  it('renders every screen for a signed-in user with its own module and no inline code', async () => {
    for (const page of PAGES) {
      const res = await ctx.inject({ url: concrete(page.url) });
      expect(res.statusCode, page.url).toBe(200);
      expect(res.headers['content-type']).toContain('text/html');
      expect(res.body).toContain(`<script type="module" src="/assets/${page.module}.js"></script>`);
      // The Content-Security-Policy allows no inline script or style: none may be written.
      expect(res.body.match(/<script(?![^>]*\bsrc=)[^>]*>/g), page.url).toBeNull();
      expect(res.body, page.url).not.toMatch(/\sstyle="/);
      expect(res.body, page.url).not.toMatch(/<style/);
    }
  });

  it('labels every form control on every screen', async () => {
    for (const page of PAGES) {
      const html = (await ctx.inject({ url: concrete(page.url) })).body;
      const controls = [...html.matchAll(/<(input|select|textarea)\b([^>]*)>/g)];
      for (const [tag, , attrs = ''] of controls) {
        if (/type="(hidden|submit|button)"/.test(attrs)) continue;
        const id = /\bid="([^"]+)"/.exec(attrs)?.[1];
        const labelled =
          /\baria-label="/.test(attrs) ||
          /\baria-labelledby="/.test(attrs) ||
          (id !== undefined && html.includes(`for="${id}"`));
        expect(labelled, `${page.url}: ${tag}`).toBe(true);
      }
    }
  });

  it('refers to nothing outside the server in pages, scripts or styles', async () => {
    const bodies = [
      ...(await Promise.all(PAGES.map((p) => ctx.inject({ url: concrete(p.url) })))).map(
        (r) => r.body,
      ),
      ...(
        await Promise.all(
          ['app.css', ...PAGE_MODULES.map((m) => `${m}.js`)].map((n) =>
            ctx.app.inject({ url: `/assets/${n}` }),
          ),
        )
      ).map((r) => r.body),
    ];
    // XML namespace names (the chart library's table for createElementNS) name, never fetch
    const NAMESPACE_NAMES =
      /http:\/\/www\.w3\.org\/(1999\/xhtml|2000\/svg|1999\/xlink|XML\/1998\/namespace|2000\/xmlns\/)/g;
    for (const body of bodies) {
      expect(body.replace(NAMESPACE_NAMES, '')).not.toMatch(/https?:\/\//);
      expect(body).not.toMatch(/@import|url\(\s*['"]?\/\//);
    }
  });
});
