import { describe, expect, it } from 'vitest';
import { buildDiaryReport } from '../../src/diary/findings.js';
import { diaryReportView } from '../../src/diary/report-view.js';
import { buildHandoutViewModel } from '../../src/handouts/view-model.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { computeTargets, type TargetInputs } from '../../src/patients/targets.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { occasion, oneDayPlan } from '../helpers/plan.js';
import { testFood } from '../helpers/food.js';

const langs = loadCataloguesOrThrow();
const settings = { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS };
// Invented test food: 20 g protein per 100 g
const food = testFood({
  id: 1,
  group: 'Poultry Products',
  per100g: { phosphorusMg: 200, proteinG: 20, potassiumMg: 250 },
});
const patient = (p: Partial<TargetInputs>): TargetInputs => ({
  weightKg: 70,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  targetOverrides: {},
  ...p,
});
function summary(inputs: TargetInputs, grams: number) {
  return summarizePlan(
    oneDayPlan([occasion('Lunch', 'meal', [[1, grams]])]),
    new Map([[1, food]]),
    computeTargets(inputs),
    settings,
  );
}
const clinic = { name: 'Demo clinic (invented)', contact: '', dietitianName: '' };
function handoutLines(s: ReturnType<typeof summary>) {
  const r = buildHandoutViewModel(
    s,
    { label: 'P' },
    clinic,
    'en',
    langs.bundle('en'),
    '2026-12-06',
  );
  if (!r.ok) throw new Error('incomplete');
  return r.value.cautions.lines;
}

describe('cautions dietitians expect (summary, handout, diary report)', () => {
  it('dialysis with protein under target: potassium, malnutrition and additive variability', () => {
    // KDOQI 2020 hemodialysis 1.0-1.2 g/kg x 70 kg = 70-84 g; 100 g x 20 g/100 g = 20 g: below
    const s = summary(patient({ ckdStage: '5', dialysis: 'hemodialysis' }), 100);
    expect(s.cautions?.map((c) => c.code)).toEqual([
      'potassium-dialysis',
      'protein-below-target',
      'additive-variability',
    ]);
    expect(s.cautions?.find((c) => c.code === 'additive-variability')?.source).toMatch(
      /Sherman RA, Mehta O, CJASN 2009;4:1370/,
    );
    const lines = handoutLines(s);
    expect(lines).toContain(
      'Added phosphate differs between brands and is often not on the label.',
    );
    expect(lines).toContain(
      'Some foods, especially fruit, vegetables, beans and nuts, are high in potassium. Ask your care team how much potassium is right for you.',
    );
    expect(lines).toContain(
      'Do not eat less protein to lower phosphorus unless your care team tells you to.',
    );
  });

  it('CKD 4 with protein within target: only the additive caution', () => {
    // KDOQI 2020 CKD 4: 0.55-0.60 g/kg x 70 kg = 38.5-42 g; 200 g x 20 g/100 g = 40 g: within
    const s = summary(patient({}), 200);
    expect(s.cautions?.map((c) => c.code)).toEqual(['additive-variability']);
    const lines = handoutLines(s);
    expect(lines.some((l) => /potassium/.test(l))).toBe(false);
    expect(lines.some((l) => /less protein/.test(l))).toBe(false);
  });

  it('the diary report carries the same cautions for a dialysis patient', () => {
    const report = buildDiaryReport({
      entries: [],
      matches: new Map(),
      settings,
      targets: computeTargets(patient({ ckdStage: '5', dialysis: 'peritoneal-dialysis' })),
      targetsSource: 'patient',
      skipped: [],
      notes: [],
    });
    expect(report.cautions?.map((c) => c.code)).toEqual([
      'potassium-dialysis',
      'additive-variability',
    ]);
    const view = diaryReportView(
      { ...report, days: report.days.map((d) => ({ ...d, swaps: [] })) },
      { id: 1, patientLabel: null, generatedAt: '2026-12-06T00:00:00Z' },
    );
    expect(view.cautions.some((c) => c.startsWith('On dialysis, potassium builds up'))).toBe(true);
    expect(view.cautions.some((c) => c.startsWith('Additive phosphorus varies by brand'))).toBe(
      true,
    );
  });
});
