import { describe, expect, it } from 'vitest';
import type { HandoutSummary } from '../../src/handouts/handout.js';
import { renderHandoutHtml } from '../../src/handouts/handout-html.js';
import { renderHandoutPdf } from '../../src/handouts/handout-pdf.js';
import { buildHandoutViewModel } from '../../src/handouts/view-model.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';

const langs = loadCataloguesOrThrow();
const LANGUAGES = ['en', 'es', 'fr', 'pt', 'ru', 'zh-Hans', 'vi', 'tl', 'hi', 'ar'];

// Invented demo data: one lunch of boiled potatoes and chicken, and bread as listed.
const nut = (phosphorusMg: number) => ({
  phosphorusMg,
  absorbablePhosphorusMg: {
    low: phosphorusMg * 0.4,
    typical: phosphorusMg * 0.5,
    high: phosphorusMg * 0.6,
  },
  additivePhosphorusMg: 0,
});
const summary: HandoutSummary = {
  planId: 1,
  patientId: 1,
  days: [
    {
      label: 'Day 1',
      nutrients: nut(400),
      occasions: [
        {
          name: 'Lunch',
          nutrients: nut(400),
          items: [
            {
              foodId: 1,
              grams: 150,
              label: 'potatoes',
              preparation: { method: 'double-boil-drain' },
            },
            // 100 g of raw chicken is about 77 g on the plate (poultry yield 0.77)
            {
              foodId: 2,
              grams: 100,
              label: 'chicken',
              preparation: { method: 'boil-drain', plateGrams: 77 },
            },
            { foodId: 3, grams: 30, label: 'bread', preparation: { method: 'as-listed' } },
          ],
        },
      ],
    },
  ],
  binders: null,
};
const clinic = { name: 'Invented clinic', contact: '555-0100', dietitianName: 'A. Demo' };

function vmFor(lang: string, s: HandoutSummary = summary) {
  const r = buildHandoutViewModel(
    s,
    { label: 'P-1 (invented)' },
    clinic,
    lang,
    langs.bundle(lang),
    '2026-03-05',
  );
  if (!r.ok) throw new Error(`${lang}: missing ${r.missingKeys.join(', ')}`);
  return r.value;
}

describe('handout: how to cook prepared foods, in every handout language', () => {
  it('every language has the cooking strings (drafted like the rest of its catalogue)', () => {
    for (const lang of LANGUAGES) {
      const vm = vmFor(lang);
      const items = vm.days[0]?.occasions[0]?.items ?? [];
      expect(items[0]?.preparation, lang).toBeTruthy();
      expect(items[2]?.preparation, lang).toBeUndefined(); // as listed: nothing to say
      expect(
        vm.cooking?.steps.map((s) => s.method),
        lang,
      ).toEqual(['double-boil-drain', 'boil-drain']);
      expect(vm.cooking?.items.length, lang).toBe(2);
      expect(vm.review.status).toBe('drafted');
    }
  });
  it('says it in plain words with the diabetes and potassium caution', () => {
    const en = vmFor('en');
    expect(en.cooking?.steps[1]?.how).toBe(
      'Cut the food into small pieces. Cook it in a big pot with plenty of water. Pour all the water away.',
    );
    expect(en.cooking?.water).toMatch(/Do not use the cooking water for soup, sauce or gravy/);
    expect(en.cooking?.caution).toMatch(/diabetes/);
    expect(en.cooking?.caution).toMatch(/potassium/);
    // the patient sees the cooked weight of a prepared item, and headings start with a capital
    expect(en.days[0]?.occasions[0]?.items[1]?.portion).toBe('77 g when cooked');
    expect(en.cooking?.steps[1]?.label).toBe('Boiled, water thrown away');
    const html = renderHandoutHtml(vmFor('es'));
    expect(html).toContain('Tire toda el agua');
    expect(html).toContain(
      'potatoes<span class="prep"> · hervido dos veces en agua nueva, tirando el agua</span>',
    );
  });
  it('has no cooking page when nothing is prepared (plans without methods print as before)', () => {
    const plain = structuredClone(summary);
    for (const i of plain.days[0]?.occasions[0]?.items ?? []) delete i.preparation;
    const vm = vmFor('en', plain);
    expect(vm.cooking).toBeUndefined();
    expect(renderHandoutHtml(vm)).not.toContain('class="page cooking"');
  });
  it('prints in Hindi, Arabic and Chinese with every glyph', async () => {
    for (const lang of ['hi', 'ar', 'zh-Hans']) {
      const pdf = await renderHandoutPdf(vmFor(lang), 'a4');
      expect(pdf.missingCodePoints, lang).toEqual([]);
      // one-day layout: the cover with foods to watch, the day, how to cook (3 or 4 pages as
      // the language's lines run)
      expect(pdf.pageCount, lang).toBeGreaterThanOrEqual(3);
      expect(pdf.pageCount, lang).toBeLessThanOrEqual(4);
    }
  });
});
