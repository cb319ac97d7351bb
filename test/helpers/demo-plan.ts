import { PassThrough } from 'node:stream';
import type { Clock } from '../../src/clock.js';
import type { Db } from '../../src/db/database.js';
import type { Food } from '../../src/foods/food.js';
import { DEMO_FOOD_CODES, seedDemoData } from '../../src/plans/demo-seed.js';
import { testFood } from './food.js';
import { insertFoods } from './sr28.js';

/** Invented test foods carrying the demo's IFCT 2017 codes (values invented, not IFCT's). */
export function fakeIfctFoods(codes: readonly string[] = DEMO_FOOD_CODES): Food[] {
  return codes.map((code, i) =>
    testFood({
      id: 0,
      sourceId: 0,
      source: 'ifct2017',
      sourceRelease: 'test',
      code,
      name: `Invented test food ${code}`,
      group: 'Invented',
      per100g: {
        phosphorusMg: 100 + i * 10,
        proteinG: 5 + i,
        energyKcal: 150,
        potassiumMg: 200,
        sodiumMg: 20,
        calciumMg: 30,
        waterG: 60,
      },
    }),
  );
}

/** Seeds the invented demo patient (id 1) and its three-day plan (id 1) over invented foods. */
export async function seedDemoPlan(db: Db, clock: Clock): Promise<void> {
  insertFoods(db, fakeIfctFoods(), {
    format: 'ifct2017',
    name: 'IFCT 2017 (test stand-in)',
    release: 'test',
  });
  const r = await seedDemoData({
    db,
    clock,
    config: { seedDemo: true },
    io: { stdout: new PassThrough() },
  });
  if (r !== 'seeded') throw new Error(`demo data not seeded: ${r}`);
}
