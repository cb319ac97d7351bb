import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { distributeBinder } from '../../src/binders/distribution.js';

// Properties of the largest-remainder distribution over random invented loads.
describe('binder distribution properties (fast-check, fixed seed)', () => {
  it('per day: always exactly the prescription; under-threshold occasions get none unless no occasion reaches it; shares respected', () => {
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
          // The handout must never show less than the prescription (nor more).
          expect(total).toBe(units);
          expect(s.distributedUnits).toBe(s.prescribedUnits);
          s.occasions.forEach((o, i) => {
            if (eligible.some(Boolean) && !eligible[i]) expect(o.units).toBe(0);
            // largest remainder never moves more than one unit away from the exact share
            if (o.exactShare !== null) expect(Math.abs(o.units - o.exactShare)).toBeLessThan(1.01);
            expect(o.reason.length).toBeGreaterThan(0);
          });
        },
      ),
      { seed: 20260305, numRuns: 500 },
    );
  });

  it('per meal: every meal gets exactly the prescribed units, snacks none, whatever the loads', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 10 }),
        fc.array(fc.tuple(fc.double({ min: 0, max: 900, noNaN: true }), fc.boolean()), {
          minLength: 1,
          maxLength: 8,
        }),
        fc.integer({ min: 0, max: 400 }),
        (units, occ, minMg) => {
          const s = distributeBinder(
            {
              ingredient: 'calcium-acetate',
              unitStrengthMg: 667,
              schedule: 'per-meal',
              units,
              otherMedicines: [],
            },
            occ.map(([absorbableMg, isMeal], i) => ({
              name: `O${i}`,
              kind: isMeal ? ('meal' as const) : ('snack' as const),
              absorbableMg,
            })),
            { minAbsorbableMgPerOccasion: minMg, highLoadOccasionMg: 250 },
            0,
          );
          const meals = occ.filter(([, m]) => m).length;
          expect(s.prescribedUnits).toBe(units * meals);
          expect(s.distributedUnits).toBe(units * meals);
          s.occasions.forEach((o, i) => expect(o.units).toBe(occ[i]?.[1] ? units : 0));
        },
      ),
      { seed: 20261206, numRuns: 300 },
    );
  });
});
