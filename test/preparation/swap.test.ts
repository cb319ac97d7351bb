import { describe, expect, it } from 'vitest';
import { DEFAULT_THRESHOLDS } from '../../src/plans/plan-settings.js';
import { rankSwaps } from '../../src/plans/swaps.js';
import { testFood } from '../helpers/food.js';

// Invented demo foods (values invented, not from a table).
const opts = { maxShare: DEFAULT_THRESHOLDS.swapMaxShare, limit: 5 };
const food = (id: number, name: string, group: string) =>
  testFood({ id, name, group, per100g: { phosphorusMg: 200, proteinG: 20 } });

describe('"same food, boiled and drained" as a swap', () => {
  it('is offered for raw chicken: P x 0.63 / protein x 0.81 = 0.778 of its absorbable P per g protein', () => {
    // Cupisti 2006 chicken breast: P 63%, protein 81% retained
    const r = rankSwaps(food(1, 'Chicken, breast, raw', 'Poultry Products'), [], opts);
    expect(r.prepared).toMatchObject({ foodId: 1, method: 'boil-drain', shareOfOriginal: 0.778 });
    expect(r.prepared?.sources.join(' ')).toMatch(/Cupisti/);
  });
  it('is not offered when it would not clear the swap share (pulses: 0.85 / 0.95 = 0.89 > 0.8)', () => {
    const r = rankSwaps(food(2, 'Lentils, raw', 'Legumes and Legume Products'), [], opts);
    expect(r.prepared).toBeNull();
  });
  it('is not offered for an entry that is already cooked', () => {
    const r = rankSwaps(food(3, 'Chicken, breast, cooked, stewed', 'Poultry Products'), [], opts);
    expect(r.prepared).toBeNull();
  });
});
