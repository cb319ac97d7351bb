import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ifct2017 } from '../../data-import/ifct2017.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { DiaryAuditService } from '../../src/diary/diary.service.js';
import { testFood } from '../helpers/food.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, loadAllSr28Foods } from '../helpers/sr28.js';
import { labelledLines } from './labelled-set.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

/**
 * Preparation (name indexes, foods and scoring features held in memory) changes how fast an
 * audit runs, never what it says: each case audits the same diary on a prepared and on a plain
 * database and expects the same report. The expected values are the plain audit's own answers.
 */

/** An invented diary: IFCT 2017 foods named as a patient might (invented demo data). */
const IFCT_DIARY = `Monday
breakfast: 2 chapati
1 cup milk
lunch: dal, 1 bowl
rice, cooked, 1 cup
snack: banana
dinner: chicken curry 150 g
Tuesday
breakfast: 2 idli
lunch: rajma 1 cup
dinner: paneer 100 g
`;

async function ifctDb(): Promise<Db> {
  const db = await openMemoryDb();
  expect((await ifct2017.run(db, undefined, { clock })).ok).toBe(true);
  return db;
}

describe('prepared audits (IFCT 2017, bundled)', () => {
  let plainDb: Db;
  let preparedDb: Db;
  beforeAll(async () => {
    [plainDb, preparedDb] = await Promise.all([ifctDb(), ifctDb()]);
  });
  afterAll(async () => {
    await plainDb.close();
    await preparedDb.close();
  });

  it('gives the same report as an audit without preparation', async () => {
    const plain = await new DiaryAuditService(plainDb, clock).run({ text: IFCT_DIARY });
    const service = new DiaryAuditService(preparedDb, clock, { longRunning: true });
    const prepared = await service.prepare();
    // IFCT 2017 has 542 foods, all generic (ifct2017 importer); no branded foods here.
    expect(prepared).toEqual({ indexed: 542, foods: 542 });
    const report = await service.run({ text: IFCT_DIARY });
    expect(report.report.entries.filter((e) => e.match).length).toBeGreaterThan(5);
    expect(report).toEqual(plain);
  });

  it('sees a table imported after preparation', async () => {
    const service = new DiaryAuditService(preparedDb, clock, { longRunning: true });
    await service.prepare();
    const line = 'breakfast: zorbleberry compote 100 g';
    expect((await service.run({ text: line })).report.entries[0]?.match).toBeNull();
    // An invented food in a new table: the tables' stamp changes, the old indexes are dropped.
    insertFoods(
      preparedDb,
      [
        testFood({
          name: 'Zorbleberry compote, invented demo food',
          per100g: { phosphorusMg: 20 },
        }),
      ],
      { format: 'invented', name: 'Invented demo foods', release: 'demo' },
    );
    const first = (await service.run({ text: line })).report.entries[0]?.match;
    expect(first?.name).toBe('Zorbleberry compote, invented demo food');
    // The new index was built in the background; it finds the food too.
    await service.prepare();
    const again = (await service.run({ text: `${line} ` })).report.entries[0]?.match;
    expect(again?.foodId).toBe(first?.foodId);
  });

  it('stops preparing when asked', async () => {
    const stop = new AbortController();
    stop.abort();
    const db = await ifctDb();
    const done = await new DiaryAuditService(db, clock).prepare({ signal: stop.signal });
    expect(done.foods).toBe(0);
    await db.close();
  });
});

describe.skipIf(!hasSr28)('prepared audits (full USDA SR28)', () => {
  let plainDb: Db;
  let preparedDb: Db;
  beforeAll(async () => {
    const foods = [...loadAllSr28Foods().values()];
    plainDb = await openMemoryDb();
    preparedDb = await openMemoryDb();
    insertFoods(plainDb, foods);
    insertFoods(preparedDb, foods);
  });
  afterAll(async () => {
    await plainDb?.close();
    await preparedDb?.close();
  });

  it('gives the same report for every labelled diary line', async () => {
    const text = `${labelledLines()
      .map((l) => l.text)
      .join('\n')}\n`;
    const plain = await new DiaryAuditService(plainDb, clock).run({ text });
    const service = new DiaryAuditService(preparedDb, clock, { longRunning: true });
    // USDA SR28 FOOD_DES: 8,789 foods, all generic here.
    expect(await service.prepare()).toEqual({ indexed: 8789, foods: 8789 });
    const report = await service.run({ text });
    expect(report.report.entries).toHaveLength(labelledLines().length);
    expect(report).toEqual(plain);
  });
});

if (!hasSr28) console.log(SR28_MISSING);
