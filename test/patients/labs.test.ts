import { describe, expect, it } from 'vitest';
import { convertLab, mgPerDlPerMmolPerL, toMgPerDl, toMmolPerL } from '../../src/patients/labs.js';
import { labResultInputSchema } from '../../src/patients/patient.js';

describe('serum unit conversions (IUPAC standard atomic weights: P 30.974, Ca 40.078 g/mol)', () => {
  it('uses 1 mmol/L phosphate = 3.097 mg/dL and 1 mmol/L calcium = 4.008 mg/dL', () => {
    // 30.974 mg per mmol / 10 dL per L = 3.0974 mg/dL per mmol/L
    expect(mgPerDlPerMmolPerL('phosphate')).toBeCloseTo(3.0974, 4);
    // 40.078 / 10 = 4.0078
    expect(mgPerDlPerMmolPerL('calcium')).toBeCloseTo(4.0078, 4);
    // SI conversion table (elephantcare.org): 1 mg/dL P = 0.3229 mmol/L; 1 mg/dL Ca = 0.2495 mmol/L
    expect(toMmolPerL('phosphate', 1, 'mg/dL')).toBeCloseTo(0.3229, 4);
    expect(toMmolPerL('calcium', 1, 'mg/dL')).toBeCloseTo(0.2495, 4);
  });

  it('reproduces the thresholds KDOQI 2003 prints in both units', () => {
    // KDOQI 2003 Guideline 4.1: 4.6 mg/dL = 1.49 mmol/L; 5.5 mg/dL = 1.78 mmol/L
    // 4.6 / 3.0974 = 1.4851 -> 1.49; 5.5 / 3.0974 = 1.7757 -> 1.78
    expect(toMmolPerL('phosphate', 4.6, 'mg/dL')).toBeCloseTo(1.49, 2);
    expect(toMmolPerL('phosphate', 5.5, 'mg/dL')).toBeCloseTo(1.78, 2);
    // KDOQI 2003 Guideline 5: calcium 10.2 mg/dL = 2.54 mmol/L; 10.2 / 4.0078 = 2.545 -> 2.54 as printed (truncated)
    expect(toMmolPerL('calcium', 10.2, 'mg/dL')).toBeCloseTo(2.545, 3);
    // 1.78 mmol/L x 3.0974 = 5.513 mg/dL
    expect(toMgPerDl('phosphate', 1.78, 'mmol/L')).toBeCloseTo(5.513, 3);
    expect(convertLab('phosphate', 1.78, 'mmol/L')).toEqual({ mgPerDl: 5.51, mmolPerL: 1.78 });
  });

  it('refuses implausible values with a message naming the unit (common practice bounds)', () => {
    // 5.5 entered as mmol/L = 17.0 mg/dL: still inside 0.3-20, so accepted
    expect(
      labResultInputSchema.safeParse({
        analyte: 'phosphate',
        value: 5.5,
        unit: 'mmol/L',
        date: '2026-02-01',
      }).success,
    ).toBe(true);
    // 9 mmol/L calcium = 36.1 mg/dL: a unit mix-up
    const bad = labResultInputSchema.safeParse({
      analyte: 'calcium',
      value: 9,
      unit: 'mmol/L',
      date: '2026-02-01',
    });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.path).toEqual(['value']);
    expect(bad.error?.issues[0]?.message).toMatch(/outside 2-20 mg\/dL/);
    const badDate = labResultInputSchema.safeParse({
      analyte: 'calcium',
      value: 9,
      unit: 'mg/dL',
      date: '2026-02-30',
    });
    expect(badDate.error?.issues[0]?.path).toEqual(['date']);
  });
});
