import { describe, expect, it } from 'vitest';
import {
  ADDITIVE_CATALOGUE,
  ADDITIVE_CATALOGUE_VERSION,
  LABEL_LANGUAGES,
  findByCode,
  findByNumber,
} from '../../src/additives/catalogue.js';
import { analyzeIngredients } from '../../src/additives/ingredient-parser.js';

// IUPAC 2021 abridged standard atomic weights, typed again here so the check does not reuse the
// code under test (Prohaska et al., Pure Appl Chem 2022;94:573-600).
const W = {
  H: 1.008,
  C: 12.011,
  N: 14.007,
  O: 15.999,
  Na: 22.99,
  Mg: 24.305,
  Al: 26.982,
  P: 30.974,
  K: 39.098,
  Ca: 40.078,
  Fe: 55.845,
};

describe('phosphate additive catalogue: P mass fractions from IUPAC atomic weights', () => {
  // Worked by hand: molar mass = sum of counts x atomic weight; P fraction = nP x 30.974 / M
  const worked: [string, number, number][] = [
    // H3PO4: 3 x 1.008 + 30.974 + 4 x 15.999 = 97.994
    ['E 338', 97.994, (1 * W.P) / 97.994],
    // NaH2PO4: 22.990 + 2.016 + 30.974 + 63.996 = 119.976
    ['E 339(i)', 119.976, W.P / 119.976],
    // Na2HPO4: 45.980 + 1.008 + 30.974 + 63.996 = 141.958
    ['E 339(ii)', 141.958, W.P / 141.958],
    // Na3PO4: 68.970 + 30.974 + 63.996 = 163.940
    ['E 339(iii)', 163.94, W.P / 163.94],
    // Ca(H2PO4)2: 40.078 + 4 x 1.008 + 2 x 30.974 + 8 x 15.999 = 234.050
    ['E 341(i)', 234.05, (2 * W.P) / 234.05],
    // Ca3(PO4)2: 120.234 + 61.948 + 127.992 = 310.174
    ['E 341(iii)', 310.174, (2 * W.P) / 310.174],
    // Na2H2P2O7: 45.980 + 2.016 + 61.948 + 111.993 = 221.937
    ['E 450(i)', 221.937, (2 * W.P) / 221.937],
    // Na4P2O7: 91.960 + 61.948 + 111.993 = 265.901
    ['E 450(iii)', 265.901, (2 * W.P) / 265.901],
    // Na5P3O10: 114.950 + 92.922 + 159.990 = 367.862
    ['E 451(i)', 367.862, (3 * W.P) / 367.862],
    // NaPO3 repeat unit: 22.990 + 30.974 + 47.997 = 101.961
    ['E 452(i)', 101.961, W.P / 101.961],
    // (NH4)2HPO4: 28.014 + 9.072 + 30.974 + 63.996 = 132.056
    ['INS 342(ii)', 132.056, W.P / 132.056],
    // NaAl3H14(PO4)8·4H2O: 22.990 + 80.946 + 22 x 1.008 + 247.792 + 36 x 15.999 = 949.868
    ['E 541', 949.868, (8 * W.P) / 949.868],
    // Fe4(P2O7)3: 223.380 + 185.844 + 335.979 = 745.203
    ['ferric pyrophosphate', 745.203, (6 * W.P) / 745.203],
  ];
  it.each(worked)('%s: M %f g/mol', (code, _m, expected) => {
    const e = findByCode(code);
    expect(e, code).toBeDefined();
    expect(e?.pMassFraction).toBeCloseTo(expected, 6);
  });

  it('agrees with handbook molar masses for a few salts (CRC Handbook, from memory)', () => {
    // CRC: Na2HPO4 141.96, Na5P3O10 367.86, Ca3(PO4)2 310.18 g/mol -> P fractions
    expect(findByCode('E 339(ii)')?.pMassFraction).toBeCloseTo(30.974 / 141.96, 4);
    expect(findByCode('E 451(i)')?.pMassFraction).toBeCloseTo((3 * 30.974) / 367.86, 4);
    expect(findByCode('E 341(iii)')?.pMassFraction).toBeCloseTo((2 * 30.974) / 310.18, 4);
  });

  it('every entry with a formula has a fraction between 0 and the phosphoric acid maximum', () => {
    for (const e of ADDITIVE_CATALOGUE) {
      if (e.formula) {
        expect(e.pMassFraction, e.code).toBeGreaterThan(0.03);
        expect(e.pMassFraction, e.code).toBeLessThan(0.33);
      }
    }
  });
});

describe('catalogue coverage: EU list (Reg. (EC) 1333/2008 Annex II) and Codex INS (CAC/GL 36-1989)', () => {
  it('holds every phosphate number and sub-number', () => {
    const eu = [
      'E 338',
      'E 339(i)',
      'E 339(ii)',
      'E 339(iii)',
      'E 340(i)',
      'E 340(ii)',
      'E 340(iii)',
      'E 341(i)',
      'E 341(ii)',
      'E 341(iii)',
      'E 343(i)',
      'E 343(ii)',
      'E 450(i)',
      'E 450(ii)',
      'E 450(iii)',
      'E 450(v)',
      'E 450(vi)',
      'E 450(vii)',
      'E 450(ix)',
      'E 451(i)',
      'E 451(ii)',
      'E 452(i)',
      'E 452(ii)',
      'E 452(iii)',
      'E 452(iv)',
      'E 541',
      'E 542',
      'E 442',
      'E 322',
      'E 1410',
      'E 1412',
      'E 1413',
      'E 1414',
      'E 1442',
      'E 626',
      'E 627',
      'E 628',
      'E 629',
      'E 630',
      'E 631',
      'E 632',
      'E 633',
      'E 634',
      'E 635',
      'E 101(ii)',
    ];
    for (const code of eu) expect(findByCode(code)?.euAuthorised, code).toBe(true);
    // Codex-only sub-numbers (from memory of the INS list)
    for (const ins of [
      '342(i)',
      '342(ii)',
      '343(iii)',
      '450(iv)',
      '450(viii)',
      '452(v)',
      '541(ii)',
    ]) {
      const e = ADDITIVE_CATALOGUE.find((x) => x.insNumber === ins);
      expect(e?.codexListed, ins).toBe(true);
      expect(e?.euAuthorised, ins).toBe(false);
    }
    expect(findByNumber('339')?.level).toBe('family');
    expect(findByNumber('339', 'ii')?.code).toBe('E 339(ii)');
  });

  it('counts inorganic phosphates and notes the organic ones with a reason', () => {
    for (const e of ADDITIVE_CATALOGUE) {
      expect(e.countedReason.length, e.code).toBeGreaterThan(10);
      if (['inorganic-phosphate', 'aluminium-phosphate', 'fortificant'].includes(e.kind))
        expect(e.counted, e.code).toBe(true);
      if (['starch-phosphate', 'organic-phosphate', 'phospholipid'].includes(e.kind))
        expect(e.counted, e.code).toBe(false);
    }
  });

  it('has label names in en, es, fr, de, it, pt for every entry', () => {
    for (const e of ADDITIVE_CATALOGUE) {
      for (const lang of LABEL_LANGUAGES)
        expect(e.labelNames[lang].length, `${e.code} ${lang}`).toBeGreaterThan(0);
      expect(e.functions.length, e.code).toBeGreaterThan(0);
    }
    expect(ADDITIVE_CATALOGUE_VERSION).toMatch(/^\d{4}-\d{2}-\d{2}\.\d+$/);
  });

  it('the analyser recognises every label name of every entry (as that entry or its family)', () => {
    const misses: string[] = [];
    for (const e of ADDITIVE_CATALOGUE) {
      for (const lang of LABEL_LANGUAGES) {
        for (const name of e.labelNames[lang]) {
          const found = analyzeIngredients(`water, ${name}, salt`).additives;
          const ok = found.some(
            (f) =>
              f.code === e.code ||
              (e.level === 'substance' && f.family === e.family && f.code === `E ${e.family}`) ||
              (e.level === 'family' && f.family === e.family),
          );
          if (!ok)
            misses.push(
              `${e.code} ${lang} "${name}" -> ${found.map((f) => f.code).join(',') || 'nothing'}`,
            );
        }
      }
    }
    expect(misses).toEqual([]);
  });
});

describe('hydrates sold under the same number (P fraction computed from the hydrate formula)', () => {
  it('gives less P per gram than the anhydrous salt (worked)', () => {
    const dsp = findByCode('E 339(ii)');
    const dodeca = dsp?.hydrates.find((h) => h.formula === 'Na2HPO4·12H2O');
    // Na2HPO4·12H2O: 141.958 + 12 x 18.015 = 358.138 g/mol; P = 30.974 / 358.138 = 0.08649
    expect(dodeca?.pMassFraction).toBeCloseTo(30.974 / 358.138, 5);
    const dcp = findByCode('E 341(ii)')?.hydrates[0];
    // CaHPO4·2H2O: 136.056 + 36.030 = 172.086 g/mol; P = 30.974 / 172.086 = 0.18000
    expect(dcp?.pMassFraction).toBeCloseTo(0.18, 4);
    // E 631 disodium inosinate ·7H2O: 392.172 + 126.105 = 518.277 g/mol; P = 5.98%
    expect(findByCode('E 631')?.hydrates[0]?.pMassFraction).toBeCloseTo(30.974 / 518.277, 5);
    for (const e of ADDITIVE_CATALOGUE)
      for (const h of e.hydrates)
        expect(h.pMassFraction, h.formula).toBeLessThan(e.pMassFraction as number);
  });
});
