import { describe, expect, it } from 'vitest';
import { ANALYTES, ANALYTE_BY_LOINC, ANALYTE_DEFINITIONS } from '../../src/patients/analytes.js';
import {
  convertBetween,
  correctedCalciumMgPerDl,
  toCanonical,
} from '../../src/patients/lab-units.js';
import { labResultInputSchema } from '../../src/patients/lab-results.js';

function canonical(analyte: Parameters<typeof toCanonical>[0], value: number, unit: string) {
  const c = toCanonical(analyte, value, unit);
  if (!c.ok) throw new Error(c.reason);
  return c;
}

describe('serum unit conversions through UCUM (@lhncbc/ucum-lhc) with IUPAC atomic weights', () => {
  it('phosphate and calcium: mg/dL = mmol/L x g/mol / 10 (IUPAC 2021: P 30.974, Ca 40.078)', () => {
    // 1 mmol/L x 30.974 mg/mmol / 10 dL/L = 3.0974 mg/dL
    expect(canonical('phosphate', 1, 'mmol/L').canonicalValue).toBeCloseTo(3.0974, 4);
    // 2.2 mmol/L x 4.0078 = 8.81716 mg/dL
    expect(canonical('calcium', 2.2, 'mmol/L').canonicalValue).toBeCloseTo(8.81716, 4);
    // Ca2+: 5 mEq/L = 2.5 mmol/L = 2.5 x 4.0078 = 10.0195 mg/dL
    expect(canonical('calcium', 5, 'mEq/L').canonicalValue).toBeCloseTo(10.0195, 3);
    // SI table factor 1 mg/dL P = 0.3229 mmol/L: 1 / 3.0974 = 0.32285
    expect(convertBetween('phosphate', 1, 'mg/dL', 'mmol/L')).toBeCloseTo(0.3229, 4);
    // KDOQI 2003 Guideline 4.1 prints 5.5 mg/dL = 1.78 mmol/L: 5.5 / 3.0974 = 1.7757
    expect(convertBetween('phosphate', 5.5, 'mg/dL', 'mmol/L')).toBeCloseTo(1.78, 2);
    expect(canonical('phosphate', 5.8, 'mg/dL')).toMatchObject({
      canonicalValue: 5.8,
      canonicalUnit: 'mg/dL',
    });
  });

  it('PTH: 1 pg/mL = 0.106 pmol/L (stated, PTH(1-84) 9425 g/mol)', () => {
    // 1e-9 g/L / 9425 g/mol = 1.061e-13 mol/L = 0.1061 pmol/L
    expect(convertBetween('pth', 1, 'pg/mL', 'pmol/L')).toBeCloseTo(0.106, 3);
    // 42 pmol/L x 9.425 = 395.85 pg/mL
    expect(canonical('pth', 42, 'pmol/L').canonicalValue).toBeCloseTo(395.85, 1);
    // ng/L is pg/mL
    expect(canonical('pth', 300, 'ng/L').canonicalValue).toBeCloseTo(300, 6);
  });

  it('albumin g/L to g/dL, potassium and bicarbonate mEq/L = mmol/L (charge 1)', () => {
    expect(canonical('albumin', 35, 'g/L').canonicalValue).toBeCloseTo(3.5, 6); // 35 g/L / 10
    expect(canonical('potassium', 5.1, 'mEq/L').canonicalValue).toBeCloseTo(5.1, 6);
    expect(canonical('potassium', 5.1, 'meq/L').canonicalValue).toBeCloseTo(5.1, 6); // UCUM code
    expect(canonical('bicarbonate', 21, 'mEq/L').canonicalValue).toBeCloseTo(21, 6);
  });

  it('25-OH vitamin D: molar mass of C27H44O2 from IUPAC atomic weights', () => {
    // 27 x 12.011 + 44 x 1.008 + 2 x 15.999 = 324.297 + 44.352 + 31.998 = 400.647 g/mol
    expect(ANALYTE_DEFINITIONS['vitamin-d-25oh'].molarMass?.gPerMol).toBeCloseTo(400.647, 3);
    // 50 nmol/L x 400.647 ng/nmol / 1000 mL/L = 20.03 ng/mL
    expect(canonical('vitamin-d-25oh', 50, 'nmol/L').canonicalValue).toBeCloseTo(20.03, 2);
    // 1 ng/mL = 1000 / 400.647 = 2.496 nmol/L (the factor labs print)
    expect(convertBetween('vitamin-d-25oh', 1, 'ng/mL', 'nmol/L')).toBeCloseTo(2.496, 3);
  });

  it('refuses implausible values and units an analyte does not take, saying why', () => {
    // 9 mmol/L calcium = 36.07 mg/dL: a unit mix-up (bounds: common practice, no source)
    const bad = toCanonical('calcium', 9, 'mmol/L');
    expect(bad).toEqual({
      ok: false,
      reason: 'calcium 9 mmol/L (36.1 mg/dL) is outside 2-20 mg/dL: check the value and its unit',
    });
    const unit = toCanonical('potassium', 5, 'mg/dL');
    expect(unit.ok).toBe(false);
    expect(!unit.ok && unit.reason).toBe(
      "unit 'mg/dL' is not taken for potassium: use mmol/L, mEq/L",
    );
    expect(toCanonical('phosphate', -1, 'mg/dL').ok).toBe(false);
    const parsed = labResultInputSchema.safeParse({
      analyte: 'pth',
      value: 90000,
      unit: 'pg/mL',
      date: '2026-02-01',
    });
    expect(parsed.error?.issues[0]).toMatchObject({ path: ['value'] });
    expect(
      labResultInputSchema.safeParse({
        analyte: 'urea',
        value: 5,
        unit: 'mmol/L',
        date: '2026-02-01',
      }).success,
    ).toBe(false);
  });

  it('maps every catalogue LOINC code back to its analyte', () => {
    // LOINC: 2777-1 phosphate, 17861-6 calcium, 2731-8 PTH intact, 1751-7 albumin,
    // 2823-3 potassium, 1963-8 bicarbonate, 1989-3 25-OH vitamin D3
    expect(
      ['2777-1', '17861-6', '2731-8', '1751-7', '2823-3', '1963-8', '1989-3'].map((c) =>
        ANALYTE_BY_LOINC.get(c),
      ),
    ).toEqual([...ANALYTES]);
  });
});

describe('albumin-corrected calcium (Payne RB et al., BMJ 1973;4:643-646)', () => {
  it('adds 0.8 mg/dL per g/dL of albumin below 4.0 g/dL', () => {
    // Worked example of the published formula: total Ca 8.0 mg/dL, albumin 2.5 g/dL
    // corrected = 8.0 + 0.8 x (4.0 - 2.5) = 8.0 + 1.2 = 9.2 mg/dL
    expect(correctedCalciumMgPerDl(8.0, 2.5)).toBeCloseTo(9.2, 6);
    // albumin above 4.0 lowers it: 10.0 + 0.8 x (4.0 - 4.5) = 9.6
    expect(correctedCalciumMgPerDl(10.0, 4.5)).toBeCloseTo(9.6, 6);
  });

  it('agrees with the SI form, mmol/L + 0.02 x (40 - albumin g/L)', () => {
    // SI: 2.00 mmol/L, albumin 25 g/L -> 2.00 + 0.02 x 15 = 2.30 mmol/L
    // conventional: 2.00 x 4.0078 = 8.0156 mg/dL; albumin 2.5 g/dL -> 8.0156 + 1.2 = 9.2156 mg/dL
    // 9.2156 / 4.0078 = 2.2994 mmol/L, i.e. 2.30 to two decimals
    const mg = correctedCalciumMgPerDl(canonical('calcium', 2.0, 'mmol/L').canonicalValue, 2.5);
    expect(convertBetween('calcium', mg, 'mg/dL', 'mmol/L')).toBeCloseTo(2.3, 2);
  });
});
