// Test helper with no expected values of its own: a one-day plan of invented demo data.
import type { PlanContent } from '../../src/plans/plan.js';

type Occasion = PlanContent['days'][number]['occasions'][number];

/** An occasion of items given as [foodId, grams] (no household measure, no label). */
export function occasion(
  name: string,
  kind: Occasion['kind'],
  items: ReadonlyArray<readonly [number, number]>,
): Occasion {
  return {
    name,
    kind,
    time: null,
    items: items.map(([foodId, grams]) => ({ foodId, grams, measure: null, label: null })),
  };
}

/** Version 1 of an invented one-day plan (plan 1 of patient 1), ready for summarizePlan. */
export function oneDayPlan(occasions: Occasion[]) {
  return {
    planId: 1,
    patientId: 1,
    version: 1,
    name: 'Invented',
    days: [{ label: 'Day 1', occasions }],
  };
}
