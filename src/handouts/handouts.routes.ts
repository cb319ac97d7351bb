import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { FastifyPluginAsync, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { NotFoundError } from '../errors.js';
import { sendStaticAsset, staticAsset, type StaticAsset } from '../server/static-asset.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { loadCataloguesOrThrow, type Languages } from '../i18n/loader.js';
import { settingsSource } from '../plans/plan-settings-source.js';
import { PlanService } from '../plans/plans.service.js';
import { handoutQuerySchema, planIdParamsSchema } from './handout.js';
import { HANDOUT_ASSETS_PATH, HANDOUT_TEMPLATES_DIR } from './handout-html.js';
import { HandoutService, handoutSourcesFromDb } from './handouts.service.js';
import { FONT_FAMILIES, fontFile, type FontFamily, type FontWeight } from './pdf/fonts.js';

export interface HandoutRoutesOptions {
  db: Db;
  clock: Clock;
  /** Catalogue set to use; loaded (and validated) from templates/locales/ when not given. */
  languages?: Languages;
}

const STYLESHEETS = ['handout.css', 'paper-a4.css', 'paper-letter.css'] as const;

/**
 * The printed plan: `GET /api/plans/:id/handout.pdf` and the HTML print view
 * `GET /plans/:id/handout` (both need a signed-in user), plus the view's stylesheet and fonts
 * (public: no patient data in them). Catalogues are validated when this plugin registers, so a
 * broken file stops the start with its file and key named.
 */
export const handoutRoutes: FastifyPluginAsync<HandoutRoutesOptions> = async (app, opts) => {
  const languages = opts.languages ?? loadCataloguesOrThrow();
  const service = new HandoutService(
    handoutSourcesFromDb(opts.db, opts.clock, languages.list()),
    languages,
    opts.clock,
  );
  const plans = new PlanService(
    opts.db.kysely,
    opts.clock,
    new FoodRepository(opts.db.kysely),
    settingsSource(opts.db),
  );
  const patientOf = async (_db: Db, req: FastifyRequest) => {
    const id = Number((req.params as { id?: string }).id);
    if (!Number.isInteger(id) || id <= 0) return null;
    try {
      return (await plans.header(id)).patientId;
    } catch {
      return null;
    }
  };
  const audit = (action: string) => ({ action, entity: 'plan', patientOf });
  const api = app.withTypeProvider<ZodTypeProvider>();

  api.get(
    '/api/plans/:id/handout.pdf',
    {
      config: { patientData: true, audit: audit('plan.handout.pdf') },
      schema: {
        tags: ['handouts'],
        summary: "The plan's printed handout as a PDF, in the patient's language (or ?lang=)",
        description:
          "lang: a catalogue language (en, es, pt, fr, vi, zh-Hans, tl, ar, hi, ru, or any a clinic added); default the patient's language. paper: a4 (default) or letter. A language missing strings answers 422 PHL_HANDOUT_LANGUAGE_INCOMPLETE listing them; the header x-phosledger-translation-status says whether the translation was reviewed.",
        params: planIdParamsSchema,
        querystring: handoutQuerySchema,
      },
    },
    async (req, reply) => {
      const pdf = await service.pdf(req.params.id, {
        lang: req.query.lang,
        version: req.query.version,
        paper: req.query.paper,
      });
      return reply
        .header('content-type', 'application/pdf')
        .header('content-disposition', `inline; filename="${pdf.filename}"`)
        .header('cache-control', 'no-store')
        .header('content-language', pdf.language)
        .header('x-phosledger-translation-status', pdf.status.review.status)
        .send(pdf.bytes);
    },
  );

  api.get(
    '/plans/:id/handout',
    {
      config: { patientData: true, webPage: true, audit: audit('plan.handout.view') },
      schema: {
        tags: ['handouts'],
        summary: "The plan's handout as an HTML print view, with the clinic's translation panel",
        params: planIdParamsSchema,
        querystring: handoutQuerySchema,
      },
    },
    async (req, reply) => {
      const view = await service.html(req.params.id, {
        lang: req.query.lang,
        version: req.query.version,
        paper: req.query.paper,
      });
      return (
        reply
          .header('content-type', 'text/html; charset=utf-8')
          .header('cache-control', 'no-store')
          .header('content-language', view.language)
          .header('x-phosledger-translation-status', view.status.review.status)
          // Clinic fields to fill in before this plan's PDF can be printed (none: empty).
          .header('x-phosledger-clinic-missing', view.clinicMissing.join(','))
          .send(view.html)
      );
    },
  );

  api.get(
    '/api/handouts/languages',
    {
      schema: {
        tags: ['handouts'],
        summary: 'Handout languages with their review status and any missing strings',
      },
    },
    async () => service.languageStatuses(),
  );

  const css = new Map(
    STYLESHEETS.map((f) => [
      f,
      staticAsset(readFileSync(join(HANDOUT_TEMPLATES_DIR, f)), 'text/css; charset=utf-8'),
    ]),
  );
  api.get(
    `${HANDOUT_ASSETS_PATH}/:file`,
    {
      config: { public: true },
      schema: { hide: true, params: z.object({ file: z.string() }) },
    },
    async (req, reply) => {
      const sheet = css.get(req.params.file as (typeof STYLESHEETS)[number]);
      if (sheet === undefined) throw new NotFoundError('handout asset', req.params.file);
      return sendStaticAsset(req, reply, sheet, 'public, max-age=3600');
    },
  );
  // Fonts are read once, on first use (the Chinese one is several MB), then served from memory.
  const fonts = new Map<string, StaticAsset>();
  api.get(
    `${HANDOUT_ASSETS_PATH}/fonts/:file`,
    {
      config: { public: true },
      schema: { hide: true, params: z.object({ file: z.string() }) },
    },
    async (req, reply) => {
      const m = /^([a-z]+)-(regular|bold)\.ttf$/.exec(req.params.file);
      if (!m || !(FONT_FAMILIES as readonly string[]).includes(m[1] as string)) {
        throw new NotFoundError('handout font', req.params.file);
      }
      let font = fonts.get(req.params.file);
      if (!font) {
        font = staticAsset(
          readFileSync(fontFile(m[1] as FontFamily, m[2] as FontWeight)),
          'font/ttf',
        );
        fonts.set(req.params.file, font);
      }
      return sendStaticAsset(req, reply, font, 'public, max-age=86400');
    },
  );
};
