import { describe, expect, it } from 'vitest';
import {
  absorbableMg,
  absorptionFractionsSchema,
  DEFAULT_ABSORPTION_FRACTIONS,
} from '../../src/phosphorus/absorption.js';
import {
  RATIO_BANDS,
  phosphorusProteinRatioMgPerG,
  ratioBandFor,
} from '../../src/phosphorus/ratio.js';
import { PHYTIC_ACID_P_FRACTION, phytatePhosphorusMg } from '../../src/phosphorus/phytate.js';

describe('default absorption fractions against the published ranges', () => {
  it('animal organic 40-60% (Kalantar-Zadeh 2010; Ren Replace Ther 2017 Table 1)', () => {
    expect(DEFAULT_ABSORPTION_FRACTIONS.animalOrganic).toEqual({
      low: 0.4,
      typical: 0.5,
      high: 0.6,
    });
  });
  it('additive 80-90% as free orthophosphate (EFSA 2019), up to 100%', () => {
    expect(DEFAULT_ABSORPTION_FRACTIONS.additive.low).toBe(0.8);
    expect(DEFAULT_ABSORPTION_FRACTIONS.additive.typical).toBe(0.9);
    expect(DEFAULT_ABSORPTION_FRACTIONS.additive.high).toBe(1);
  });
  it('phytate and non-phytate plant P give 20-40% for phytate-rich plant foods (Ren Replace Ther 2017)', () => {
    // 46-73% phytate (Matyka 1993): typical = share x 0.10 + (1 - share) x 0.50
    for (const share of [0.46, 0.6, 0.73]) {
      const f = DEFAULT_ABSORPTION_FRACTIONS;
      const typical = share * f.phytate.typical + (1 - share) * f.plantOrganic.typical;
      expect(typical).toBeGreaterThanOrEqual(0.2);
      expect(typical).toBeLessThanOrEqual(0.4);
    }
  });
  it('the defaults pass their own schema', () => {
    expect(absorptionFractionsSchema.safeParse(DEFAULT_ABSORPTION_FRACTIONS).success).toBe(true);
  });
});

describe('absorption settings validation (0-1, low <= typical <= high)', () => {
  const good = structuredClone(DEFAULT_ABSORPTION_FRACTIONS);
  it.each([
    ['above 1', { ...good, additive: { low: 0.9, typical: 1, high: 1.1 } }],
    ['below 0', { ...good, phytate: { low: -0.1, typical: 0.1, high: 0.2 } }],
    ['out of order', { ...good, animalOrganic: { low: 0.6, typical: 0.5, high: 0.7 } }],
    ['missing a source', { animalOrganic: good.animalOrganic }],
    ['unknown field', { ...good, extra: { low: 0, typical: 0, high: 0 } }],
    ['text', { ...good, unknown: { low: '0.4', typical: 0.6, high: 0.8 } }],
  ])('refuses %s', (_why, value) => {
    expect(absorptionFractionsSchema.safeParse(value).success).toBe(false);
  });
});

describe('absorbable mg = sum of mg x fraction', () => {
  it('adds each source at each end of the range (worked)', () => {
    const a = absorbableMg({
      animalOrganicMg: 100,
      plantNonPhytateMg: 50,
      phytateMg: 40,
      additiveMg: 30,
      unknownMg: 10,
    });
    // low: 100 x 0.4 + 50 x 0.4 + 40 x 0 + 30 x 0.8 + 10 x 0.4 = 40 + 20 + 0 + 24 + 4 = 88
    expect(a.low).toBeCloseTo(88, 9);
    // typical: 50 + 25 + 4 + 27 + 6 = 112
    expect(a.typical).toBeCloseTo(112, 9);
    // high: 60 + 30 + 10 + 30 + 8 = 138
    expect(a.high).toBeCloseTo(138, 9);
  });
});

describe('phosphorus-to-protein ratio bands (Noori 2010 categories)', () => {
  it('puts the cut points at 12, 14 and 16 mg/g', () => {
    expect(RATIO_BANDS.map((b) => b.fromMgPerG)).toEqual([0, 12, 14, 16]);
    expect(ratioBandFor(11.99).id).toBe('below-12');
    expect(ratioBandFor(12).id).toBe('12-to-14');
    expect(ratioBandFor(15.99).id).toBe('14-to-16');
    expect(ratioBandFor(16).id).toBe('16-or-more');
    expect(RATIO_BANDS[0]?.note).toMatch(/convention/);
  });
  it('is undefined without protein, not infinite', () => {
    expect(phosphorusProteinRatioMgPerG(10, 0)).toBeNull();
    expect(phosphorusProteinRatioMgPerG(10, null)).toBeNull();
    expect(phosphorusProteinRatioMgPerG(455, 22.87)).toBeCloseTo(19.895, 3);
  });
  it('phytate P fraction is computed from C6H18O24P6 (about 28.2%)', () => {
    expect(PHYTIC_ACID_P_FRACTION).toBeCloseTo(0.2816, 4);
    // 1,000 mg phytic acid x 0.28157 = 281.6 mg P
    expect(phytatePhosphorusMg(1000)).toBeCloseTo(281.57, 1);
  });
});
