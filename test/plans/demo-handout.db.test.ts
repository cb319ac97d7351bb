import { PassThrough } from 'node:stream';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import type { Food } from '../../src/foods/food.js';
import { HandoutService, handoutSourcesFromDb } from '../../src/handouts/handouts.service.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { PatientService } from '../../src/patients/patients.service.js';
import { DEMO_FOOD_CODES, seedDemoData } from '../../src/plans/demo-seed.js';
import { testFood } from '../helpers/food.js';
import { insertFoods } from '../helpers/sr28.js';

const clock = fixedClock('2026-12-06T09:30:00Z'); // invented fixed test time

/** Invented test foods carrying the demo's IFCT 2017 codes (values invented, not IFCT's). */
function fakeIfctFoods(): Food[] {
  return DEMO_FOOD_CODES.map((code, i) =>
    testFood({
      id: 0,
      sourceId: 0,
      source: 'ifct2017',
      sourceRelease: 'test',
      code,
      name: `Invented test food ${code}`,
      group: 'Invented',
      // invented: some foods carry almost no phosphorus, so some occasions fall under 50 mg
      per100g: { phosphorusMg: i % 3 === 0 ? 5 : 90 + i * 10, proteinG: 4 + i, calciumMg: 30 },
    }),
  );
}

describe('the demo patient (invented demo data): handout and targets', () => {
  let db: Db;
  beforeEach(async () => {
    db = await openMemoryDb();
    insertFoods(db, fakeIfctFoods(), {
      format: 'ifct2017',
      name: 'IFCT 2017 (test stand-in)',
      release: 'test',
    });
    const out = new PassThrough();
    out.resume();
    await seedDemoData({ db, clock, config: { seedDemo: true }, io: { stdout: out } });
  });
  afterEach(async () => db.close());

  it('states the full prescribed dose: 6 calcium acetate a day, and every day shows 6', async () => {
    const planId = (db.sqlite.prepare('select id from plan').get() as { id: number }).id;
    const languages = loadCataloguesOrThrow();
    const handouts = new HandoutService(
      handoutSourcesFromDb(db, clock, languages.list()),
      languages,
      clock,
    );
    const { vm } = await handouts.prepare(planId, { lang: 'en', mode: 'refuse' });
    // demoPatient(): calcium acetate 667 mg, 6 units per day
    expect(vm.binder.lines[0]).toBe('6 tablets a day in all, spread over your meals as shown.');
    expect(vm.binder.lines).toContain('Swallow it whole. Do not crush or chew it.');
    for (const day of vm.days) {
      const units = day.occasions.reduce((s, o) => s + (o.binder?.units ?? 0), 0);
      expect(units).toBe(6);
      for (const o of day.occasions)
        expect(o.binder?.line ?? '').not.toMatch(/not needed|no binder needed/i);
    }
  });

  it('its raised phosphate (1.94 mmol/L = 6.01 mg/dL > 5.5 mg/dL, KDOQI 2003 4.1) brings the phosphorus default', async () => {
    const patients = new PatientService(db.kysely, clock);
    const id = (db.sqlite.prepare('select id from patient').get() as { id: number }).id;
    const t = await patients.targets(id);
    expect(t.phosphorusMg).toMatchObject({ min: 800, max: 1000, setBy: 'default' });
    expect(t.potassiumMg).toMatchObject({ max: 2737, setBy: 'default' }); // EBPG 2007, hemodialysis
  });
});
