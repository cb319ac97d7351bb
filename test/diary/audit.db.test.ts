import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { DiaryAuditService } from '../../src/diary/diary.service.js';
import type { DiaryReport } from '../../src/diary/findings.js';
import type { Food } from '../../src/foods/food.js';
import { PatientService } from '../../src/patients/patients.service.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, loadAllSr28Foods } from '../helpers/sr28.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

/** Invented branded products with invented ingredient statements and values (invented demo data). */
function inventedProducts(): Food[] {
  const base = {
    id: 0,
    sourceId: 0,
    source: 'clinic-products',
    sourceRelease: 'demo',
    altNames: [],
    kind: 'branded' as const,
    ingredientsLanguage: 'en',
    servingG: 30,
    servingText: '1 bag (30 g)',
    portions: [],
  };
  const per100g = (phosphorusMg: number, proteinG: number) => ({
    phosphorusMg,
    proteinG,
    energyKcal: 500,
    potassiumMg: 200,
    sodiumMg: 800,
    calciumMg: 50,
    waterG: 2,
    phytateMg: null,
  });
  return [
    {
      ...base,
      code: 'DEMO-1',
      // GS1 prefix 200-299 is for restricted circulation: never a real product's barcode.
      gtin: '2000000000015',
      name: 'Cheesy Corn Puffs',
      group: 'Snacks',
      brandOwner: 'Invented Snacks Co.',
      ingredients:
        'Corn meal, sunflower oil, whey powder, cheese powder, salt, disodium phosphate, paprika extract',
      per100g: per100g(300, 6),
    },
    {
      ...base,
      code: 'DEMO-2',
      gtin: '2000000000022',
      name: 'Dairyvale processed cheese slices',
      group: 'Dairy and Egg Products',
      brandOwner: 'Dairyvale (invented)',
      servingG: 20,
      servingText: '1 slice (20 g)',
      ingredients:
        'Cheese, water, milk protein, emulsifying salts (sodium polyphosphate, trisodium citrate), salt',
      per100g: per100g(800, 18),
    },
    {
      ...base,
      code: 'DEMO-3',
      gtin: '2000000000039',
      name: 'Morning oat drink',
      group: 'Beverages',
      brandOwner: 'Invented Oats Ltd.',
      servingG: 250,
      servingText: '1 glass (250 ml)',
      ingredients: 'Water, oats 10%, rapeseed oil, calcium carbonate, salt',
      per100g: per100g(20, 1),
    },
  ];
}

let db: Db;
let service: DiaryAuditService;
let demo: DiaryReport;

beforeAll(async () => {
  db = await openMemoryDb();
  if (!hasSr28) return;
  insertFoods(db, [...loadAllSr28Foods().values()]);
  insertFoods(db, inventedProducts(), {
    format: 'clinic-products',
    name: 'Invented demo products',
    release: 'demo',
  });
  service = new DiaryAuditService(db, clock);
  const text = readFileSync(new URL('../fixtures/diary/demo-week.txt', import.meta.url), 'utf8');
  demo = (await service.create({ text })).report;
});
afterAll(async () => db.close());

function entry(r: DiaryReport, line: number) {
  const e = r.entries.find((x) => x.line === line);
  if (!e) throw new Error(`no entry on line ${line}`);
  return e;
}

const skip = !hasSr28;
const note = hasSr28 ? 'SR28 found' : SR28_MISSING;

describe(`invented demo week (test/fixtures/diary/demo-week.txt) against USDA SR28 (${note})`, () => {
  it.skipIf(skip)('reads seven days, every line, nothing skipped', () => {
    expect(demo.status).toBe('complete');
    expect(demo.days.map((d) => d.label)).toEqual([
      'Monday',
      'Tuesday',
      'Wednesday',
      'Thursday',
      'Friday',
      'Saturday',
      'Sunday',
    ]);
    expect(demo.entries).toHaveLength(48); // 57 lines - 1 comment - 7 day headings - 1 occasion heading
    expect(demo.skipped).toEqual([]);
  });

  it.skipIf(skip)('Monday: grams and phosphorus of each entry from SR28 values', () => {
    const rows = [4, 5, 6, 7, 8, 9, 10, 11].map((l) => {
      const e = entry(demo, l);
      return [e.text, e.match?.foodId, e.grams, e.phosphorusMg, e.quantityAssumed];
    });
    const sr = loadAllSr28Foods();
    const id = (ndb: string) =>
      demo.entries.find((e) => e.match?.name === sr.get(ndb)?.name)?.match?.foodId;
    expect(rows).toEqual([
      // NDB 18069 bread, white: slice 29 g, P 98 mg/100 g -> 2 x 29 = 58 g, 0.58 x 98 = 56.84
      ['2 slices white bread', id('18069'), 58, 56.8, false],
      // NDB 01001 butter, salted: tbsp 14.2 g, P 24 -> 0.142 x 24 = 3.41
      ['1 tbsp butter', id('01001'), 14.2, 3.4, false],
      // NDB 01077 milk, whole: cup 244 g, P 84 -> 2.44 x 84 = 204.96
      ['1 cup whole milk', id('01077'), 244, 205, false],
      // NDB 01009 cheese, cheddar: P 455 -> 0.30 x 455 = 136.5
      ['cheddar cheese 30 g', id('01009'), 30, 136.5, false],
      // NDB 09040 bananas, raw: medium 118 g, P 22 -> 1.18 x 22 = 25.96
      ['1 banana', id('09040'), 118, 26, false],
      // NDB 14148 cola: fl oz 30.7 g -> 30.7 / 29.5735 = 1.0381 g/ml x 355 ml = 368.5 g; P 9 -> 33.17
      ['a can (355 ml) of cola', id('14148'), 368.5, 33.2, false],
      // NDB 20045 rice, white, long-grain, enriched, cooked: cup 158 g, P 43 -> 67.94
      ['1 cup cooked white rice', id('20045'), 158, 67.9, false],
      // NDB 05064 chicken breast, meat only, roasted: P 228 -> 1.20 x 228 = 273.6
      ['roast chicken breast 120 g', id('05064'), 120, 273.6, false],
    ]);
  });

  it.skipIf(skip)(
    'Monday total: 56.84 + 3.41 + 204.96 + 136.5 + 25.96 + 33.17 + 67.94 + 273.6 = 802.4 mg',
    () => {
      const monday = demo.days[0];
      expect(monday?.date).toBeNull();
      expect(monday?.nutrients.phosphorusMg).toBe(802.4);
      const a = monday?.nutrients.absorbablePhosphorusMg;
      expect(a && a.low <= a.typical && a.typical <= a.high && a.high <= 802.4).toBe(true);
      // the biggest source that day: roast chicken breast (273.6 mg, 34% of 802.4)
      expect(monday?.topContributors[0]?.phosphorusMg).toBe(273.6);
    },
  );

  it.skipIf(skip)(
    'cola carries hidden additive phosphate (phosphoric acid is not in its name)',
    () => {
      const cola = entry(demo, 9);
      expect(cola.hidden).toBe(true);
      expect(cola.additivePhosphorusMg).toBeGreaterThan(0);
      expect(cola.additivePhosphorusMg).toBeLessThanOrEqual(cola.phosphorusMg ?? 0);
      expect(cola.findings.join(' ')).toContain('hidden phosphate additive');
      expect(demo.hiddenAdditiveEntries).toContain(9);
    },
  );

  it.skipIf(skip)('processed cheese says its additive in its name: not hidden', () => {
    const cheese = entry(demo, 16);
    expect(cheese.match?.name).toMatch(/pasteurized process/);
    expect(cheese.hidden).toBe(false);
    // no number written: the food's usual item is assumed and said so
    expect(cheese.quantityAssumed).toBe(true);
    expect(cheese.findings.join(' ')).toContain('portion assumed');
  });

  it.skipIf(skip)('a range is taken at its midpoint: 2-3 slices = 2.5 x 29 g = 72.5 g', () => {
    expect(entry(demo, 53).grams).toBe(72.5);
  });

  it.skipIf(skip)('"a handful of grapes" is half a cup of grapes, stated as assumed', () => {
    const g = entry(demo, 30);
    expect(g.quantityAssumed).toBe(true);
    // USDA SR28 NDB 09132 Grapes, red or green: 1 cup = 151 g; a handful taken as half a cup
    // (common practice, no source): 0.5 x 151 = 75.5 g
    expect(g.grams).toBe(75.5);
    expect(g.quantityNote).toContain('assumed (no published figure)');
  });

  it.skipIf(skip)(
    'a second food after "with" is its own entry, counted with its smallest measure',
    async () => {
      const r = (await service.run({ text: '2 slices toast with margarine\n' })).report;
      expect(r.entries.map((e) => [e.line, e.part, e.key])).toEqual([
        [1, 0, '1'],
        [1, 1, '1.1'],
      ]);
      expect(r.entries[0]?.match?.name).toMatch(/^Bread, white/);
      expect(r.entries[1]?.match?.name).toMatch(/^Margarine/);
      expect(r.entries[1]?.quantityNote).toContain('smallest measure');
      expect(r.entries[1]?.counted).toBe(true);
    },
  );

  it.skipIf(skip)('offers swaps for the big sources of the week', () => {
    expect(demo.days.some((d) => d.swaps.length > 0)).toBe(true);
  });
});

describe(`additive findings on invented branded products (${note})`, () => {
  const csv = [
    'date,occasion,food,quantity,barcode,ingredients',
    '2026-03-02,snack,corn puffs,1 bag,2000000000015,',
    '2026-03-02,lunch,cheese slices,2 slices,2000000000022,',
    '2026-03-02,breakfast,oat drink,250 ml,2000000000039,',
    '2026-03-03,dinner,chocolate cake,1 slice,,"Sugar, wheat flour, cocoa, eggs, sodium aluminium phosphate, salt"',
  ].join('\n');
  let r: DiaryReport;
  beforeAll(async () => {
    if (skip) return;
    r = (await service.run({ text: csv, format: 'csv' })).report;
  });

  it.skipIf(skip)('barcodes match the products first', () => {
    expect(r.entries.map((e) => [e.match?.name, e.matchMethod])).toEqual([
      ['Cheesy Corn Puffs', 'barcode'],
      ['Dairyvale processed cheese slices', 'barcode'],
      ['Morning oat drink', 'barcode'],
      [expect.stringMatching(/^Cake, chocolate/), 'text'],
    ]);
  });

  it.skipIf(skip)(
    'disodium phosphate in the corn puffs is hidden; its evidence names the words',
    () => {
      const puffs = r.entries[0];
      expect(puffs?.hidden).toBe(true);
      expect(puffs?.splitMethod).toBe('ingredient-statement');
      expect(puffs?.findings.join(' ')).toContain('disodium phosphate');
      // 1 bag = the label serving of 30 g (invented); P 300 mg/100 g (invented) -> 90 mg
      expect(puffs?.grams).toBe(30);
      expect(puffs?.phosphorusMg).toBe(90);
      expect(puffs?.additivePhosphorusMg).toBeGreaterThan(0);
    },
  );

  it.skipIf(skip)(
    'sodium polyphosphate in "processed cheese" is evident from the name: not hidden',
    () => {
      const cheese = r.entries[1];
      expect(cheese?.additiveLikely).toBe(true);
      expect(cheese?.hidden).toBe(false);
      expect(cheese?.findings.join(' ')).toContain('sodium polyphosphate');
    },
  );

  it.skipIf(skip)(
    'calcium carbonate is no phosphate: the oat drink has no additive finding',
    () => {
      expect(r.entries[2]?.additiveLikely).toBe(false);
      expect(r.entries[2]?.hidden).toBe(false);
    },
  );

  it.skipIf(skip)(
    "the diary's own ingredient statement is analysed (sodium aluminium phosphate)",
    () => {
      const cake = r.entries[3];
      expect(cake?.splitMethod).toBe('ingredient-statement');
      expect(cake?.hidden).toBe(true);
      expect(cake?.findings.join(' ')).toContain('sodium aluminium phosphate');
    },
  );

  it.skipIf(skip)(
    'a pasted diary gives the same finding from an "ingredients:" line under the entry',
    async () => {
      const text = [
        'Tuesday',
        'dinner: chocolate cake 1 slice',
        'ingredients: Sugar, wheat flour, cocoa, eggs, sodium aluminium phosphate, salt',
      ].join('\n');
      const pasted = (await service.run({ text })).report.entries[0];
      const fromCsv = r.entries[3];
      expect(pasted?.match?.foodId).toBe(fromCsv?.match?.foodId);
      expect(pasted?.splitMethod).toBe('ingredient-statement');
      expect(pasted?.hidden).toBe(true);
      expect(pasted?.additivePhosphorusMg).toBe(fromCsv?.additivePhosphorusMg);
      expect(pasted?.findings.join(' ')).toContain('sodium aluminium phosphate');
    },
  );
});

describe(`confirmed or changed matches are remembered for the clinic (${note})`, () => {
  it.skipIf(skip)('"my usual cereal" maps to the chosen food next time', async () => {
    const first = await service.create({ text: 'breakfast: my usual cereal\n' });
    const corn = (
      await db.kysely
        .selectFrom('food')
        .select('id')
        .where('code', '=', '08020') // USDA SR28 NDB 08020 KELLOGG'S Corn Flakes
        .executeTakeFirstOrThrow()
    ).id;
    const changed = await service.changeMatch(first.id, 1, corn, { remember: true, userId: null });
    expect(changed.report.entries[0]).toMatchObject({
      matchMethod: 'confirmed',
      match: { foodId: corn },
    });
    const again = await service.create({ text: 'lunch - my usual cereal\n' });
    expect(again.report.entries[0]).toMatchObject({
      matchMethod: 'remembered',
      match: { foodId: corn },
    });
  });
});

describe(`linked to a patient: days against the targets (${note})`, () => {
  it.skipIf(skip)('checks each day against the targets of computeTargets', async () => {
    // invented demo patient: 70 kg, CKD 4, no dialysis, no diabetes; phosphate 5.1 mg/dL is
    // above 4.6 mg/dL (KDOQI 2003 Guideline 4.1, CKD 3-4), so the phosphorus default applies
    const patient = await new PatientService(db.kysely, clock).create({
      label: 'DEMO-DIARY-1',
      weightKg: 70,
      ckdStage: '4',
      diabetes: false,
      labs: [{ analyte: 'phosphate', value: 5.1, unit: 'mg/dL', date: '2026-03-01' }],
    });
    const saved = await service.create({
      text: '1 cup whole milk\ncheddar cheese 200 g\n',
      patientId: patient.id,
    });
    expect(saved.report.targetsSource).toBe('patient');
    const p = saved.report.days[0]?.status.checks.find((c) => c.target === 'phosphorusMg');
    // 244 g x 0.84 = 204.96 + 200 g x 4.55 = 910 -> 1,114.96 mg, above 800-1,000 mg/day (KDOQI 2003 default)
    expect(p?.value).toBe(1115);
    expect(p?.status).toBe('above');
  });
});

describe(`HTTP routes (${note})`, () => {
  let ctx: TestContext;
  beforeAll(async () => {
    ctx = await createTestContext({ db });
  });
  afterAll(async () => {
    await ctx.app.close();
  });
  const count = async () =>
    Number(
      (
        await db.kysely
          .selectFrom('diary_audit')
          .select((eb) => eb.fn.countAll().as('n'))
          .executeTakeFirstOrThrow()
      ).n,
    );

  it.skipIf(skip)('POST text, then GET as JSON, HTML page and PDF', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/diary-audits',
      payload: { text: 'Monday\nbreakfast: 2 slices white bread\nsnack: 1 can cola\n' },
    });
    expect(res.statusCode).toBe(201);
    const body = res.json();
    expect(Object.keys(body)).toEqual(
      expect.arrayContaining(['id', 'entries', 'days', 'unmatched']),
    );
    expect(body.entries[0]).toMatchObject({
      line: 2,
      text: '2 slices white bread',
      grams: 58,
      quantityAssumed: false,
      hidden: false,
    });
    expect(Object.keys(body.days[0])).toEqual(expect.arrayContaining(['date', 'nutrients']));
    const get = await ctx.inject({ method: 'GET', url: `/api/diary-audits/${body.id}` });
    expect(get.json().entries).toEqual(body.entries);
    const html = await ctx.inject({ method: 'GET', url: `/api/diary-audits/${body.id}.html` });
    expect(html.headers['content-type']).toContain('text/html');
    expect(html.body).toContain(`Diary audit ${body.id}`);
    const pdf = await ctx.inject({ method: 'GET', url: `/api/diary-audits/${body.id}.pdf` });
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect(pdf.rawPayload.subarray(0, 5).toString('latin1')).toBe('%PDF-');
  });

  it.skipIf(skip)('multipart CSV upload', async () => {
    const boundary = '----phosledgertest';
    const csv = 'date,occasion,food,quantity\n2026-03-02,breakfast,Milk,1 cup\n';
    const payload = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="diary.csv"\r\nContent-Type: text/csv\r\n\r\n${csv}\r\n--${boundary}--\r\n`;
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/diary-audits',
      headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
      payload,
    });
    expect(res.statusCode).toBe(201);
    expect(res.json().entries[0].match.name).toMatch(/^Milk/);
    expect(res.json().days[0].date).toBe('2026-03-02');
  });

  it.skipIf(skip)('confirm or change a line through the match route', async () => {
    const created = (
      await ctx.inject({
        method: 'POST',
        url: '/api/diary-audits',
        payload: { text: 'my usual yogurt\n' },
      })
    ).json();
    const food = (
      await db.kysely
        .selectFrom('food')
        .select('id')
        .where('code', '=', '01116')
        .executeTakeFirstOrThrow()
    ).id;
    const res = await ctx.inject({
      method: 'POST',
      url: `/api/diary-audits/${created.id}/entries/1/match`,
      payload: { foodId: food, action: 'change' },
    });
    expect(res.statusCode).toBe(200);
    expect(res.json().entries[0]).toMatchObject({
      matchMethod: 'confirmed',
      match: { foodId: food },
    });
    const missing = await ctx.inject({
      method: 'POST',
      url: `/api/diary-audits/${created.id}/entries/99/match`,
      payload: { foodId: food },
    });
    expect(missing.json().error.code).toBe('PHL_DIARY_LINE_NOT_FOUND');
  });

  it.skipIf(skip)('bad input: clear errors and nothing saved', async () => {
    const before = await count();
    const post = (payload: unknown) =>
      ctx.inject({ method: 'POST', url: '/api/diary-audits', payload: payload as object });
    expect((await post({ text: '' })).json().error.code).toBe('PHL_DIARY_EMPTY');
    expect(
      (await post({ text: 'name,amount,kcal\nbread,2,160\n', format: 'csv' })).json().error.code,
    ).toBe('PHL_DIARY_COLUMNS');
    expect((await post({ nottext: 1 })).statusCode).toBe(400);
    const boundary = '----phosledgertest';
    const bin = Buffer.alloc(4096);
    for (let i = 0; i < bin.length; i++) bin[i] = (i * 37) % 256;
    const binary = Buffer.concat([
      Buffer.from(
        `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="photo.jpg"\r\n\r\n`,
      ),
      bin,
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ]);
    const binRes = await ctx.inject({
      method: 'POST',
      url: '/api/diary-audits',
      headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
      payload: binary,
    });
    expect(binRes.statusCode).toBe(400);
    expect(binRes.json().error.code).toBe('PHL_DIARY_BINARY');
    // a 50 MB upload is refused with 413
    const big = Buffer.concat([
      Buffer.from(
        `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\n\r\nfood\n`,
      ),
      Buffer.alloc(50 * 1024 * 1024, 'a'),
      Buffer.from(`\r\n--${boundary}--\r\n`),
    ]);
    const bigRes = await ctx.inject({
      method: 'POST',
      url: '/api/diary-audits',
      headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
      payload: big,
    });
    expect(bigRes.statusCode).toBe(413);
    const bigJson = await post({ text: 'x'.repeat(50 * 1024 * 1024) });
    expect(bigJson.statusCode).toBe(413);
    expect(await count()).toBe(before);
    const notFound = await ctx.inject({ method: 'GET', url: '/api/diary-audits/999999' });
    expect(notFound.statusCode).toBe(404);
  });

  it.skipIf(skip)(
    'a 10,000-character line is skipped and the audit saved as incomplete',
    async () => {
      const res = await ctx.inject({
        method: 'POST',
        url: '/api/diary-audits',
        payload: { text: `1 banana\n${'y'.repeat(10_000)}\n1 apple\n` },
      });
      expect(res.statusCode).toBe(201);
      const b = res.json();
      expect(b.status).toBe('incomplete');
      expect(b.skipped[0]).toMatchObject({ line: 2, code: 'PHL_DIARY_LINE_TOO_LONG' });
      expect(b.entries).toHaveLength(2);
      const row = await db.kysely
        .selectFrom('diary_audit')
        .select('status')
        .where('id', '=', b.id)
        .executeTakeFirstOrThrow();
      expect(row.status).toBe('incomplete');
    },
  );
});
