import { execFileSync } from 'node:child_process';
import { SettingsService } from '../../src/settings/settings.service.js';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { formatNumber } from '../../src/i18n/format.js';
import { runCli } from '../../src/cli/main.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';
import { hasPoppler, POPPLER_MISSING } from './poppler.js';

const t = (name: string) => `${name} (${hasSr28 ? 'USDA SR28 foods' : SR28_MISSING})`;

// USDA SR28 NDB numbers: 01123 egg, whole, raw; 18069 bread, white; 05064 chicken breast,
// roasted; 20045 rice, white, cooked. Patient and plan are invented demo data.
const NDB = ['01123', '18069', '05064', '20045'] as const;

const patientBody = {
  label: 'HANDOUT-01 (invented)',
  language: 'es-MX',
  weightKg: 70,
  ckdStage: '5',
  dialysis: 'hemodialysis',
  diabetes: false,
  binder: {
    ingredient: 'calcium-acetate',
    unitStrengthMg: 667,
    schedule: 'per-day',
    units: 6,
    otherMedicines: [],
  },
};

function planBody(f: Food[]) {
  const [egg, bread, chicken, rice] = f as [Food, Food, Food, Food];
  const large = egg.portions.find((p) => p.description === 'large');
  return {
    name: 'Handout test plan',
    days: [
      {
        label: 'Lunes',
        occasions: [
          {
            name: 'Breakfast',
            time: '08:00',
            items: [
              { foodId: egg.id, measure: { portionId: large!.id, count: 2 }, label: 'huevos' },
              { foodId: bread.id, grams: 50, label: 'pan blanco' },
            ],
          },
          {
            name: 'Lunch',
            time: '13:00',
            items: [
              { foodId: chicken.id, grams: 120, label: 'pollo asado' },
              { foodId: rice.id, grams: 150, label: 'arroz' },
            ],
          },
        ],
      },
    ],
  };
}

describe('handout routes and CLI', () => {
  let ctx: TestContext;
  let planId: number;
  let foods: Food[];
  beforeEach(async () => {
    ctx = await createTestContext();
    if (!hasSr28) return;
    foods = insertFoods(ctx.db, sr28Foods(...NDB));
    const p = await ctx.inject({ method: 'POST', url: '/api/patients', payload: patientBody });
    expect(p.statusCode).toBe(201);
    const plan = await ctx.inject({
      method: 'POST',
      url: `/api/patients/${p.json().id}/plans`,
      payload: planBody(foods),
    });
    expect(plan.statusCode).toBe(201);
    planId = plan.json().id;
    // clinic details are changed by an admin
    const admin = await ctx.signIn('admin');
    const clinic = await admin.inject({
      method: 'PUT',
      url: '/api/settings/clinic',
      payload: { name: 'Demo Renal Unit', contact: '555-0100', dietitianName: 'R. Demo' },
    });
    expect(clinic.statusCode).toBe(200);
  });
  afterEach(async () => ctx.close());

  it.skipIf(!hasSr28 || !hasPoppler)(
    t(
      `GET /api/plans/:id/handout.pdf gives a PDF in the patient's language with the summary's numbers${hasPoppler ? '' : ` (${POPPLER_MISSING})`}`,
    ),
    async () => {
      const res = await ctx.inject({
        method: 'GET',
        url: `/api/plans/${planId}/handout.pdf?paper=letter`,
      });
      expect(res.statusCode).toBe(200);
      expect(res.headers['content-type']).toBe('application/pdf');
      expect(res.headers['content-language']).toBe('es'); // es-MX resolves to the es catalogue
      expect(res.headers['x-phosledger-translation-status']).toBe('drafted');
      expect(res.headers['cache-control']).toBe('no-store');
      const dir = mkdtempSync(join(tmpdir(), 'phl-handout-'));
      try {
        const file = join(dir, 'h.pdf');
        writeFileSync(file, res.rawPayload);
        const text = execFileSync('pdftotext', [file, '-'], { encoding: 'utf8' }).replace(
          /\s+/g,
          ' ',
        );
        const summary = (
          await ctx.inject({ method: 'GET', url: `/api/plans/${planId}/summary` })
        ).json();
        const day = summary.days[0];
        // The same numbers as the summary, rounded to whole mg and formatted for es.
        const mg = (n: number) => formatNumber('es', Math.round(n));
        expect(text).toContain(`Fósforo en los alimentos: ${mg(day.nutrients.phosphorusMg)} mg`);
        expect(text).toContain(`unos ${mg(day.nutrients.absorbablePhosphorusMg.typical)} mg`);
        for (const occ of day.occasions) {
          expect(text).toContain(`${mg(occ.nutrients.absorbablePhosphorusMg.typical)} mg`);
        }
        expect(text).toContain('huevos');
        expect(text).toContain('pollo asado');
        expect(text).toContain('Demo Renal Unit');
        expect(text).toContain('acetato de calcio');
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    },
  );

  it.skipIf(!hasSr28)(
    t('GET /plans/:id/handout is the HTML print view with the clinic panel'),
    async () => {
      const res = await ctx.inject({ method: 'GET', url: `/plans/${planId}/handout?lang=ar` });
      expect(res.statusCode).toBe(200);
      expect(res.headers['content-type']).toMatch(/^text\/html/);
      expect(res.body).toContain('<html lang="ar" dir="rtl">');
      expect(res.body).toContain('drafted, not reviewed by a qualified medical translator');
      expect(res.body).toContain('/handouts/assets/handout.css');
      const css = await ctx.app.inject({ method: 'GET', url: '/handouts/assets/handout.css' });
      expect(css.statusCode).toBe(200);
      expect(css.headers['content-type']).toMatch(/^text\/css/);
    },
  );

  it.skipIf(!hasSr28)(t('bad requests answer with clear errors'), async () => {
    const unknown = await ctx.inject({
      method: 'GET',
      url: `/api/plans/${planId}/handout.pdf?lang=xx`,
    });
    expect(unknown.statusCode).toBe(400);
    expect(unknown.json().error.code).toBe('PHL_HANDOUT_LANGUAGE_UNKNOWN');
    expect(unknown.json().error.message).toContain('available: ar, en, es');
    const paper = await ctx.inject({
      method: 'GET',
      url: `/api/plans/${planId}/handout.pdf?paper=a3`,
    });
    expect(paper.statusCode).toBe(400);
    expect(paper.json().error.message).toContain('paper');
    const missing = await ctx.inject({ method: 'GET', url: '/api/plans/999/handout.pdf' });
    expect(missing.statusCode).toBe(404);
  });

  it.skipIf(!hasSr28)(
    t('shows an earlier saved version when asked, the latest otherwise'),
    async () => {
      // Version 2 adds a dinner of 80 g more chicken (labelled "cena de pollo"); version 1 has none.
      const body = planBody(foods);
      const day = body.days[0]!;
      const chicken = day.occasions[1]!.items[0]!.foodId;
      const dinner = {
        name: 'Dinner',
        time: '20:00',
        items: [{ foodId: chicken, grams: 80, label: 'cena de pollo' }],
      };
      const put = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${planId}`,
        payload: { ...body, days: [{ ...day, occasions: [...day.occasions, dinner] }] },
      });
      expect(put.statusCode, put.body).toBe(200);
      const view = (q: string) =>
        ctx.inject({ method: 'GET', url: `/plans/${planId}/handout?lang=es${q}` });
      const latest = await view('');
      const first = await view('&version=1');
      expect(latest.statusCode).toBe(200);
      expect(first.statusCode).toBe(200);
      expect(latest.body).toContain('cena de pollo');
      expect(first.body).not.toContain('cena de pollo');
      expect(first.body).toContain('pollo asado');
      // The clinic panel's PDF links keep the version (attribute text as Handlebars escapes it).
      const links = first.body.replaceAll('&amp;', '&').replaceAll('&#x3D;', '=');
      expect(links).toContain(`/api/plans/${planId}/handout.pdf?lang=es&paper=a4&version=1`);
      const pdf = await ctx.inject({
        method: 'GET',
        url: `/api/plans/${planId}/handout.pdf?version=1`,
      });
      expect(pdf.statusCode).toBe(200);
      expect(pdf.headers['content-disposition']).toContain(`plan-${planId}-v1-es-a4.pdf`);
      const missing = await view('&version=9');
      expect(missing.statusCode).toBe(404);
      const bad = await view('&version=zero');
      expect(bad.statusCode).toBe(400);
    },
  );

  it('answers 401 without a session (the HTML view sends a browser to sign-in)', async () => {
    const pdf = await ctx.app.inject({ method: 'GET', url: '/api/plans/1/handout.pdf' });
    expect(pdf.statusCode).toBe(401);
    const html = await ctx.app.inject({ method: 'GET', url: '/plans/1/handout' });
    expect(html.statusCode).toBe(303);
    expect(html.headers.location).toBe('/signin?next=%2Fplans%2F1%2Fhandout');
    expect(html.body).not.toContain('<html');
  });

  it('lists the languages with their review status', async () => {
    const res = await ctx.inject({ method: 'GET', url: '/api/handouts/languages' });
    expect(res.statusCode).toBe(200);
    const langs = res.json() as {
      language: string;
      review: { status: string };
      complete: boolean;
    }[];
    expect(langs.map((l) => l.language)).toEqual([
      'ar',
      'en',
      'es',
      'fr',
      'hi',
      'pt',
      'ru',
      'tl',
      'vi',
      'zh-Hans',
    ]);
    expect(langs.every((l) => l.review.status === 'drafted' && l.complete)).toBe(true);
  });
});

describe('phosledger plan print', () => {
  it.skipIf(!hasSr28)(t('writes the PDF and says the translation is a draft'), async () => {
    const dir = mkdtempSync(join(tmpdir(), 'phl-print-'));
    try {
      const dbFile = join(dir, 'p.sqlite');
      const db = openDb(dbFile);
      await migrateToLatest(db);
      const foods = insertFoods(db, sr28Foods(...NDB));
      await db.close();
      const ctx = await createTestContext({ db: openDb(dbFile) });
      const p = await ctx.inject({ method: 'POST', url: '/api/patients', payload: patientBody });
      const plan = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${p.json().id}/plans`,
        payload: planBody(foods),
      });
      await ctx.close();
      const io = () => {
        const stdout = new PassThrough();
        const stderr = new PassThrough();
        const chunks = { out: '', err: '' };
        stdout.on('data', (c) => (chunks.out += c));
        stderr.on('data', (c) => (chunks.err += c));
        return { io: { stdout, stderr, stdin: new PassThrough(), env: {} }, chunks };
      };
      const out = join(dir, 'plan.pdf');
      const args = ['plan', 'print', String(plan.json().id), '--lang', 'es', '--out', out];
      // A real patient's handout needs the clinic's own details first: nothing is written.
      const noClinic = io();
      expect(await runCli([...args, '--db', dbFile], noClinic.io)).toBe(1);
      expect(noClinic.chunks.err).toContain('PHL_HANDOUT_CLINIC_NOT_SET');
      expect(existsSync(out)).toBe(false);
      const settingsDb = openDb(dbFile);
      await new SettingsService(settingsDb, { now: () => new Date('2026-12-05T10:00:00Z') }).set(
        'clinic',
        { name: 'Test Renal Unit', contact: '555-0100', dietitianName: 'R. Test' },
      );
      await settingsDb.close();
      const ok = io();
      const code = await runCli([...args, '--db', dbFile], ok.io);
      expect(ok.chunks.err).toBe('');
      expect(code).toBe(0);
      // A one-day plan prints on a shorter layout (cover, day, foods to watch run on).
      expect(ok.chunks.out).toMatch(/wrote .*plan\.pdf \([23] pages, es, a4; translation drafted/);
      expect(readFileSync(out).subarray(0, 5).toString()).toBe('%PDF-');
      // An existing file is kept unless --force.
      writeFileSync(out, 'kept');
      const again = io();
      expect(await runCli([...args, '--db', dbFile], again.io)).toBe(1);
      expect(again.chunks.err).toContain('already exists');
      expect(readFileSync(out, 'utf8')).toBe('kept');
      const forced = io();
      expect(await runCli([...args, '--force', '--db', dbFile], forced.io)).toBe(0);
      expect(readFileSync(out).subarray(0, 5).toString()).toBe('%PDF-');
      const bad = io();
      expect(
        await runCli(
          [
            'plan',
            'print',
            String(plan.json().id),
            '--lang',
            'xx',
            '--out',
            out,
            '--force',
            '--db',
            dbFile,
          ],
          bad.io,
        ),
      ).toBe(1);
      expect(bad.chunks.err).toContain('PHL_HANDOUT_LANGUAGE_UNKNOWN');
      const usage = io();
      expect(await runCli(['plan', 'print', '1', '--db', dbFile], usage.io)).toBe(2);
      expect(usage.chunks.err).toContain('--out FILE.pdf is required');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
