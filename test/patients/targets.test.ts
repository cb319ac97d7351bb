import { describe, expect, it } from 'vitest';
import { patientInputSchema } from '../../src/patients/patient.js';
import { computeTargets } from '../../src/patients/targets.js';

const base = { weightKg: 70, targetOverrides: {} } as const;

describe('protein targets against KDOQI 2020 (Ikizler TA et al., Am J Kidney Dis 2020;76(3 Suppl 1))', () => {
  it('CKD 4 not on dialysis, no diabetes: 0.55-0.60 g/kg/day', () => {
    const t = computeTargets({ ...base, ckdStage: '4', dialysis: 'none', diabetes: false });
    // 0.55 x 70 = 38.5 g; 0.60 x 70 = 42.0 g
    expect(t.proteinG).toMatchObject({ min: 38.5, max: 42, setBy: 'default' });
    expect(t.proteinG.perKg).toEqual({ min: 0.55, max: 0.6, unit: 'g/kg/day' });
    expect(t.proteinG.source).toMatch(/KDOQI .*2020/);
  });

  it('CKD 3b not on dialysis with diabetes: 0.6-0.8 g/kg/day', () => {
    const t = computeTargets({
      ...base,
      weightKg: 82.5,
      ckdStage: '3b',
      dialysis: 'none',
      diabetes: true,
    });
    // 0.6 x 82.5 = 49.5 g; 0.8 x 82.5 = 66.0 g
    expect([t.proteinG.min, t.proteinG.max]).toEqual([49.5, 66]);
  });

  it('hemodialysis or peritoneal dialysis, with or without diabetes: 1.0-1.2 g/kg/day', () => {
    for (const dialysis of ['hemodialysis', 'peritoneal-dialysis'] as const) {
      for (const diabetes of [false, true]) {
        const t = computeTargets({ ...base, weightKg: 58, ckdStage: '5', dialysis, diabetes });
        // 1.0 x 58 = 58.0 g; 1.2 x 58 = 69.6 g
        expect([t.proteinG.min, t.proteinG.max]).toEqual([58, 69.6]);
      }
    }
  });
});

describe('other defaults and overrides', () => {
  it('energy 25-35 kcal/kg (KDOQI 2020), sodium < 2.3 g (KDOQI 2020), phosphorus 800-1,000 mg offered (KDOQI 2003) with raised phosphate, potassium unset', () => {
    const t = computeTargets({
      ...base,
      ckdStage: '4',
      dialysis: 'none',
      diabetes: false,
      // invented demo result: 5.0 mg/dL > 4.6 mg/dL (KDOQI 2003 Guideline 4.1, CKD 3-4)
      labs: [{ analyte: 'phosphate', value: 5.0, unit: 'mg/dL', date: '2026-03-01' }],
    });
    // 25 x 70 = 1,750 kcal; 35 x 70 = 2,450 kcal
    expect([t.energyKcal.min, t.energyKcal.max]).toEqual([1750, 2450]);
    expect(t.sodiumMg).toMatchObject({ min: null, max: 2300 });
    expect(t.phosphorusMg).toMatchObject({ min: 800, max: 1000, setBy: 'default' });
    expect(t.phosphorusMg.source).toMatch(/2003/);
    expect(t.phosphorusMg.note).toMatch(/KDOQI 2020 gives no mg\/day figure/);
    expect(t.potassiumMg).toMatchObject({ min: null, max: null, setBy: 'unset' });
  });

  it('an override replaces the value and keeps the default and its source visible', () => {
    const t = computeTargets({
      ...base,
      ckdStage: '5',
      dialysis: 'hemodialysis',
      diabetes: false,
      // invented demo result: 1.94 mmol/L x 3.0974 = 6.01 mg/dL > 5.5 mg/dL (KDOQI 2003, CKD 5)
      labs: [{ analyte: 'phosphate', value: 1.94, unit: 'mmol/L', date: '2026-03-01' }],
      targetOverrides: {
        phosphorusMg: { min: null, max: 900 },
        potassiumMg: { min: null, max: 2500 },
      },
    });
    expect(t.phosphorusMg).toMatchObject({
      min: null,
      max: 900,
      setBy: 'dietitian',
      defaultValue: { min: 800, max: 1000 },
    });
    expect(t.phosphorusMg.source).toMatch(/2003/);
    // hemodialysis offers 2,737 mg (EBPG 2007: 70 mmol x 39.098 mg/mmol); the override keeps it visible
    expect(t.potassiumMg).toMatchObject({
      max: 2500,
      setBy: 'dietitian',
      defaultValue: { min: null, max: 2737 },
    });
  });
});

describe('patient validation (bad input names the field)', () => {
  const good = { label: 'A-17', weightKg: 70, ckdStage: '4', diabetes: false };

  it('accepts a minimal record with defaults', () => {
    const r = patientInputSchema.safeParse(good);
    expect(r.success).toBe(true);
    expect(r.data).toMatchObject({ dialysis: 'none', language: 'en', name: null, labs: [] });
  });

  it('weight outside 20-300 kg', () => {
    for (const weightKg of [19.9, 300.1]) {
      const r = patientInputSchema.safeParse({ ...good, weightKg });
      expect(r.error?.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
        ['weightKg', 'weightKg must be between 20 and 300 kg'],
      ]);
    }
  });

  it('stage 3b on hemodialysis is a conflict named on ckdStage', () => {
    const r = patientInputSchema.safeParse({ ...good, ckdStage: '3b', dialysis: 'hemodialysis' });
    expect(r.error?.issues[0]?.path).toEqual(['ckdStage']);
    expect(r.error?.issues[0]?.message).toMatch(/conflicts with dialysis 'hemodialysis'/);
  });
});
