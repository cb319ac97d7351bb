// Sources: gram weights from USDA SR28 WEIGHT (NDB numbers beside each case); the 5 kg item
// limit is the plans API's own rule (common practice, no source).
import { describe, expect, it } from 'vitest';
import {
  copyDay,
  addDay,
  addItem,
  addOccasion,
  checkQuantity,
  gramsFor,
  itemCount,
  newDay,
  removeItem,
  toPlanInput,
  updateItem,
  type PlanDraft,
} from '../../src/web/client/plan-draft.js';

describe('plate ledger draft: household measures to grams (USDA SR28 WEIGHT.txt)', () => {
  it('uses the gram weight per one listed amount', () => {
    // USDA SR28 NDB 01077 milk, whole: Amount 1, "cup", Gm_Wgt 244 -> 2 cups = 2 x 244 = 488 g
    expect(gramsFor(2, { id: 1, description: 'cup', amount: 1, grams: 244 })).toBe(488);
    // USDA SR28 NDB 05064 chicken breast, roasted: Amount 0.5, "breast, bone and skin removed",
    // Gm_Wgt 86 -> one breast = 86 / 0.5 = 172 g; 1.5 breasts = 258 g
    expect(gramsFor(1.5, { id: 2, description: 'breast', amount: 0.5, grams: 86 })).toBe(258);
    // USDA SR28 NDB 18069 white bread: 1 slice = 29 g -> 3 slices = 87 g
    expect(gramsFor(3, { id: 3, description: 'slice', amount: 1, grams: 29 })).toBe(87);
  });

  it('takes the amount as grams when no measure is chosen, rounded to 0.1 g', () => {
    expect(gramsFor(125.04, null)).toBe(125);
    // USDA SR28 NDB 01077: 1 fl oz = 30.5 g -> 0.33 fl oz = 10.065 g -> 10.1 g
    expect(gramsFor(0.33, { id: 4, description: 'fl oz', amount: 1, grams: 30.5 })).toBe(10.1);
  });

  it('refuses quantities of 0, below 0, not a number, or over 5 kg in one item', () => {
    expect(checkQuantity(0, null)).toEqual({ ok: false, message: 'Quantity must be more than 0.' });
    expect(checkQuantity(-2, null).ok).toBe(false);
    expect(checkQuantity(Number.NaN, null).ok).toBe(false);
    // 21 cups x 244 g = 5,124 g > 5,000 g (the plans API's per-item limit)
    expect(checkQuantity(21, { id: 1, description: 'cup', amount: 1, grams: 244 })).toEqual({
      ok: false,
      message: 'One item can weigh at most 5000 g (5 kg).',
    });
    expect(checkQuantity(20, { id: 1, description: 'cup', amount: 1, grams: 244 })).toEqual({
      ok: true,
      grams: 4880,
    });
  });
});

describe('plate ledger draft: editing', () => {
  const start: PlanDraft = { name: 'Week one', days: [newDay(0)] };

  it('adds, changes and removes items without touching the original', () => {
    const a = addItem(start, 0, 1, { foodId: 7, grams: 100, measure: null });
    const b = addItem(a, 0, 1, {
      foodId: 9,
      grams: 58,
      measure: { portionId: 3, count: 2, description: 'slice' },
    });
    expect(itemCount(start, 0)).toBe(0);
    expect(itemCount(b, 0)).toBe(2);
    const c = updateItem(b, 0, 1, 0, { grams: 150 });
    expect(c.days[0]?.occasions[1]?.items[0]?.grams).toBe(150);
    expect(b.days[0]?.occasions[1]?.items[0]?.grams).toBe(100);
    const d = removeItem(c, 0, 1, 0);
    expect(d.days[0]?.occasions[1]?.items.map((i) => i.foodId)).toEqual([9]);
  });

  it('adds days with the default occasions and custom occasions', () => {
    const two = addOccasion(addDay(start), 1, 'Late snack');
    expect(two.days.map((d) => d.label)).toEqual(['Day 1', 'Day 2']);
    expect(two.days[1]?.occasions.map((o) => o.name)).toEqual([
      'Breakfast',
      'Lunch',
      'Afternoon snack',
      'Dinner',
      'Late snack',
    ]);
  });

  it('sends grams or a measure, never both (the plans API contract)', () => {
    const d = addItem(
      addItem(start, 0, 0, { foodId: 7, grams: 244, measure: { portionId: 1, count: 1 } }),
      0,
      0,
      { foodId: 8, grams: 30, measure: null, label: 'leche' },
    );
    expect(toPlanInput(d).days[0]?.occasions[0]).toEqual({
      name: 'Breakfast',
      items: [
        { foodId: 7, measure: { portionId: 1, count: 1 } },
        { foodId: 8, grams: 30, label: 'leche' },
      ],
    });
  });
});

describe('plate ledger draft: copying a day (invented demo plan)', () => {
  // Invented demo data: grams are made up.
  const base = {
    name: 'Copy test',
    days: [
      {
        label: 'Monday',
        occasions: [
          {
            name: 'Breakfast',
            items: [{ foodId: 1, grams: 58, measure: { portionId: 7, count: 2 }, label: 'toast' }],
          },
        ],
      },
      {
        label: 'Dialysis day',
        occasions: [{ name: 'Lunch', items: [{ foodId: 2, grams: 100, measure: null }] }],
      },
      { label: 'Wednesday', occasions: [] },
    ],
  };

  it('puts the day’s meals on the chosen days, keeping their labels; the source is unchanged', () => {
    const next = copyDay(base, 0, [1, 2]);
    expect(next.days.map((d) => d.label)).toEqual(['Monday', 'Dialysis day', 'Wednesday']);
    expect(next.days[1]?.occasions).toEqual(base.days[0]?.occasions);
    expect(next.days[2]?.occasions).toEqual(base.days[0]?.occasions);
    // Copies, not shared objects: a later change to one day leaves the others alone.
    expect(next.days[1]?.occasions[0]?.items[0]).not.toBe(base.days[0]?.occasions[0]?.items[0]);
    expect(next.days[1]?.occasions[0]?.items[0]?.measure).not.toBe(
      base.days[0]?.occasions[0]?.items[0]?.measure,
    );
    expect(base.days[1]?.occasions[0]?.name).toBe('Lunch');
  });

  it('copies onto a new day at the end, and never onto itself', () => {
    const added = copyDay(base, 1, 'new');
    expect(added.days).toHaveLength(4);
    expect(added.days[3]).toEqual({ label: 'Day 4', occasions: base.days[1]?.occasions });
    expect(copyDay(base, 0, [0])).toEqual(base);
  });
});
