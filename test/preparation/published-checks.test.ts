/**
 * The preparation table against published figures and against USDA SR28's own raw and cooked
 * entries. Needs the SR28 release in ../shared: skipped (saying so) when it is missing, and
 * failing when CI is set.
 */
import { describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_ABSORPTION_FRACTIONS as FRACTIONS } from '../../src/phosphorus/absorption.js';
import { profileFood } from '../../src/phosphorus/profile.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import type { PlanItem } from '../../src/plans/plan.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { applicability, prepareAmounts } from '../../src/preparation/apply.js';
import type { PreparationMethodId } from '../../src/preparation/methods.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { sr28Foods } from '../helpers/sr28.js';

const skip = !hasSr28;
const name = (t: string) => `${t} (${hasSr28 ? 'USDA SR28' : SR28_MISSING})`;

const targets = computeTargets({
  weightKg: 70,
  ckdStage: '5',
  dialysis: 'hemodialysis',
  diabetes: false,
  targetOverrides: {},
});
const settings = { absorption: FRACTIONS, thresholds: DEFAULT_THRESHOLDS };

/** One-item plan summary of a food (grams on the given basis), after the method. */
function itemAfter(food: Food, item: Partial<PlanItem> & { grams: number }) {
  const summary = summarizePlan(
    {
      planId: 1,
      patientId: 1,
      version: 1,
      name: 'check',
      days: [
        {
          label: 'Day 1',
          occasions: [
            {
              name: 'Lunch',
              kind: 'meal',
              time: null,
              items: [{ foodId: food.id, measure: null, label: null, ...item }],
            },
          ],
        },
      ],
    },
    new Map([[food.id, food]]),
    targets,
    settings,
  );
  const day = summary.days[0];
  return { item: day?.occasions[0]?.items[0], day };
}

describe('Cupisti 2006 (J Ren Nutr 16:36-40): boiled beef and chicken breast from raw SR28 entries', () => {
  // Published true retention after boiling (mean +/- SD): beef P 42 +/- 13%, protein 87 +/- 10%;
  // chicken breast P 63 +/- 6%, protein 81 +/- 4%.
  const cases = [
    // USDA SR28 NDB 23354 beef, top round steak, lean only, raw
    { ndb: '23354', what: 'beef', p: [0.42, 0.13], prot: [0.87, 0.1] },
    // USDA SR28 NDB 05062 chicken breast, meat only, raw: P 213 mg, protein 22.50 g per 100 g
    { ndb: '05062', what: 'chicken breast', p: [0.63, 0.06], prot: [0.81, 0.04] },
  ] as const;
  for (const c of cases) {
    it.skipIf(skip)(name(`${c.what}: retained P and protein within mean +/- SD`), () => {
      const [raw] = sr28Foods(c.ndb) as [Food];
      const before = itemAfter(raw, { grams: 100 }).item;
      const after = itemAfter(raw, {
        grams: 100,
        preparation: 'boil-drain',
        weightBasis: 'table',
      }).item;
      const pRet = (after?.nutrients.phosphorusMg ?? 0) / (before?.nutrients.phosphorusMg ?? 1);
      const protRet = (after?.nutrients.proteinG ?? 0) / (before?.nutrients.proteinG ?? 1);
      expect(Math.abs(pRet - c.p[0])).toBeLessThanOrEqual(c.p[1] + 0.005);
      expect(Math.abs(protRet - c.prot[0])).toBeLessThanOrEqual(c.prot[1] + 0.005);
      // The ratio falls by P retention / protein retention (beef 0.50/0.87 = 0.57, chicken
      // 0.63/0.81 = 0.78); Cupisti's means give 0.42/0.87 = 0.48 and 0.63/0.81 = 0.78.
      const ratioBefore = before?.nutrients.phosphorusProteinRatioMgPerG ?? 0;
      const ratioAfter = after?.nutrients.phosphorusProteinRatioMgPerG ?? 0;
      const lowest = (c.p[0] - c.p[1]) / (c.prot[0] + c.prot[1]);
      const highest = (c.p[0] + c.p[1]) / (c.prot[0] - c.prot[1]);
      expect(ratioAfter / ratioBefore).toBeGreaterThanOrEqual(lowest - 0.01);
      expect(ratioAfter / ratioBefore).toBeLessThanOrEqual(highest + 0.01);
      // The published mean lies inside the product's low-high range.
      const range = after?.preparation?.factors?.phosphorus;
      expect(range && range.low <= c.p[0] && c.p[0] <= range.high).toBe(true);
      expect(after?.preparation?.sources.join(' ')).toContain('Cupisti');
    });
  }

  it.skipIf(skip)(name('plate grams are converted to raw grams with the yield'), () => {
    const [raw] = sr28Foods('05062') as [Food];
    // 100 g boiled chicken on the plate = 100 / 0.77 = 129.87 g raw;
    // P = 213 mg/100 g x 1.2987 x 0.63 = 174.3 mg; protein = 22.50 x 1.2987 x 0.81 = 23.67 g.
    const { item, day } = itemAfter(raw, {
      grams: 100,
      preparation: 'boil-drain',
      weightBasis: 'plate',
    });
    expect(item?.preparation?.tableGrams).toBe(129.9);
    expect(item?.preparation?.plateGrams).toBe(100);
    expect(item?.nutrients.phosphorusMg).toBe(174.3);
    expect(item?.nutrients.proteinG).toBe(23.67);
    // The day's total carries the range: low = 213 x (100/0.85) x 0.46 / 100 = 115.3 mg,
    // high = 213 x (100/0.70) x 0.90 / 100 = 273.9 mg.
    expect(day?.nutrients.preparedRanges?.phosphorusMg).toEqual({
      low: 115.3,
      typical: 174.3,
      high: 273.9,
    });
  });
});

describe('Vrdoljak 2015 (J Ren Nutr 25:308-315): phosphorus lowered by boiling, per class', () => {
  // Published reductions (dry-weight basis): vegetables 27-43%, meat 10-49%, pasta 7%, rice 22.8%.
  // The product's typical reduction must sit in the published span where the class rests on
  // this study alone, and its low-high range must cover the published span everywhere.
  const cases: { ndb: string; what: string; span: [number, number]; typicalInSpan: boolean }[] = [
    { ndb: '11124', what: 'carrots, raw', span: [0.27, 0.43], typicalInSpan: true },
    { ndb: '11052', what: 'green beans, raw', span: [0.27, 0.43], typicalInSpan: true },
    { ndb: '11352', what: 'potatoes, raw', span: [0.27, 0.43], typicalInSpan: true },
    // Meat and poultry: Cupisti 2006 and Ando 2015 found more loss, so only the range covers it.
    { ndb: '23354', what: 'beef, raw', span: [0.1, 0.49], typicalInSpan: false },
    { ndb: '10214', what: 'pork loin, raw', span: [0.1, 0.49], typicalInSpan: false },
    { ndb: '05062', what: 'chicken breast, raw', span: [0.1, 0.49], typicalInSpan: true },
    { ndb: '20120', what: 'pasta, dry', span: [0.07, 0.07], typicalInSpan: true },
    { ndb: '20044', what: 'rice, white, raw', span: [0.228, 0.228], typicalInSpan: true },
  ];
  for (const c of cases) {
    it.skipIf(skip)(name(`${c.what} (SR28 ${c.ndb})`), () => {
      const [raw] = sr28Foods(c.ndb) as [Food];
      const a = applicability(raw, 'boil-drain');
      if (!a.ok) throw new Error(a.reason);
      const p = a.factors.phosphorus;
      const reduction = { low: 1 - p.high, typical: 1 - p.typical, high: 1 - p.low };
      expect(reduction.low).toBeLessThanOrEqual(c.span[0] + 0.005);
      expect(reduction.high).toBeGreaterThanOrEqual(c.span[1] - 0.005);
      if (c.typicalInSpan) {
        expect(reduction.typical).toBeGreaterThanOrEqual(c.span[0] - 0.005);
        expect(reduction.typical).toBeLessThanOrEqual(c.span[1] + 0.005);
      }
      // Boiling in hard water raised calcium in every food: the range reaches above 1.
      expect(a.factors.calcium.high).toBeGreaterThan(1);
    });
  }
});

describe('USDA SR28 raw entry prepared by the product vs the same food cooked in SR28', () => {
  // 100 g on the plate made from the raw entry, compared with 100 g of the cooked entry. The
  // differences are pinned (a change to the table shows here) and said in docs/preparation.md.
  // SR28's cooked rice absorbs its water (nothing drained), so SR28 keeps more P than boiling and
  // draining; SR28's stewed chicken implies no protein loss where Cupisti 2006 measured 19%.
  const pairs: {
    raw: string;
    cooked: string;
    what: string;
    method: PreparationMethodId;
    diffPercent: { p: number; k: number; protein: number };
  }[] = [
    {
      raw: '05062',
      cooked: '05065',
      what: 'chicken breast raw vs stewed',
      method: 'boil-drain',
      // P 174.3 vs 165 (+5.6%), K 238.6 vs 187 (+27.6%), protein 23.67 vs 28.98 (-18.3%)
      diffPercent: { p: 5.6, k: 27.6, protein: -18.3 },
    },
    {
      raw: '11352',
      cooked: '11367',
      what: 'potato raw (flesh and skin) vs boiled without skin',
      method: 'boil-drain',
      // P 57 x 0.65 = 37.1 vs 40 (-7.4%), K 425 x 0.65 = 276.3 vs 328 (-15.8%),
      // protein 2.05 x 0.95 = 1.95 vs 1.71 (+13.9%)
      diffPercent: { p: -7.4, k: -15.8, protein: 13.9 },
    },
    {
      raw: '16027',
      cooked: '16028',
      what: 'kidney beans raw vs boiled',
      method: 'boil-drain',
      // 100 g cooked = 40 g dry: P 407 x 0.4 x 0.85 = 138.4 vs 138 (+0.3%)
      diffPercent: { p: 0.3, k: -2.8, protein: 3.3 },
    },
    {
      raw: '20120',
      cooked: '20121',
      what: 'pasta dry vs cooked',
      method: 'boil-drain',
      // 100 g cooked = 41.67 g dry: P 189 x 0.4167 x 0.93 = 73.2 vs 58 (+26.3%)
      diffPercent: { p: 26.3, k: 47.8, protein: -9.1 },
    },
    {
      raw: '20044',
      cooked: '20045',
      what: 'rice raw vs cooked',
      method: 'boil-drain',
      // 100 g cooked = 35.71 g raw: P 115 x 0.3571 x 0.77 = 31.6 vs 43 (-26.5%)
      diffPercent: { p: -26.5, k: -17.9, protein: -8.2 },
    },
  ];
  for (const c of pairs) {
    it.skipIf(skip)(name(c.what), () => {
      const [raw, cooked] = sr28Foods(c.raw, c.cooked) as [Food, Food];
      const a = applicability(raw, c.method);
      if (!a.ok) throw new Error(a.reason);
      // The cooked entry takes no second factor.
      expect(applicability(cooked, c.method).ok).toBe(false);
      const x = prepareAmounts(
        raw,
        profileFood(raw, FRACTIONS),
        FRACTIONS,
        100,
        'plate',
        c.method,
        a,
      );
      const diff = (v: number | undefined, ref: number | null) =>
        Math.round((((v ?? 0) - (ref ?? 0)) / (ref ?? 1)) * 1000) / 10;
      expect({
        p: diff(x.phosphorusMg?.typical, cooked.per100g.phosphorusMg),
        k: diff(x.potassiumMg?.typical, cooked.per100g.potassiumMg),
        protein: diff(x.proteinG?.typical, cooked.per100g.proteinG),
      }).toEqual(c.diffPercent);
      // SR28's cooked phosphorus lies inside the product's low-high range.
      expect(x.phosphorusMg?.low).toBeLessThanOrEqual(cooked.per100g.phosphorusMg ?? 0);
      expect(x.phosphorusMg?.high).toBeGreaterThanOrEqual(cooked.per100g.phosphorusMg ?? 0);
    });
  }
});
