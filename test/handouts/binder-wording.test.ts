import { describe, expect, it } from 'vitest';
import { BINDER_CATALOGUE } from '../../src/binders/catalogue.js';
import type { BinderPrescription } from '../../src/binders/binder.js';
import { BINDER_INGREDIENTS } from '../../src/binders/binder.js';
import { binderIntakeKey, buildHandoutViewModel } from '../../src/handouts/view-model.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { computeTargets } from '../../src/patients/targets.js';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import type { PlanDay } from '../../src/plans/plan.js';
import { summarizePlan } from '../../src/plans/summary.js';
import { testFood } from '../helpers/food.js';

const langs = loadCataloguesOrThrow();

// Invented test foods (values invented, not from any table): a low-phosphorus breakfast food,
// a high-phosphorus food for lunch, dinner and the snack.
const low = testFood({
  id: 1,
  name: 'Invented low food',
  group: 'Fruits and Fruit Juices',
  per100g: { phosphorusMg: 10, proteinG: 0.5, calciumMg: 5 },
});
const high = testFood({
  id: 2,
  name: 'Invented high food',
  group: 'Poultry Products',
  per100g: { phosphorusMg: 400, proteinG: 30, calciumMg: 10 },
});
const foods = new Map([low, high].map((f) => [f.id, f]));
const item = (foodId: number, grams: number) => ({ foodId, grams, measure: null, label: null });
const days: PlanDay[] = [
  {
    label: 'Day 1',
    occasions: [
      { name: 'Breakfast', kind: 'meal', time: '08:00', items: [item(1, 150)] },
      { name: 'Lunch', kind: 'meal', time: '13:00', items: [item(2, 150)] },
      // 179 g x 400 mg/100 g = 716 mg total, animal organic 50% typical -> 358 mg absorbable
      { name: 'Snack', kind: 'snack', time: '16:00', items: [item(2, 179)] },
      { name: 'Dinner', kind: 'meal', time: '19:00', items: [item(2, 150)] },
    ],
  },
];
const targets = computeTargets({
  weightKg: 70,
  ckdStage: '5',
  dialysis: 'hemodialysis',
  diabetes: false,
  targetOverrides: {},
});
const settings = { absorption: DEFAULT_ABSORPTION_FRACTIONS, thresholds: DEFAULT_THRESHOLDS };
const clinic = { name: 'Demo clinic (invented)', contact: '555-0100', dietitianName: 'D. Demo' };

function handout(rx: BinderPrescription, lang = 'en') {
  const summary = summarizePlan(
    { planId: 1, patientId: 1, version: 1, name: 'Invented', days },
    foods,
    targets,
    settings,
    rx,
  );
  const r = buildHandoutViewModel(
    summary,
    { label: 'P (invented)' },
    clinic,
    lang,
    langs.bundle(lang),
    '2026-12-06',
  );
  if (!r.ok) throw new Error('incomplete language');
  return { summary, vm: r.value };
}

const rx = (p: Partial<BinderPrescription>): BinderPrescription => ({
  ingredient: 'calcium-acetate',
  unitStrengthMg: 667,
  schedule: 'per-meal',
  units: 2,
  otherMedicines: [],
  ...p,
});

describe('the handout never under-states a prescribed binder (calcium acetate 667 mg, invented plan)', () => {
  it('"2 with each meal": every meal shows 2, the day states 2 x 3 meals = 6', () => {
    const { summary, vm } = handout(rx({}));
    const occ = vm.days[0]?.occasions ?? [];
    // Breakfast carries 150 g x 10 mg/100 g = 15 mg total P: still 2 tablets, as prescribed
    expect(occ.map((o) => o.binder?.units)).toEqual([2, 2, 0, 2]);
    expect(summary.binders.days[0]?.distributedUnits).toBe(6);
    expect(vm.binder.lines).toContain('2 tablets with each meal, as prescribed.');
    expect(vm.binder.lines).toContain('6 tablets a day in all, spread over your meals as shown.');
    // The clinician keeps the load-vs-prescription notes
    const codes = summary.binders.days[0]?.disagreements.map((d) => [d.code, d.occasion]);
    expect(codes).toContainEqual(['meal-under-threshold', 'Breakfast']);
    expect(codes).toContainEqual(['high-load-no-binder', 'Snack']);
  });

  it('per day: the stated daily total equals the prescription and the occasions add up to it', () => {
    for (const units of [1, 4, 7]) {
      const { vm } = handout(rx({ schedule: 'per-day', units }));
      const shown = (vm.days[0]?.occasions ?? []).reduce((s, o) => s + (o.binder?.units ?? 0), 0);
      expect(shown).toBe(units);
      expect(vm.binder.lines[0]).toBe(
        `${units} ${units === 1 ? 'tablet' : 'tablets'} a day in all, spread over your meals as shown.`,
      );
    }
  });

  it('no occasion, in any language, says a binder is not needed; the snack sends the patient to the care team', () => {
    const { vm } = handout(rx({}));
    const snack = vm.days[0]?.occasions[2];
    expect(snack?.binder?.line).toBe(
      'None prescribed with this one. If you are unsure, ask your care team.',
    );
    for (const lang of langs.list()) {
      const text = langs.bundle(lang).format('binder.none', {}).text;
      expect(text).not.toMatch(/not needed|no binder needed|no necesita|pas de chélateur avec/i);
      expect(text.length).toBeGreaterThan(20); // a full sentence that names the care team
    }
  });

  it('intake instructions come from the binder catalogue: calcium acetate is swallowed', () => {
    const { vm } = handout(rx({}));
    // BINDER_CATALOGUE['calcium-acetate'].timing: "Swallow the capsule or tablet with the meal."
    expect(vm.binder.lines).toContain('Swallow it whole. Do not crush or chew it.');
    expect(vm.binder.lines).not.toContain('Chew it or swallow it as the label says.');
    for (const ing of BINDER_INGREDIENTS) {
      const info = BINDER_CATALOGUE[ing];
      const key = binderIntakeKey(ing);
      if (info.intake === 'swallow') {
        expect(key).toBe('binder.timing.swallow');
        expect(info.timing).toMatch(/swallow/i);
        expect(info.timing).not.toMatch(/\bchew or swallow\b/i);
      }
      if (info.intake === 'chew') {
        expect(key).toBe('binder.timing.chew');
        expect(info.timing).toMatch(/chew/i);
      }
      if (info.intake === 'as-label') expect(key).toBe('binder.timing.asLabel');
    }
  });
});
