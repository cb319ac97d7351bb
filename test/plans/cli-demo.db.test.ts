import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { fixedClock } from '../../src/clock.js';
import { migrateToLatest, openDb, openMemoryDb, type Db } from '../../src/db/database.js';
import { DEMO_FOOD_CODES, seedDemoData } from '../../src/plans/demo-seed.js';
import { fakeIfctFoods } from '../helpers/demo-plan.js';
import { insertFoods } from '../helpers/sr28.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

function sink() {
  const s = new PassThrough();
  let text = '';
  s.on('data', (c: Buffer) => (text += c.toString('utf8')));
  return { stream: s, text: () => text };
}

describe('demo seed (invented demo data over the IFCT 2017 codes)', () => {
  let db: Db;
  beforeEach(async () => {
    db = await openMemoryDb();
  });
  afterEach(async () => db.close());

  it('seeds nothing and says so when the IFCT 2017 table is missing', async () => {
    const out = sink();
    expect(
      await seedDemoData({ db, clock, config: { seedDemo: true }, io: { stdout: out.stream } }),
    ).toBe('no-table');
    expect(out.text()).toMatch(/demo data not seeded: the IFCT 2017 table is not imported/);
    expect(db.sqlite.prepare('select count(*) n from patient').get()).toEqual({ n: 0 });
  });

  it('seeds one demo patient with a three-day plan once, and never when skipped', async () => {
    insertFoods(db, fakeIfctFoods(DEMO_FOOD_CODES), {
      format: 'ifct2017',
      name: 'IFCT 2017 (test stand-in)',
      release: 'test',
    });
    const out = sink();
    expect(
      await seedDemoData({ db, clock, config: { seedDemo: false }, io: { stdout: out.stream } }),
    ).toBe('skipped');
    expect(
      await seedDemoData({ db, clock, config: { seedDemo: true }, io: { stdout: out.stream } }),
    ).toBe('seeded');
    expect(
      await seedDemoData({ db, clock, config: { seedDemo: true }, io: { stdout: out.stream } }),
    ).toBe('skipped');
    const patients = db.sqlite.prepare('select label, is_demo from patient').all();
    expect(patients).toEqual([{ label: 'DEMO-01 (invented demo patient)', is_demo: 1 }]);
    const clinic = db.sqlite
      .prepare("select value_json from setting where key = 'clinic'")
      .get() as {
      value_json: string;
    };
    expect(JSON.parse(clinic.value_json).name).toMatch(/invented demo data/);
    const plans = db.sqlite.prepare('select name, day_count, is_demo from plan').all();
    expect(plans).toEqual([
      { name: 'Three-day starter plan (invented demo data)', day_count: 3, is_demo: 1 },
    ]);
  });
});

describe('CLI plan list / plan summary (JSON contracts)', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'phosledger-plan-cli-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  async function cli(args: string[]) {
    const out = sink();
    const err = sink();
    const code = await runCli([...args, '--db', join(dir, 'db.sqlite')], {
      stdout: out.stream,
      stderr: err.stream,
      stdin: new PassThrough(),
      env: {},
    });
    return { code, out: out.text(), err: err.text() };
  }

  it('lists plans as [{id, patientId, name, days}] and prints the summary contract', async () => {
    const db = openDb(join(dir, 'db.sqlite'));
    await migrateToLatest(db);
    insertFoods(db, fakeIfctFoods(DEMO_FOOD_CODES), {
      format: 'ifct2017',
      name: 'IFCT 2017 (test stand-in)',
      release: 'test',
    });
    await seedDemoData({
      db,
      clock,
      config: { seedDemo: true },
      io: { stdout: new PassThrough() },
    });
    await db.close();

    const list = await cli(['plan', 'list', '--json']);
    expect(list.code).toBe(0);
    expect(JSON.parse(list.out)).toEqual([
      { id: 1, patientId: 1, name: 'Three-day starter plan (invented demo data)', days: 3 },
    ]);

    const summary = await cli(['plan', 'summary', '1', '--json']);
    expect(summary.code, summary.err).toBe(0);
    const s = JSON.parse(summary.out);
    expect(s).toMatchObject({ planId: 1, patientId: 1 });
    expect(s.days.map((d: { label: string }) => d.label)).toEqual(['Day 1', 'Day 2', 'Day 3']);
    expect(s.days[0].occasions[0].items[0]).toMatchObject({ label: 'chapati (3)', grams: 90 });
    expect(s.binders.prescription).toMatchObject({ ingredient: 'calcium-acetate', units: 6 });
    // calcium acetate 667 mg: 6 x 169.01 = 1,014.1 mg elemental calcium a day (formula, IUPAC weights)
    expect(s.binders.elementalCalciumMgPerDay).toBeCloseTo(1014.1, 1);

    const text = await cli(['plan', 'summary', '1']);
    expect(text.out).toMatch(/Day 1: /);
    const missing = await cli(['plan', 'summary', '42']);
    expect(missing.code).toBe(1);
    expect(missing.err).toMatch(/plan 42 not found/);
    const bad = await cli(['plan', 'summary', 'x']);
    expect(bad.code).toBe(2);

    writeFileSync(join(dir, 'bad.json'), JSON.stringify({ name: 'x', days: [] }));
    const create = await cli(['plan', 'create', '--patient', '1', '--file', join(dir, 'bad.json')]);
    expect(create.code).toBe(1);
    expect(create.err).toMatch(/days: a plan needs at least one day/);
  });
});
