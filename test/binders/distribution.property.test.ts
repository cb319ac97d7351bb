import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { distributeBinder } from '../../src/binders/distribution.js';

// Properties of the largest-remainder distribution over random invented loads.
describe('binder distribution properties (fast-check, fixed seed)', () => {
  it('per day: exactly the prescription over eligible occasions, none under the threshold, shares respected', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 30 }),
        fc.array(fc.double({ min: 0, max: 900, noNaN: true }), { minLength: 1, maxLength: 8 }),
        fc.integer({ min: 0, max: 200 }),
        (units, loads, minMg) => {
          const s = distributeBinder(
            {
              ingredient: 'sevelamer-carbonate',
              unitStrengthMg: 800,
              schedule: 'per-day',
              units,
              otherMedicines: [],
            },
            loads.map((absorbableMg, i) => ({
              name: `O${i}`,
              kind: 'meal' as const,
              absorbableMg,
            })),
            { minAbsorbableMgPerOccasion: minMg, highLoadOccasionMg: 400 },
            0,
          );
          const eligible = loads.map((l) => l >= minMg && l > 0);
          const total = s.occasions.reduce((a, o) => a + o.units, 0);
          expect(total).toBeLessThanOrEqual(units);
          expect(total).toBe(eligible.some(Boolean) ? units : 0);
          s.occasions.forEach((o, i) => {
            if (!eligible[i]) expect(o.units).toBe(0);
            // largest remainder never moves more than one unit away from the exact share
            if (o.exactShare !== null) expect(Math.abs(o.units - o.exactShare)).toBeLessThan(1.01);
            expect(o.reason.length).toBeGreaterThan(0);
          });
        },
      ),
      { seed: 20260305, numRuns: 500 },
    );
  });
});
