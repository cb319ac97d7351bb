import { describe, expect, it } from 'vitest';
import { latestLabs } from '../../src/patients/labs.js';
import { computeTargets, type TargetInputs } from '../../src/patients/targets.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { occasion, oneDayPlan } from '../helpers/plan.js';
import { testFood } from '../helpers/food.js';

// All lab values below are invented demo data; thresholds name their guideline.
const lab = (analyte: string, value: number, unit: string, date = '2026-11-30') => ({
  analyte,
  value,
  unit,
  date,
});
const ckd4 = (labs: NonNullable<TargetInputs['labs']>): TargetInputs => ({
  weightKg: 70,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  targetOverrides: {},
  labs,
});

describe('phosphorus default follows the latest phosphate and the stage (KDOQI 2003 Guideline 4.1)', () => {
  it('CKD 4 with normal phosphate: no restriction by default, with the reason shown', () => {
    // 3.8 mg/dL is not above 4.6 mg/dL (KDOQI 2003 4.1, CKD 3-4)
    const t = computeTargets(ckd4([lab('phosphate', 3.8, 'mg/dL')]));
    expect(t.phosphorusMg).toMatchObject({ min: null, max: null, setBy: 'unset' });
    expect(t.phosphorusMg.note).toBe(
      'No phosphorus restriction by default: the latest serum phosphate, 3.8 mg/dL on 2026-11-30, is not above 4.6 mg/dL for CKD 4. Set by the dietitian if needed.',
    );
    // ...and a day well over 1,000 mg is not flagged "above target"
    const food = testFood({
      id: 1,
      group: 'Dairy and Egg Products',
      per100g: { phosphorusMg: 500, proteinG: 25 },
    });
    const s = summarizePlan(
      oneDayPlan([occasion('Lunch', 'meal', [[1, 300]])]),
      new Map([[1, food]]),
      t,
      { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
    );
    const p = s.days[0]?.status.checks.find((c) => c.target === 'phosphorusMg');
    expect(p?.value).toBe(1500); // 300 g x 500 mg/100 g
    expect(p?.status).toBe('not-set');
  });

  it('the latest result decides: an older raised result does not restrict; a raised latest one does', () => {
    const older = computeTargets(
      ckd4([
        lab('phosphate', 5.6, 'mg/dL', '2026-01-10'),
        lab('phosphate', 4.1, 'mg/dL', '2026-11-01'),
      ]),
    );
    expect(older.phosphorusMg.setBy).toBe('unset');
    // 1.62 mmol/L x 3.0974 (IUPAC P 30.974 g/mol / 10) = 5.02 mg/dL > 4.6
    const raised = computeTargets(ckd4([lab('phosphate', 1.62, 'mmol/L')]));
    expect(raised.phosphorusMg).toMatchObject({ min: 800, max: 1000, setBy: 'default' });
    expect(raised.phosphorusMg.note).toMatch(/5\.02 mg\/dL on 2026-11-30, is above 4\.6 mg\/dL/);
  });

  it('stage 5 uses 5.5 mg/dL: 5.2 does not restrict, 6.0 does; no result leaves it unset', () => {
    const hd = (labs: NonNullable<TargetInputs['labs']>) =>
      computeTargets({ ...ckd4(labs), ckdStage: '5', dialysis: 'hemodialysis' });
    expect(hd([lab('phosphate', 5.2, 'mg/dL')]).phosphorusMg.setBy).toBe('unset');
    expect(hd([lab('phosphate', 6.0, 'mg/dL')]).phosphorusMg.max).toBe(1000);
    expect(hd([]).phosphorusMg.note).toMatch(/no serum phosphate result is on record/);
  });

  it('a 100 kg dialysis patient: protein minimum x 12 mg/g exceeds the target, so a note says not to cut protein', () => {
    const t = computeTargets({
      ...ckd4([lab('phosphate', 6.5, 'mg/dL')]),
      weightKg: 100,
      ckdStage: '5',
      dialysis: 'hemodialysis',
    });
    // KDOQI 2020: 1.0 g/kg x 100 kg = 100 g; x 12 mg/g (Noori 2010 reference category floor) = 1,200 mg > 1,000 mg
    expect(t.proteinG.min).toBe(100);
    expect(t.phosphorusMg.note).toMatch(
      /Protein minimum 100 g x 12 mg\/g = 1200 mg is above the 1,000 mg target: do not meet phosphorus by cutting protein/,
    );
    // 70 kg: 70 g x 12 = 840 mg, under 1,000: no such note
    const small = computeTargets({
      ...ckd4([lab('phosphate', 6.5, 'mg/dL')]),
      ckdStage: '5',
      dialysis: 'hemodialysis',
    });
    expect(small.phosphorusMg.note).not.toMatch(/cutting protein/);
  });
});

describe('calcium targets per stage, binder calcium counted', () => {
  it('CKD 3a-4: 800-1,000 mg/day total (KDOQI 2020 6.2.1); CKD 5 and dialysis: 2,000 total, 1,500 from binders (KDOQI 2003 Guideline 5)', () => {
    for (const ckdStage of ['3a', '3b', '4'] as const) {
      const t = computeTargets({ ...ckd4([]), ckdStage });
      expect(t.calciumMg).toMatchObject({ min: 800, max: 1000, fromBindersMaxMg: null });
      expect(t.calciumMg.source).toMatch(/6\.2\.1/);
    }
    const t5 = computeTargets({ ...ckd4([]), ckdStage: '5', dialysis: 'peritoneal-dialysis' });
    expect(t5.calciumMg).toMatchObject({ min: null, max: 2000, fromBindersMaxMg: 1500 });
  });

  it('CKD 4 on calcium acetate 2 x 3 a day: binder calcium is counted against 1,000 mg', () => {
    const t = computeTargets(ckd4([]));
    // Invented food: 100 mg calcium per 100 g
    const food = testFood({
      id: 1,
      group: 'Vegetables and Vegetable Products',
      per100g: { phosphorusMg: 50, proteinG: 2, calciumMg: 100 },
    });
    const s = summarizePlan(
      oneDayPlan(
        ['Breakfast', 'Lunch', 'Dinner'].map((name) => occasion(name, 'meal', [[1, 100]])),
      ),
      new Map([[1, food]]),
      t,
      { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
      {
        ingredient: 'calcium-acetate',
        unitStrengthMg: 667,
        schedule: 'per-meal',
        units: 2,
        otherMedicines: [],
      },
    );
    // diet 3 x 100 = 300 mg; binder 6 x 169.01 mg (667 x 40.078 / 158.166, IUPAC) = 1,014.1 mg; total 1,314.1 mg
    const ca = s.days[0]?.status.checks.find((c) => c.target === 'calciumMg');
    expect(ca?.value).toBeCloseTo(1314.1, 1);
    expect(ca?.status).toBe('above');
    const codes = s.binders.days[0]?.disagreements.map((d) => d.code);
    expect(codes).toContain('calcium-total-over-limit');
    // no 1,500 mg binder-only limit exists before stage 5
    expect(codes).not.toContain('calcium-from-binders-over-limit');
    expect(s.binders.limits.source).toMatch(/KDOQI 2020 6\.2\.1/);
  });

  it('the calcium warning checks the albumin-corrected calcium (Payne 1973) where albumin exists', () => {
    // 9.8 mg/dL with albumin 2.8 g/dL: 9.8 + 0.8 x (4.0 - 2.8) = 10.76 mg/dL > 10.2 (KDOQI 2003 Guideline 5)
    const labs = latestLabs([
      lab('calcium', 9.8, 'mg/dL'),
      lab('albumin', 28, 'g/L', '2026-11-29'),
      lab('phosphate', 6.2, 'mg/dL'),
    ]);
    expect(labs.calcium).toEqual({ mgPerDl: 9.8, date: '2026-11-30', correctedMgPerDl: 10.76 });
    expect(labs.albumin).toEqual({ gPerDl: 2.8, date: '2026-11-29' });
    const inputs: TargetInputs = {
      ...ckd4([lab('calcium', 9.8, 'mg/dL'), lab('albumin', 28, 'g/L', '2026-11-29')]),
      ckdStage: '5',
      dialysis: 'hemodialysis',
    };
    expect(computeTargets(inputs).calciumMg.note).toMatch(
      /albumin-corrected calcium 10\.76 mg\/dL/,
    );
    const food = testFood({
      id: 1,
      group: 'Poultry Products',
      per100g: { phosphorusMg: 200, proteinG: 25, calciumMg: 10 },
    });
    const run = (l: typeof labs | null) =>
      summarizePlan(
        oneDayPlan([occasion('Lunch', 'meal', [[1, 150]])]),
        new Map([[1, food]]),
        computeTargets(inputs),
        { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
        {
          ingredient: 'calcium-acetate',
          unitStrengthMg: 667,
          schedule: 'per-day',
          units: 3,
          otherMedicines: [],
        },
        l,
      ).binders.days[0]?.disagreements.map((d) => d.code);
    expect(run(labs)).toContain('calcium-binder-with-high-serum-calcium');
    // measured 9.8 mg/dL without albumin is not above 10.2: no warning
    expect(run(latestLabs([lab('calcium', 9.8, 'mg/dL')]))).not.toContain(
      'calcium-binder-with-high-serum-calcium',
    );
  });
});

describe('dialysis: potassium, fluid, dialysate glucose; protein beside KDIGO 2024', () => {
  it('hemodialysis offers potassium at most 2,737 mg/day with its source; PD leaves it unset and raises attention', () => {
    const hd = computeTargets({ ...ckd4([]), ckdStage: '5', dialysis: 'hemodialysis' });
    // EBPG 2007: 70 mmol x 39.098 mg/mmol (IUPAC K) = 2,736.9 mg
    expect(hd.potassiumMg).toMatchObject({ max: 2737, setBy: 'default' });
    expect(hd.potassiumMg.source).toMatch(/Fouque D et al\., Nephrol Dial Transplant 2007/);
    const pd = computeTargets({ ...ckd4([]), ckdStage: '5', dialysis: 'peritoneal-dialysis' });
    expect(pd.potassiumMg.setBy).toBe('unset');
    expect(pd.potassiumMg.unsetAttention).toMatch(
      /No potassium target is set for a patient on dialysis/,
    );
    expect(computeTargets(ckd4([])).potassiumMg.unsetAttention).toBeUndefined();
    const food = testFood({
      id: 1,
      group: 'Fruits and Fruit Juices',
      per100g: { phosphorusMg: 20, proteinG: 1, potassiumMg: 300 },
    });
    const s = summarizePlan(
      oneDayPlan([occasion('Snack', 'snack', [[1, 100]])]),
      new Map([[1, food]]),
      pd,
      { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS },
    );
    expect(s.days[0]?.status.level).toBe('attention');
    expect(s.days[0]?.status.messages).toContain(
      'No potassium target is set for a patient on dialysis: set one with the care team.',
    );
  });

  it('fluid allowance on hemodialysis: urine output + 500 mL (common practice, no source)', () => {
    const t = computeTargets({
      ...ckd4([]),
      ckdStage: '5',
      dialysis: 'hemodialysis',
      urineOutputMlPerDay: 300,
    });
    // 300 mL + 500 mL = 800 mL/day
    expect(t.fluidMl).toMatchObject({ min: null, max: 800, unit: 'mL/day', setBy: 'default' });
    expect(t.fluidMl.source).toMatch(/common practice, no source/);
    expect(
      computeTargets({ ...ckd4([]), ckdStage: '5', dialysis: 'hemodialysis' }).fluidMl.note,
    ).toMatch(/Record the 24-h urine output/);
    expect(computeTargets(ckd4([])).fluidMl.setBy).toBe('unset');
  });

  it('peritoneal dialysate glucose energy is taken off the food energy target', () => {
    const t = computeTargets({
      ...ckd4([]),
      ckdStage: '5',
      dialysis: 'peritoneal-dialysis',
      pdDialysateGlucoseGPerDay: 150,
    });
    // 150 g x 0.6 absorbed (Grodstein 1981, from memory) x 3.4 kcal/g = 306 kcal
    // 25-35 kcal/kg x 70 kg = 1,750-2,450 kcal -> from food 1,444-2,144 kcal
    expect([t.energyKcal.min, t.energyKcal.max]).toEqual([1444, 2144]);
    expect(t.energyKcal.note).toMatch(/about 306 kcal absorbed from the dialysate/);
  });

  it('KDIGO 2024 0.8 g/kg/day is shown beside the KDOQI 2020 default, with the supervision note on 0.55-0.60', () => {
    const t = computeTargets(ckd4([]));
    // KDIGO 2024 3.3.1: 0.8 g/kg x 70 kg = 56 g
    expect(t.proteinG.alongside).toMatchObject({ min: 56, max: 56, perKg: 0.8 });
    expect(t.proteinG.alongside?.source).toMatch(/KDIGO 2024/);
    expect(t.proteinG.note).toMatch(
      /0\.55-0\.60 g\/kg\/day only in metabolically stable patients under close supervision/,
    );
    const hd = computeTargets({ ...ckd4([]), ckdStage: '5', dialysis: 'hemodialysis' });
    expect(hd.proteinG.alongside).toBeNull();
  });
});
