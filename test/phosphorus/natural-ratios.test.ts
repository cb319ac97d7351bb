import { describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { NATURAL_RATIOS_MG_PER_G } from '../../src/phosphorus/natural-ratios.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { sr28Foods } from '../helpers/sr28.js';

const ratio = (f: Food): number =>
  (f.per100g.phosphorusMg as number) / (f.per100g.proteinG as number);
const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
};
const mean = (xs: number[]): number => xs.reduce((a, b) => a + b, 0) / xs.length;

describe('natural P:protein ratios recomputed from the named USDA SR28 foods', () => {
  it.skipIf(!hasSr28)(`match the constants to 0.05 mg/g ${hasSr28 ? '' : SR28_MISSING}`, () => {
    const r = (...ndb: string[]) => sr28Foods(...ndb).map(ratio);
    // cheese: median of 01009 19.9, 01040 21.3, 01026 16.0, 01032 22.1, 01018 21.4, 01019 23.7 = 21.35
    expect(
      Math.abs(
        median(r('01009', '01040', '01026', '01032', '01018', '01019')) -
          NATURAL_RATIOS_MG_PER_G.cheese.ratioMgPerG,
      ),
    ).toBeLessThan(0.06);
    // milk: mean of 01077 26.7 and 01116 27.4 = 27.0
    expect(
      Math.abs(mean(r('01077', '01116')) - NATURAL_RATIOS_MG_PER_G.milk.ratioMgPerG),
    ).toBeLessThan(0.05);
    // egg: 01123 198 / 12.56 = 15.8
    expect(Math.abs(mean(r('01123')) - NATURAL_RATIOS_MG_PER_G.egg.ratioMgPerG)).toBeLessThan(0.05);
    // legumes: median of 16070 20.0, 16057 18.96, 16028 15.9, 16108 19.29 = (18.96 + 19.29) / 2 = 19.13
    expect(
      Math.abs(
        median(r('16070', '16057', '16028', '16108')) - NATURAL_RATIOS_MG_PER_G.legume.ratioMgPerG,
      ),
    ).toBeLessThan(0.06);
    // whole grains: median of 20080 27.0, 08120 31.2, 20036 41.2 = 31.2
    expect(
      Math.abs(
        median(r('20080', '08120', '20036')) - NATURAL_RATIOS_MG_PER_G['grain-whole'].ratioMgPerG,
      ),
    ).toBeLessThan(0.05);
    // refined grains: mean of 20081 10.5 and 20445 16.0 = 13.2
    expect(
      Math.abs(mean(r('20081', '20445')) - NATURAL_RATIOS_MG_PER_G['grain-refined'].ratioMgPerG),
    ).toBeLessThan(0.05);
    expect(
      Math.abs(mean(r('12061')) - NATURAL_RATIOS_MG_PER_G['nut-seed'].ratioMgPerG),
    ).toBeLessThan(0.05);
    expect(Math.abs(mean(r('11090')) - NATURAL_RATIOS_MG_PER_G.vegetable.ratioMgPerG)).toBeLessThan(
      0.05,
    );
    expect(Math.abs(mean(r('09003')) - NATURAL_RATIOS_MG_PER_G.fruit.ratioMgPerG)).toBeLessThan(
      0.05,
    );
    expect(Math.abs(mean(r('09206')) - NATURAL_RATIOS_MG_PER_G.beverage.ratioMgPerG)).toBeLessThan(
      0.05,
    );
  });

  it.skipIf(!hasSr28)(
    `meat constant (Benini 2011, 9.3 +/- 0.7) agrees with fresh SR28 meats ${hasSr28 ? '' : SR28_MISSING}`,
    () => {
      // SR28: grass-fed strip steak 13000 9.2, chicken breast raw 05062 9.5, ground pork 10219 10.4, lamb leg 17013 9.4
      for (const x of sr28Foods('13000', '05062', '10219', '17013').map(ratio)) {
        expect(Math.abs(x - NATURAL_RATIOS_MG_PER_G.meat.ratioMgPerG)).toBeLessThan(2 * 0.7 + 0.1);
      }
    },
  );

  it('fish constant is the mean of the Kalantar-Zadeh 2010 Table 1 fish', () => {
    // cod 9.7, halibut 10.7, sockeye salmon 10.1, rainbow trout 11.0, yellowfin tuna 8.2 -> 49.7 / 5 = 9.94
    expect(NATURAL_RATIOS_MG_PER_G.fish.ratioMgPerG).toBeCloseTo(
      (9.7 + 10.7 + 10.1 + 11.0 + 8.2) / 5,
      1,
    );
  });

  it('every class names its source', () => {
    for (const [k, v] of Object.entries(NATURAL_RATIOS_MG_PER_G)) {
      expect(v.source.length, k).toBeGreaterThan(20);
      // IOM 1997: tissue P 7.8-20.1 mg per g protein in most tissues; fruit/drinks are low-protein exceptions
      expect(v.ratioMgPerG, k).toBeGreaterThan(5);
    }
  });
});
