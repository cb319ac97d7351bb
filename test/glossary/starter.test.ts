import { readFileSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { selectStarterFoods } from '../../src/glossary/starter-selection.js';
import {
  parseStarterCsv,
  STARTER_GLOSSARY_FILE,
  StarterGlossary,
} from '../../src/glossary/starter.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { DEMO_FOOD_CODES } from '../../src/plans/demo-seed.js';

// The labelled diary lines are invented demo data labelled with USDA SR28 NDB numbers.
const labelled = readFileSync(
  new URL('../fixtures/diary/labelled-lines.tsv', import.meta.url),
  'utf8',
)
  .split('\n')
  .filter((l) => l.trim() && !l.startsWith('#'))
  .map((l) => l.split('\t')[1] as string);
const csvText = readFileSync(STARTER_GLOSSARY_FILE, 'utf8');
const rows = parseStarterCsv(csvText);

describe('starter food names (templates/glossary/starter.csv, drafted)', () => {
  it('names exactly the foods the documented rule selects: 17 demo foods, then 183 SR28 foods', () => {
    const selected = selectStarterFoods(DEMO_FOOD_CODES, labelled, 200);
    expect(selected).toHaveLength(200);
    expect(selected.filter((f) => f.foodSource === 'ifct2017')).toHaveLength(17);
    const inFile = [...new Set(rows.map((r) => `${r.foodSource}|${r.foodCode}`))];
    expect(inFile.sort()).toEqual(selected.map((f) => `${f.foodSource}|${f.foodCode}`).sort());
  });

  it('gives every food a name in each of the ten handout languages, all drafted', () => {
    const languages = loadCataloguesOrThrow().list();
    expect(languages).toHaveLength(10);
    const starter = new StarterGlossary(rows);
    for (const key of new Set(rows.map((r) => `${r.foodSource}|${r.foodCode}`))) {
      const [source, code] = key.split('|') as [string, string];
      for (const lang of languages) {
        const name = starter.name(source, code, lang);
        expect(name, `${key} ${lang}`).toBeTruthy();
        expect((name as string).length).toBeLessThanOrEqual(120);
      }
    }
    expect(rows).toHaveLength(2000);
    const records = parse(csvText, { columns: true }) as Array<Record<string, string>>;
    const statuses = new Set(records.map((r) => r.status));
    expect([...statuses]).toEqual(['drafted']);
  });

  it('names in a script carry that script (Arabic, Devanagari, Han, Cyrillic)', () => {
    const script: Record<string, RegExp> = {
      ar: /\p{Script=Arabic}/u,
      hi: /\p{Script=Devanagari}/u,
      'zh-Hans': /\p{Script=Han}/u,
      ru: /\p{Script=Cyrillic}/u,
    };
    for (const r of rows) {
      const re = script[r.language];
      if (re) expect(r.name, `${r.foodCode} ${r.language}`).toMatch(re);
    }
  });

  it('cola and bologna read in Spanish and Arabic (USDA SR28 NDB 14148, 07008)', () => {
    const starter = new StarterGlossary(rows);
    expect(starter.name('usda-sr28', '14148', 'es')).toBe('Refresco de cola');
    expect(starter.name('usda-sr28', '07008', 'ar')).toBe('مرتديلا (بولونيا)');
  });
});
