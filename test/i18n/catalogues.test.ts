// Sources: plural categories per CLDR (through Node's Intl data); digit and grouping forms per
// CLDR locale data; catalogue strings are the project's own drafted translations.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { formatDate, formatNumber, formatTime } from '../../src/i18n/format.js';
import {
  DEFAULT_LOCALES_DIR,
  loadCatalogues,
  loadCataloguesOrThrow,
} from '../../src/i18n/loader.js';

const LANGUAGES = ['ar', 'en', 'es', 'fr', 'hi', 'pt', 'ru', 'tl', 'vi', 'zh-Hans'];
const en = JSON.parse(readFileSync(join(DEFAULT_LOCALES_DIR, 'en.json'), 'utf8'));

describe('shipped message catalogues (templates/locales)', () => {
  const langs = loadCataloguesOrThrow();

  it('load with no problems: the ten languages, each complete against English', () => {
    expect(langs.list()).toEqual(LANGUAGES);
    for (const l of LANGUAGES) expect(langs.bundle(l).missingKeys()).toEqual([]);
  });

  it('are all honestly marked drafted (none reviewed by a medical translator yet)', () => {
    for (const l of LANGUAGES) {
      const s = langs.bundle(l).status();
      expect(s.review.status).toBe('drafted');
      expect(s.review.reviewer).toBeNull();
    }
  });

  it('map patient language tags onto catalogues', () => {
    expect(langs.resolve('es-MX')).toBe('es');
    expect(langs.resolve('pt-BR')).toBe('pt');
    expect(langs.resolve('zh')).toBe('zh-Hans');
    expect(langs.resolve('zh-CN')).toBe('zh-Hans');
    expect(langs.resolve('zh-TW')).toBeNull(); // Traditional script: no catalogue yet
    expect(langs.resolve('fil')).toBe('tl');
    expect(langs.resolve('AR')).toBe('ar');
    expect(langs.resolve('de')).toBeNull();
  });

  it("format ICU plurals by each language's rules (CLDR plural categories)", () => {
    // Russian: 1 one, 3 few, 5 many (CLDR); Arabic: 2 two, 3 few, 11 many; Tagalog, Chinese: one form.
    const ru = langs.bundle('ru');
    expect(ru.format('measure.cup', { count: 1 }).text).toBe('1 чашка');
    expect(ru.format('measure.cup', { count: 3 }).text).toBe('3 чашки');
    expect(ru.format('measure.cup', { count: 5 }).text).toBe('5 чашек');
    const ar = langs.bundle('ar');
    expect(ar.format('measure.cup', { count: 2 }).text).toBe('كوبان');
    expect(ar.format('measure.cup', { count: 3 }).text).toBe('٣ أكواب'); // ar-EG: Arabic-Indic digits
    expect(ar.format('measure.cup', { count: 11 }).text).toBe('١١ كوبًا');
    expect(
      langs.bundle('es').format('binder.dose', { count: 2, binder: 'acetato de calcio' }).text,
    ).toBe('Tome 2 tabletas de acetato de calcio');
    expect(langs.bundle('zh-Hans').format('binder.dose', { count: 2, binder: '醋酸钙' }).text).toBe(
      '服用醋酸钙 2 片',
    );
  });
});

describe('locale formatting (Intl, ICU data of Node 20)', () => {
  it('groups and writes digits per locale', () => {
    expect(formatNumber('hi-IN', 123456)).toBe('1,23,456'); // Indian lakh grouping
    expect(formatNumber('ar-EG', 1234)).toBe('١٬٢٣٤'); // Arabic-Indic digits and separator
    expect(formatNumber('fr', 1234)).toBe('1\u202f234'); // narrow no-break space
    expect(formatNumber('en-US', 0.5, 1)).toBe('0.5');
  });
  it('writes dates and times without a time-zone shift', () => {
    expect(formatDate('es', '2026-03-05')).toBe('5 de marzo de 2026');
    expect(formatDate('zh-Hans', '2026-03-05')).toBe('2026年3月5日');
    expect(formatDate('ru', '2026-03-05')).toBe('5 марта 2026 г.');
    expect(formatTime('en-US', '07:30')).toMatch(/^7:30[ \u202f]AM$/); // ICU versions differ in the space
    expect(() => formatDate('en', '5/3/2026')).toThrow('not a YYYY-MM-DD date');
  });
});

describe('catalogue validation: a broken file names its file and key', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'phl-locales-'));
    writeFileSync(join(dir, 'en.json'), JSON.stringify(en));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  const es = (messages: Record<string, string>, meta: Record<string, unknown> = {}) => ({
    meta: {
      language: 'es',
      name: 'Español',
      englishName: 'Spanish',
      locale: 'es',
      direction: 'ltr',
      script: 'latin',
      additiveLabelLanguage: 'es',
      review: { status: 'drafted', reviewer: null, date: null, note: '' },
      ...meta,
    },
    messages,
  });

  it('reports bad JSON with the file', () => {
    writeFileSync(join(dir, 'es.json'), '{"meta": {');
    const { problems, catalogues } = loadCatalogues(dir);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ file: 'es.json', key: null });
    expect(problems[0]?.message).toMatch(/^not valid JSON/);
    expect([...catalogues.keys()]).toEqual(['en']);
  });

  it('reports an ICU syntax error, an unknown key and an argument English does not pass', () => {
    writeFileSync(
      join(dir, 'es.json'),
      JSON.stringify(
        es({
          'measure.cup': '{count, plural, one {# taza}', // unclosed, no other
          'handout.titel': 'Mi plan', // misspelt key
          'day.heading': 'Día {dia}', // English passes {day}
        }),
      ),
    );
    const { problems } = loadCatalogues(dir);
    expect(problems.map((p) => `${p.file} ${p.key}`)).toEqual([
      'es.json measure.cup',
      'es.json handout.titel',
      'es.json day.heading',
    ]);
    expect(problems[1]?.message).toBe('not a key of en.json (misspelt?)');
    expect(problems[2]?.message).toBe('uses {dia}, which en.json does not pass (allowed: day)');
    expect(() => loadCataloguesOrThrow(dir)).toThrow(
      /es\.json key measure\.cup: ICU message syntax error/,
    );
  });

  it('reports meta problems: a reviewed catalogue must name its reviewer, file and language must agree', () => {
    writeFileSync(
      join(dir, 'es.json'),
      JSON.stringify(
        es({}, { review: { status: 'reviewed', reviewer: null, date: null, note: '' } }),
      ),
    );
    writeFileSync(
      join(dir, 'pt.json'),
      JSON.stringify({ ...es({}), meta: { ...es({}).meta, language: 'pt-PT' } }),
    );
    const { problems } = loadCatalogues(dir);
    expect(problems).toEqual([
      {
        file: 'es.json',
        key: 'meta.review',
        message: 'a reviewed catalogue names its reviewer and the review date',
      },
      { file: 'pt.json', key: 'meta.language', message: 'language pt-PT must live in pt-PT.json' },
    ]);
  });

  it('treats missing strings as an incomplete language, not a broken file', () => {
    writeFileSync(join(dir, 'es.json'), JSON.stringify(es({ 'handout.title': 'Mi plan' })));
    const set = loadCatalogues(dir);
    expect(set.problems).toEqual([]);
    const langs = loadCataloguesOrThrow(dir);
    const bundle = langs.bundle('es');
    expect(bundle.missingKeys()).toContain('day.heading');
    expect(bundle.status().complete).toBe(false);
    expect(bundle.format('handout.title')).toEqual({ text: 'Mi plan', fallback: false });
    expect(bundle.format('day.heading', { day: '1' })).toEqual({ text: 'Day 1', fallback: true });
  });

  it('refuses to start without a valid English reference', () => {
    rmSync(join(dir, 'en.json'));
    expect(() => loadCataloguesOrThrow(dir)).toThrow(
      /en\.json: the English reference catalogue is missing/,
    );
  });
});
