import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FoodService } from '../../src/foods/foods.service.js';
import { hasSr28, SR28_DIR, SR28_MISSING } from '../helpers/shared.js';
import { everydayQueries, scoreEverydayQueries } from './everyday-queries.js';

// Goal (the product's own, no published source): 45 of the 50 everyday queries find an expected
// food (USDA SR28 NDB numbers, listed in everyday-queries.ts) in the first 3 hits (measured on the
// full USDA SR28 release through the real importer: 48 of 50 when written).
const GOAL_IN_TOP3 = 45;

describe('food search on the full USDA SR28 release (everyday queries)', () => {
  let db: Db;
  let search: FoodService;
  beforeAll(async () => {
    db = await openMemoryDb();
    if (hasSr28) expect((await usdaSr28.run(db, SR28_DIR)).ok).toBe(true);
    search = new FoodService(new FoodRepository(db.kysely));
  }, 120_000);
  afterAll(async () => db.close());

  const names = async (q: string, limit = 12) =>
    (await search.search({ q, limit })).map((f) => `${f.code} ${f.name}`);

  it('the list has 50 queries, each with 5-digit NDB numbers', () => {
    const list = everydayQueries();
    expect(list).toHaveLength(50);
    for (const q of list) for (const n of q.expected) expect(n).toMatch(/^\d{5}$/);
  });

  it.skipIf(!hasSr28)(
    `at least ${GOAL_IN_TOP3} of 50 find an expected food in the top 3 (${hasSr28 ? 'SR28 found' : SR28_MISSING})`,
    async () => {
      const r = await scoreEverydayQueries(db);
      expect(r.inTop3, JSON.stringify(r.misses, null, 1)).toBeGreaterThanOrEqual(GOAL_IN_TOP3);
    },
  );

  it.skipIf(!hasSr28)('"processed cheese" and its misspelling find process cheese', async () => {
    // USDA SR28 NDB 01042 / 01253 Cheese, pasteurized process, American (with / without
    // added vitamin D)
    expect((await names('processed cheese'))[0]).toMatch(/^(01042|01253) /);
    // "procesed chese": both words start no word of any name; read as "processed cheese"
    expect((await names('procesed chese'))[0]).toMatch(/^(01042|01253) /);
  });

  it.skipIf(!hasSr28)(
    '"hot dog" finds frankfurters through the table\'s common name "hot dog"',
    async () => {
      // USDA SR28 NDB 07022 Frankfurter, beef, unheated: ComName "hot dog, frank, wiener"
      const top3 = (await names('hot dog')).slice(0, 3);
      for (const n of top3) expect(n).toMatch(/Frankfurter/);
    },
  );

  it.skipIf(!hasSr28)(
    '"egg whole" ranks the egg as eaten first; boiled and scrambled eggs are in the 12 hits',
    async () => {
      const hits = await names('egg whole');
      expect(hits[0]).not.toMatch(/dried/);
      // USDA SR28 NDB 01129 Egg, whole, cooked, hard-boiled; 01132 Egg, whole, cooked, scrambled
      expect(hits.some((n) => n.startsWith('01129 '))).toBe(true);
      expect(hits.some((n) => n.startsWith('01132 '))).toBe(true);
      // the dried egg (NDB 01133) comes after every ready-to-eat whole egg in the hits
      const dried = hits.findIndex((n) => n.startsWith('01133 '));
      const scrambled = hits.findIndex((n) => n.startsWith('01132 '));
      if (dried >= 0) expect(dried).toBeGreaterThan(scrambled);
    },
  );

  it.skipIf(!hasSr28)('a word being typed is not "corrected" (prefix search stays)', async () => {
    expect((await names('chee', 5)).every((n) => /chee/i.test(n))).toBe(true);
  });
});
