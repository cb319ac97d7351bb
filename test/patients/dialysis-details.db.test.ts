import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { PatientService } from '../../src/patients/patients.service.js';

const clock = fixedClock('2026-12-06T09:30:00Z'); // invented fixed test time

describe('dialysis details on the record (migration 202612060100; invented demo patient)', () => {
  let db: Db;
  let patients: PatientService;
  beforeEach(async () => {
    db = await openMemoryDb();
    patients = new PatientService(db.kysely, clock);
  });
  afterEach(async () => db.close());

  it('stores urine output and dialysate glucose, and the targets use them', async () => {
    const p = await patients.create({
      label: 'PD-01 (invented)',
      weightKg: 60,
      ckdStage: '5',
      dialysis: 'hemodialysis',
      diabetes: false,
      urineOutputMlPerDay: 450,
    });
    expect(p.urineOutputMlPerDay).toBe(450);
    expect(p.pdDialysateGlucoseGPerDay).toBeNull();
    // 450 mL urine + 500 mL (common practice, no source) = 950 mL/day
    expect((await patients.targets(p.id)).fluidMl.max).toBe(950);
    const pd = await patients.update(p.id, {
      dialysis: 'peritoneal-dialysis',
      pdDialysateGlucoseGPerDay: 100,
    });
    expect(pd.pdDialysateGlucoseGPerDay).toBe(100);
    // 100 g x 0.6 x 3.4 kcal/g = 204 kcal; 25 x 60 = 1,500 - 204 = 1,296 kcal from food
    expect((await patients.targets(p.id)).energyKcal.min).toBe(1296);
    // an update that leaves them out keeps them
    expect((await patients.update(p.id, { weightKg: 61 })).urineOutputMlPerDay).toBe(450);
  });

  it('refuses a negative urine output, naming the field', async () => {
    await expect(
      patients.create({
        label: 'X (invented)',
        weightKg: 60,
        ckdStage: '5',
        dialysis: 'hemodialysis',
        diabetes: false,
        urineOutputMlPerDay: -5,
      }),
    ).rejects.toThrow(/urineOutputMlPerDay must be between 0 and 5000 mL\/day/);
  });
});
