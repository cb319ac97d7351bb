import { describe, expect, it } from 'vitest';
import { planInputSchema } from '../../src/plans/plan.js';
import {
  addItem,
  toPlanInput,
  updateItem,
  type PlanDraft,
} from '../../src/web/client/plan-draft.js';

// Invented demo plan.
const start: PlanDraft = {
  name: 'Demo',
  days: [{ label: 'Day 1', occasions: [{ name: 'Lunch', items: [] }] }],
};

describe('plate ledger draft: preparation per item', () => {
  it('sends the method and the weight basis, and nothing for "as listed"', () => {
    let d = addItem(start, 0, 0, { foodId: 1, grams: 120, measure: null });
    d = addItem(d, 0, 0, { foodId: 2, grams: 80, measure: null });
    d = updateItem(d, 0, 0, 0, { preparation: 'boil-drain', weightBasis: 'plate' });
    d = updateItem(d, 0, 0, 1, { preparation: null, weightBasis: 'table' });
    const body = toPlanInput(d);
    expect(body.days[0]?.occasions[0]?.items).toEqual([
      { foodId: 1, grams: 120, preparation: 'boil-drain', weightBasis: 'plate' },
      { foodId: 2, grams: 80 },
    ]);
    // the body is what the plans API accepts
    expect(planInputSchema.safeParse(body).success).toBe(true);
  });
});
