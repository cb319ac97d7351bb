/* eslint-disable no-irregular-whitespace -- the snapshots hold the no-break space of "E 339" */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ADDITIVE_CATALOGUE } from '../../src/additives/catalogue.js';
import { selectWatchAdditives } from '../../src/handouts/foods-to-watch.js';
import type { HandoutSummary } from '../../src/handouts/handout.js';
import { buildHandoutViewModel, FALLBACK_MARK } from '../../src/handouts/view-model.js';
import { DEFAULT_LOCALES_DIR, loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { demoAdditives, demoClinic, demoSummary } from './fixtures.js';

const langs = loadCataloguesOrThrow();

/** Invented demo data: one day, two occasions, a binder of 3 units a day. */
const nut = (phosphorusMg: number, low: number, typical: number, high: number) => ({
  phosphorusMg,
  absorbablePhosphorusMg: { low, typical, high },
  additivePhosphorusMg: 0,
});
const small: HandoutSummary = {
  planId: 1,
  patientId: 2,
  days: [
    {
      label: 'Day 1',
      targets: { phosphorusMg: { min: 800, max: 1000 } },
      nutrients: nut(1234.4, 500.2, 740.6, 987.5),
      occasions: [
        {
          name: 'Breakfast',
          time: '07:30',
          nutrients: nut(400, 160, 240, 320),
          items: [
            { foodId: 1, grams: 100, label: 'avena', measure: { count: 1, description: 'cup' } },
          ],
        },
        {
          name: 'Merienda de Ana',
          time: null,
          nutrients: nut(834.4, 340.2, 500.6, 667.5),
          items: [{ foodId: 2, grams: 7.5, label: 'queso fundido', flags: { additive: true } }],
        },
      ],
    },
  ],
  binders: {
    prescription: {
      ingredient: 'lanthanum-carbonate',
      unitStrengthMg: 500,
      schedule: 'per-day',
      units: 3,
    },
    perOccasion: [
      { day: 'Day 1', occasion: 'Breakfast', units: 1 },
      { day: 'Day 1', occasion: 'Merienda de Ana', units: 2 },
    ],
  },
};
const patient = { label: 'P-1 (invented)', language: 'es' };
const clinic = { name: 'Demo clinic', contact: '555-0100', dietitianName: 'D. Demo' };

function vmFor(lang: string) {
  const r = buildHandoutViewModel(small, patient, clinic, lang, langs.bundle(lang), '2026-03-05', {
    additives: demoAdditives,
  });
  if (!r.ok) throw new Error('incomplete');
  return r.value;
}

describe('handout view-model (invented demo data)', () => {
  it("Spanish: days, occasions, portions, binder and chart in the patient's words", () => {
    const vm = vmFor('es');
    expect({
      header: vm.header,
      day: vm.days[0],
      binder: vm.binder,
      codes: vm.foodsToWatch.codes,
      inPlan: vm.foodsToWatch.inPlan,
    }).toMatchInlineSnapshot(`
      {
        "binder": {
          "heading": "Su quelante de fósforo",
          "lines": [
            "3 tabletas al día en total, repartidas entre sus comidas como se indica.",
            "Tómelo con los primeros bocados de la comida.",
            "Mastíquelo bien antes de tragarlo.",
          ],
          "name": "carbonato de lantano",
        },
        "codes": [
          {
            "code": "E 338",
            "names": [
              "ácido fosfórico",
            ],
          },
          {
            "code": "E 339",
            "names": [
              "fosfatos de sodio",
            ],
          },
        ],
        "day": {
          "absorbableMg": {
            "high": 987.5,
            "low": 500.2,
            "typical": 740.6,
          },
          "chart": {
            "legend": {
              "absorbed": "absorbido por el cuerpo (aproximado)",
              "inFood": "en los alimentos",
              "range": "rango probable",
            },
            "rows": [
              {
                "absorbableMg": {
                  "high": 320,
                  "low": 160,
                  "typical": 240,
                },
                "label": "Desayuno",
                "valueText": "240 mg",
              },
              {
                "absorbableMg": {
                  "high": 667.5,
                  "low": 340.2,
                  "typical": 500.6,
                },
                "label": "Merienda de Ana",
                "valueText": "501 mg",
              },
            ],
            "target": {
              "mg": 1000,
              "text": "Su límite: hasta 1000 mg al día",
            },
            "title": "Fósforo que su cuerpo absorbe, comida por comida (mg)",
            "whole": {
              "absorbableMg": {
                "high": 987.5,
                "low": 500.2,
                "typical": 740.6,
              },
              "label": "Todo el día",
              "totalMg": 1234.4,
              "valueText": "741 de 1234 mg",
            },
          },
          "continuedHeading": "Día 1 (continuación)",
          "heading": "Día 1",
          "label": null,
          "nameNotes": [],
          "number": 1,
          "occasions": [
            {
              "absorbableMg": {
                "high": 320,
                "low": 160,
                "typical": 240,
              },
              "absorbedLine": "Fósforo absorbido: unos 240 mg",
              "binder": {
                "dose": "Tome 1 tableta de carbonato de lantano",
                "line": "Tome 1 tableta de carbonato de lantano. Tómelo con los primeros bocados de la comida.",
                "timing": [
                  "Tómelo con los primeros bocados de la comida.",
                ],
                "units": 1,
              },
              "items": [
                {
                  "grams": 100,
                  "label": "avena",
                  "portion": "1 taza (unos 100 g)",
                },
              ],
              "name": "Desayuno",
              "timeText": "a las 7:30",
            },
            {
              "absorbableMg": {
                "high": 667.5,
                "low": 340.2,
                "typical": 500.6,
              },
              "absorbedLine": "Fósforo absorbido: unos 501 mg",
              "binder": {
                "dose": "Tome 2 tabletas de carbonato de lantano",
                "line": "Tome 2 tabletas de carbonato de lantano. Tómelo con los primeros bocados de la comida.",
                "timing": [
                  "Tómelo con los primeros bocados de la comida.",
                ],
                "units": 2,
              },
              "items": [
                {
                  "grams": 7.5,
                  "label": "queso fundido",
                  "portion": "7,5 g",
                },
              ],
              "name": "Merienda de Ana",
              "timeText": null,
            },
          ],
          "totalLine": "Fósforo que su cuerpo absorbe hoy: unos 741 mg (entre 500 y 988 mg). Fósforo en los alimentos: 1234 mg.",
          "totalMg": 1234.4,
        },
        "header": {
          "clinicContact": "555-0100",
          "clinicName": "Demo clinic",
          "date": "2026-03-05",
          "dateText": "5 de marzo de 2026",
          "dietitianName": "D. Demo",
          "patientLabel": "P-1 (invented)",
        },
        "inPlan": "En este plan: queso fundido",
      }
    `);
  });

  it('Arabic: right to left, Arabic-Indic digits, plural forms, no additive label names', () => {
    const vm = vmFor('ar');
    const day = vm.days[0]!;
    expect({
      direction: vm.direction,
      script: vm.script,
      dateText: vm.header.dateText,
      totalLine: day.totalLine,
      occasions: day.occasions.map((o) => ({
        name: o.name,
        time: o.timeText,
        items: o.items,
        binder: o.binder,
      })),
      chart: {
        rows: day.chart.rows.map((r) => r.valueText),
        whole: day.chart.whole.valueText,
        target: day.chart.target,
      },
      codes: vm.foodsToWatch.codes,
      notice: vm.review.notice,
    }).toMatchInlineSnapshot(`
      {
        "chart": {
          "rows": [
            "٢٤٠ ملغ",
            "٥٠١ ملغ",
          ],
          "target": {
            "mg": 1000,
            "text": "حدّك الأقصى: ١٬٠٠٠ ملغ في اليوم",
          },
          "whole": "٧٤١ من ١٬٢٣٤ ملغ",
        },
        "codes": [
          {
            "code": "E 338",
            "names": [],
          },
          {
            "code": "E 339",
            "names": [],
          },
        ],
        "dateText": "٥ مارس ٢٠٢٦",
        "direction": "rtl",
        "notice": "ترجمة أولية لم يراجعها مترجم طبي بعد.",
        "occasions": [
          {
            "binder": {
              "dose": "تناول قرصًا واحدًا من كربونات اللانثانوم",
              "line": "تناول قرصًا واحدًا من كربونات اللانثانوم. تناوله مع أول لقمات الوجبة.",
              "timing": [
                "تناوله مع أول لقمات الوجبة.",
              ],
              "units": 1,
            },
            "items": [
              {
                "grams": 100,
                "label": "⁨avena⁩",
                "portion": "كوب واحد (نحو ١٠٠ غ)",
              },
            ],
            "name": "الفطور",
            "time": "الساعة ٧:٣٠ ص",
          },
          {
            "binder": {
              "dose": "تناول قرصين من كربونات اللانثانوم",
              "line": "تناول قرصين من كربونات اللانثانوم. تناوله مع أول لقمات الوجبة.",
              "timing": [
                "تناوله مع أول لقمات الوجبة.",
              ],
              "units": 2,
            },
            "items": [
              {
                "grams": 7.5,
                "label": "⁨queso fundido⁩",
                "portion": "٧٫٥ غ",
              },
            ],
            "name": "Merienda de Ana",
            "time": null,
          },
        ],
        "script": "arabic",
        "totalLine": "الفوسفور الذي يمتصه جسمك اليوم: نحو ٧٤١ ملغ (بين ٥٠٠ و٩٨٨ ملغ). الفوسفور في الطعام: ١٬٢٣٤ ملغ.",
      }
    `);
  });

  it("keeps the summary's numbers exactly (texts round to whole mg)", () => {
    const vm = vmFor('en');
    const day = vm.days[0]!;
    expect(day.totalMg).toBe(1234.4);
    expect(day.absorbableMg).toEqual({ low: 500.2, typical: 740.6, high: 987.5 });
    expect(day.occasions.map((o) => o.absorbableMg.typical)).toEqual([240, 500.6]);
    expect(day.chart.target?.mg).toBe(1000);
    // 740.6 -> 741, 500.2 -> 500, 987.5 -> 988 (Math.round, half up), 1234.4 -> 1,234
    expect(day.totalLine).toBe(
      'Phosphorus your body takes up today: about 741 mg (between 500 and 988 mg). Phosphorus in the food: 1,234 mg.',
    );
    expect(day.occasions[1]!.items[0]!.grams).toBe(7.5);
    expect(day.occasions[1]!.items[0]!.portion).toBe('7.5 g');
  });

  it('uses the real additive catalogue: one line per counted E-number family', () => {
    const watch = selectWatchAdditives(ADDITIVE_CATALOGUE);
    const codes = watch.map((a) => a.eNumber);
    expect(codes).toContain('E 338');
    expect(codes).toContain('E 339');
    expect(codes).toContain('E 452');
    expect(codes.some((c) => c?.includes('('))).toBe(false); // no sub-numbers once the family is listed
    const r = buildHandoutViewModel(
      demoSummary(1),
      patient,
      demoClinic,
      'fr',
      langs.bundle('fr'),
      '2026-03-05',
      {
        additives: watch,
      },
    );
    if (!r.ok) throw new Error('incomplete');
    const e339 = r.value.foodsToWatch.codes.find((c) => c.code === 'E\u00a0339');
    expect(e339?.names.length).toBeGreaterThan(0); // French label names from the catalogue
  });

  it('refuses a language with missing strings, listing them; marks English stand-ins in the clinic view', () => {
    const dir = mkdtempSync(join(tmpdir(), 'phl-vm-'));
    try {
      const en = readFileSync(join(DEFAULT_LOCALES_DIR, 'en.json'), 'utf8');
      const es = JSON.parse(readFileSync(join(DEFAULT_LOCALES_DIR, 'es.json'), 'utf8'));
      delete es.messages['caution.medicines'];
      delete es.messages['chart.title'];
      writeFileSync(join(dir, 'en.json'), en);
      writeFileSync(join(dir, 'es.json'), JSON.stringify(es));
      const partial = loadCataloguesOrThrow(dir);
      const refused = buildHandoutViewModel(
        small,
        patient,
        clinic,
        'es',
        partial.bundle('es'),
        '2026-03-05',
      );
      expect(refused).toEqual({
        ok: false,
        code: 'LANGUAGE_INCOMPLETE',
        language: 'es',
        missingKeys: ['caution.medicines', 'chart.title'],
      });
      const marked = buildHandoutViewModel(
        small,
        patient,
        clinic,
        'es',
        partial.bundle('es'),
        '2026-03-05',
        {
          fallback: 'mark',
        },
      );
      if (!marked.ok) throw new Error('mark mode never refuses');
      expect(marked.value.fallbackKeys).toEqual(['caution.medicines', 'chart.title']);
      expect(marked.value.cautions.lines[1]).toBe(
        `${FALLBACK_MARK}Do not change your medicines or your binder doses without talking to your care team.`,
      );
      expect(marked.value.cautions.lines[0]).toBe(
        'Su equipo de salud preparó este plan solo para usted. No sirve para otra persona.',
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
