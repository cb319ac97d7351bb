import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { fixedClock } from '../../src/clock.js';
import { AppError } from '../../src/errors.js';
import { HandoutService, type HandoutSources } from '../../src/handouts/handouts.service.js';
import { DEFAULT_LOCALES_DIR, loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { demoClinic, demoSummary } from './fixtures.js';

// Fake sources: invented demo plan, patient and clinic; no database.
const sources = (language: string | null): HandoutSources => ({
  summary: async () => demoSummary(1),
  patient: async () => ({ label: 'Demo patient', language }),
  clinic: async () => demoClinic,
});
const clock = fixedClock('2026-03-05T23:30:00Z'); // invented fixed time

async function failure(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (err) {
    if (err instanceof AppError) return err;
    throw err;
  }
  throw new Error('expected a failure');
}

describe('HandoutService (fake sources)', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'phl-svc-'));
    for (const l of ['en', 'es']) {
      writeFileSync(join(dir, `${l}.json`), readFileSync(join(DEFAULT_LOCALES_DIR, `${l}.json`)));
    }
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it("uses the patient's language, and the date in the given time zone", async () => {
    const langs = loadCataloguesOrThrow(dir);
    const east = new HandoutService(sources('es-419'), langs, clock, 'Asia/Tokyo');
    const { vm } = await east.prepare(1, { mode: 'refuse' });
    expect(vm.language).toBe('es');
    expect(vm.header.date).toBe('2026-03-06'); // 23:30 UTC is already the 6th in Tokyo (UTC+9)
    const west = new HandoutService(sources(null), langs, clock, 'America/Los_Angeles');
    expect((await west.prepare(1, { mode: 'refuse' })).vm.header.date).toBe('2026-03-05');
    expect((await west.prepare(1, { mode: 'refuse' })).vm.language).toBe('en');
  });

  it('refuses a PDF in a language missing strings, naming file and keys; the HTML view marks them', async () => {
    const es = JSON.parse(readFileSync(join(dir, 'es.json'), 'utf8'));
    delete es.messages['caution.symptoms'];
    writeFileSync(join(dir, 'es.json'), JSON.stringify(es));
    const service = new HandoutService(sources('es'), loadCataloguesOrThrow(dir), clock);
    const err = await failure(service.pdf(1, { paper: 'a4' }));
    expect(err.code).toBe('PHL_HANDOUT_LANGUAGE_INCOMPLETE');
    expect(err.statusCode).toBe(422);
    expect(err.message).toContain('templates/locales/es.json');
    expect(err.details).toEqual({ language: 'es', missingKeys: ['caution.symptoms'] });
    const { html } = await service.html(1, { paper: 'letter' });
    expect(html).toContain('Not ready to hand out:');
    expect(html).toContain('<code>caution.symptoms</code>');
    expect(html).toContain('[EN] Get medical help straight away');
    expect(html).toContain('paper-letter.css');
  });

  it('refuses a language whose script the embedded fonts cannot draw', async () => {
    const en = JSON.parse(readFileSync(join(dir, 'en.json'), 'utf8'));
    // A clinic-made Thai catalogue (invented test text): Thai is not in the embedded fonts.
    const th = {
      meta: {
        ...en.meta,
        language: 'th',
        name: 'ไทย',
        englishName: 'Thai',
        locale: 'th',
        additiveLabelLanguage: null,
      },
      messages: { ...en.messages, 'handout.title': 'แผนอาหารของฉัน' },
    };
    writeFileSync(join(dir, 'th.json'), JSON.stringify(th));
    const service = new HandoutService(sources('th'), loadCataloguesOrThrow(dir), clock);
    const err = await failure(service.pdf(1, { paper: 'a4' }));
    expect(err.code).toBe('PHL_HANDOUT_GLYPHS_MISSING');
    expect(err.message).toContain('U+0E41'); // THAI CHARACTER SARA AE, first letter of the title
  });

  it('answers an unknown language with the list of those there are', async () => {
    const service = new HandoutService(sources('es'), loadCataloguesOrThrow(dir), clock);
    const err = await failure(service.pdf(1, { lang: 'sw', paper: 'a4' }));
    expect(err.code).toBe('PHL_HANDOUT_LANGUAGE_UNKNOWN');
    expect(err.message).toBe("no message catalogue for language 'sw'; available: en, es");
  });
});
