import { describe, expect, it } from 'vitest';
import type { BinderPrescription } from '../../src/binders/binder.js';
import {
  BINDER_CATALOGUE,
  CALCIUM_ACETATE_G_PER_MOL,
  CALCIUM_CARBONATE_G_PER_MOL,
  elementalCalciumMgPerUnit,
  pbedGPerUnit,
} from '../../src/binders/catalogue.js';
import {
  NONE_PRESCRIBED_TIMING,
  distributeBinder,
  type OccasionLoad,
} from '../../src/binders/distribution.js';

// Invented test thresholds (the clinic sets its own): none under 50 mg, point out >= 250 mg.
const thresholds = { minAbsorbableMgPerOccasion: 50, highLoadOccasionMg: 250 };
const rx = (p: Partial<BinderPrescription>): BinderPrescription => ({
  ingredient: 'sevelamer-carbonate',
  unitStrengthMg: 800,
  schedule: 'per-day',
  units: 6,
  otherMedicines: [],
  ...p,
});
const meal = (
  name: string,
  absorbableMg: number,
  kind: 'meal' | 'snack' = 'meal',
): OccasionLoad => ({
  name,
  kind,
  absorbableMg,
});

describe('elemental calcium from the formulas (IUPAC standard atomic weights)', () => {
  it('calcium acetate 667 mg = 169 mg Ca; calcium carbonate 1,250 mg = 500 mg Ca', () => {
    // Ca(C2H3O2)2: 40.078 + 4 x 12.011 + 6 x 1.008 + 4 x 15.999 = 158.166 g/mol
    expect(CALCIUM_ACETATE_G_PER_MOL).toBeCloseTo(158.166, 3);
    // 667 x 40.078 / 158.166 = 169.01 mg (US label: 169 mg elemental calcium per 667 mg)
    expect(elementalCalciumMgPerUnit('calcium-acetate', 667)).toBeCloseTo(169.01, 2);
    // CaCO3: 40.078 + 12.011 + 3 x 15.999 = 100.086 g/mol; 1,250 x 40.078 / 100.086 = 500.54 mg
    expect(CALCIUM_CARBONATE_G_PER_MOL).toBeCloseTo(100.086, 3);
    expect(elementalCalciumMgPerUnit('calcium-carbonate', 1250)).toBeCloseTo(500.54, 2);
    expect(elementalCalciumMgPerUnit('sevelamer-carbonate', 800)).toBe(0);
  });

  it('checks the day against KDOQI 2003 Guideline 5 (1,500 mg from binders, 2,000 mg total)', () => {
    // 4 x 500.54 = 2,002 mg from binders > 1,500; + 600 mg diet = 2,602 mg > 2,000
    const s = distributeBinder(
      rx({ ingredient: 'calcium-carbonate', unitStrengthMg: 1250, units: 4 }),
      [meal('Breakfast', 150), meal('Lunch', 300), meal('Dinner', 300)],
      thresholds,
      600,
    );
    expect(s.elementalCalciumMgFromBinders).toBeCloseTo(2002.18, 2);
    expect(s.elementalCalciumMgTotal).toBeCloseTo(2602.18, 2);
    expect(s.disagreements.map((d) => d.code)).toEqual([
      'calcium-from-binders-over-limit',
      'calcium-total-over-limit',
    ]);
    // 2 with each of 3 meals of calcium acetate 667 mg: 6 x 169.01 = 1,014 mg, + 700 diet = 1,714: within both
    const ok = distributeBinder(
      rx({ ingredient: 'calcium-acetate', unitStrengthMg: 667, schedule: 'per-meal', units: 2 }),
      [meal('Breakfast', 150), meal('Lunch', 300), meal('Dinner', 300)],
      thresholds,
      700,
    );
    expect(ok.elementalCalciumMgFromBinders).toBeCloseTo(1014.07, 2);
    expect(ok.disagreements).toEqual([]);
  });
});

describe('phosphate-binder equivalent dose (Daugirdas JT et al., Semin Dial 2011)', () => {
  it('grams of calcium carbonate per unit', () => {
    // sevelamer 0.8 g x 0.75 = 0.60 g; lanthanum 1.0 g elemental x 2.0 = 2.0 g; acetate 0.667 x 1.0
    expect(pbedGPerUnit('sevelamer-carbonate', 800)).toBeCloseTo(0.6, 6);
    expect(pbedGPerUnit('lanthanum-carbonate', 1000)).toBeCloseTo(2.0, 6);
    expect(pbedGPerUnit('calcium-acetate', 667)).toBeCloseTo(0.667, 6);
    // not published for iron-based binders in that paper
    expect(pbedGPerUnit('ferric-citrate', 1000)).toBeNull();
    expect(BINDER_CATALOGUE['aluminium-hydroxide'].warnings[0]).toMatch(/KDIGO/);
  });
});

describe('distribution by largest remainder (worked examples, invented loads)', () => {
  it('6 units over 120/300/30/250 mg with the snack under the threshold', () => {
    const s = distributeBinder(
      rx({ units: 6 }),
      [meal('Breakfast', 120), meal('Lunch', 300), meal('Snack', 30, 'snack'), meal('Dinner', 250)],
      thresholds,
      500,
    );
    // eligible total 120 + 300 + 250 = 670 mg
    // shares: 6 x 120/670 = 1.075, 6 x 300/670 = 2.687, 6 x 250/670 = 2.239; floors 1 + 2 + 2 = 5
    // 1 unit left -> largest remainder 0.687 (Lunch)
    expect(s.occasions.map((o) => o.units)).toEqual([1, 3, 0, 2]);
    expect(s.occasions.map((o) => o.exactShare)).toEqual([1.07, 2.69, null, 2.24]);
    expect(s.distributedUnits).toBe(6);
    expect(s.occasions[2]?.reason).toMatch(/30 mg .* under the clinic threshold of 50 mg/);
    expect(s.occasions[1]?.reason).toMatch(/remaining units/);
    // never "not needed": the patient is sent to the care team
    expect(s.occasions[2]?.timing).toBe(NONE_PRESCRIBED_TIMING);
    expect(s.occasions[2]?.timing).not.toMatch(/not needed|no binder needed/i);
    expect(s.occasions[0]?.timing).toMatch(/Swallow tablets whole/);
    // 6 x 0.6 g = 3.6 g calcium-carbonate equivalent
    expect(s.pbedGPerDay).toBeCloseTo(3.6, 6);
  });

  it('equal remainders and equal loads: the earlier occasion wins', () => {
    // 3 x 200/400 = 1.5 each; floors 1 + 1; the 1 left goes to the first
    const s = distributeBinder(
      rx({ units: 3 }),
      [meal('Lunch', 200), meal('Dinner', 200)],
      thresholds,
      0,
    );
    expect(s.occasions.map((o) => o.units)).toEqual([2, 1]);
  });

  it('equal remainders, different loads: the larger load wins', () => {
    // 2 x 100/400 = 0.5, 2 x 300/400 = 1.5; floors 0 + 1; remainders tie at 0.5 -> 300 mg occasion
    const s = distributeBinder(
      rx({ units: 2 }),
      [meal('Breakfast', 100), meal('Dinner', 300)],
      thresholds,
      0,
    );
    expect(s.occasions.map((o) => o.units)).toEqual([0, 2]);
  });

  it('fewer units than eligible occasions never exceeds the prescription and names the unbound high load', () => {
    // 1 x 260/780 = 0.333 each (three equal 260 mg meals): the one unit goes to the first
    const s = distributeBinder(
      rx({ units: 1 }),
      [meal('Breakfast', 260), meal('Lunch', 260), meal('Dinner', 260)],
      thresholds,
      0,
    );
    expect(s.occasions.map((o) => o.units)).toEqual([1, 0, 0]);
    expect(
      s.disagreements.filter((d) => d.code === 'high-load-no-binder').map((d) => d.occasion),
    ).toEqual(['Lunch', 'Dinner']);
  });

  it('no occasion over the threshold: the meals share the whole prescription, said plainly', () => {
    // Only one meal (Breakfast 20 mg): all 3 units go to it; the snack gets none.
    const s = distributeBinder(
      rx({ units: 3 }),
      [meal('Breakfast', 20), meal('Snack', 40, 'snack')],
      thresholds,
      0,
    );
    expect(s.distributedUnits).toBe(3);
    expect(s.occasions.map((o) => o.units)).toEqual([3, 0]);
    expect(s.disagreements[0]?.code).toBe('no-occasion-over-threshold');
    // Two meals of 10 and 30 mg: 4 x 10/40 = 1, 4 x 30/40 = 3
    const two = distributeBinder(
      rx({ units: 4 }),
      [meal('Breakfast', 10), meal('Dinner', 30)],
      thresholds,
      0,
    );
    expect(two.occasions.map((o) => o.units)).toEqual([1, 3]);
  });

  it('per-meal prescriptions: every meal gets the prescribed units, a low meal is pointed out to the clinician', () => {
    const s = distributeBinder(
      rx({
        ingredient: 'lanthanum-carbonate',
        unitStrengthMg: 500,
        schedule: 'per-meal',
        units: 1,
      }),
      [meal('Breakfast', 40), meal('Lunch', 200), meal('Snack', 300, 'snack'), meal('Dinner', 210)],
      thresholds,
      0,
    );
    expect(s.prescribedUnits).toBe(3); // 1 with each of 3 meals
    // "1 with each meal" is given whole with Breakfast too, although it carries only 40 mg
    expect(s.occasions.map((o) => o.units)).toEqual([1, 1, 0, 1]);
    expect(s.distributedUnits).toBe(3);
    expect(s.occasions[1]?.timing).toMatch(/Chew or crush/);
    expect(s.disagreements.map((d) => [d.code, d.occasion])).toEqual([
      ['meal-under-threshold', 'Breakfast'],
      ['high-load-no-binder', 'Snack'],
    ]);
  });

  it('more binder than load: the estimated binding exceeds the occasion', () => {
    // 3 x 0.6 g PBED x 37.7 mg/g (Schiller 1989: 166 mg / 4.4 g) = 67.9 mg > 60 mg absorbable
    const s = distributeBinder(rx({ units: 3 }), [meal('Breakfast', 60)], thresholds, 0);
    expect(s.disagreements.map((d) => d.code)).toEqual(['binder-exceeds-load']);
    expect(s.disagreements[0]?.message).toMatch(/about 68 mg/);
  });
});
