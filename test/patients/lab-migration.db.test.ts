import { Migrator, type MigrationProvider } from 'kysely';
import { afterEach, describe, expect, it } from 'vitest';
import { migrations } from '../../migrations/index.js';
import { openDb, type Db } from '../../src/db/database.js';

const BEFORE = '202612012130_food_name_start_index';
const LABS = '202612060800_lab_results';
const provider: MigrationProvider = { getMigrations: () => Promise.resolve(migrations) };

let db: Db | undefined;
afterEach(async () => {
  await db?.close();
  db = undefined;
});

async function atOldSchema(): Promise<{ db: Db; migrator: Migrator }> {
  db = openDb(':memory:');
  const migrator = new Migrator({ db: db.kysely, provider });
  const r = await migrator.migrateTo(BEFORE);
  if (r.error) throw r.error;
  return { db, migrator };
}

// Invented demo data in the pre-migration format (labs_json on the patient row).
const OLD_LABS = [
  { analyte: 'phosphate', value: 1.94, unit: 'mmol/L', date: '2026-01-12' },
  { analyte: 'calcium', value: 9.1, unit: 'mg/dL', date: '2026-01-12' },
  { analyte: 'phosphate', value: 5.2, unit: 'mg/dL', date: '2026-02-09' },
  // the same result typed twice: both are kept (a move loses nothing)
  { analyte: 'phosphate', value: 5.2, unit: 'mg/dL', date: '2026-02-09' },
];
const BINDER = {
  ingredient: 'calcium-acetate',
  unitStrengthMg: 667,
  schedule: 'per-day',
  units: 6,
  otherMedicines: [],
};

function insertPatient(d: Db, id: number, labsJson: string, binderJson: string | null) {
  d.sqlite
    .prepare(
      `insert into patient(id, label, name, language, weight_kg, ckd_stage, dialysis, diabetes, labs_json, binder_json, target_overrides_json, created_at, updated_at)
       values (?, ?, null, 'en', 62, '5', 'hemodialysis', 0, ?, ?, '{}', '2026-01-01T09:00:00.000Z', '2026-02-20T10:00:00.000Z')`,
    )
    .run(id, `DEMO-${id} (invented)`, labsJson, binderJson);
}

describe(`migration ${LABS}: results move from labs_json to rows`, () => {
  it('moves every result with both values and keeps the plan-version binder history', async () => {
    const { db: d, migrator } = await atOldSchema();
    insertPatient(d, 1, JSON.stringify(OLD_LABS), JSON.stringify({ ...BINDER, units: 9 }));
    insertPatient(d, 2, '[]', null);
    d.sqlite
      .prepare(
        `insert into plan(id, patient_id, name, latest_version, day_count, created_at, updated_at)
         values (1, 1, 'Demo plan', 2, 1, '2026-01-05T09:00:00.000Z', '2026-02-01T09:00:00.000Z')`,
      )
      .run();
    const version = d.sqlite.prepare(
      `insert into plan_version(plan_id, version, name, content_json, foods_json, context_json, created_at)
       values (1, ?, 'Demo plan', '{}', '[]', ?, ?)`,
    );
    version.run(1, JSON.stringify({ binder: BINDER }), '2026-01-05T09:00:00.000Z');
    version.run(2, JSON.stringify({ binder: BINDER }), '2026-02-01T09:00:00.000Z');

    const r = await migrator.migrateTo(LABS);
    expect(r.error).toBeUndefined();
    const rows = d.sqlite
      .prepare(
        'select patient_id, analyte, value, unit, canonical_value, canonical_unit, taken_on, source from lab_result order by id',
      )
      .all();
    expect(rows).toEqual([
      // 1.94 mmol/L x 3.0974 (IUPAC P 30.974 / 10) = 6.00896 mg/dL
      {
        patient_id: 1,
        analyte: 'phosphate',
        value: 1.94,
        unit: 'mmol/L',
        canonical_value: 6.00896,
        canonical_unit: 'mg/dL',
        taken_on: '2026-01-12',
        source: 'typed',
      },
      {
        patient_id: 1,
        analyte: 'calcium',
        value: 9.1,
        unit: 'mg/dL',
        canonical_value: 9.1,
        canonical_unit: 'mg/dL',
        taken_on: '2026-01-12',
        source: 'typed',
      },
      ...[0, 1].map(() => ({
        patient_id: 1,
        analyte: 'phosphate',
        value: 5.2,
        unit: 'mg/dL',
        canonical_value: 5.2,
        canonical_unit: 'mg/dL',
        taken_on: '2026-02-09',
        source: 'typed',
      })),
    ]);
    const cols = (d.sqlite.pragma('table_info(patient)') as Array<{ name: string }>).map(
      (c) => c.name,
    );
    expect(cols).not.toContain('labs_json');
    expect(cols).toEqual(expect.arrayContaining(['identifier_system', 'identifier_value']));
    // two versions with the same binder give one change; the record's later one (9 units) another
    const changes = d.sqlite
      .prepare('select patient_id, changed_at, source, binder_json from binder_change order by id')
      .all() as Array<{ binder_json: string; changed_at: string; source: string }>;
    expect(changes.map((c) => [c.changed_at, c.source])).toEqual([
      ['2026-01-05T09:00:00.000Z', 'plan-version'],
      ['2026-02-20T10:00:00.000Z', 'record'],
    ]);
    expect(JSON.parse(changes[1]?.binder_json ?? 'null')).toMatchObject({ units: 9 });

    // and back: the JSON holds the same four results again
    const down = await migrator.migrateTo(BEFORE);
    expect(down.error).toBeUndefined();
    const back = d.sqlite.prepare('select labs_json from patient where id = 1').get() as {
      labs_json: string;
    };
    expect(JSON.parse(back.labs_json)).toEqual(OLD_LABS);
  });

  it('stops on a result it cannot move and leaves the database as it was', async () => {
    const { db: d, migrator } = await atOldSchema();
    insertPatient(d, 1, JSON.stringify(OLD_LABS), null);
    insertPatient(d, 7, JSON.stringify([{ analyte: 'phosphate', value: 'high', date: 'x' }]), null);
    const r = await migrator.migrateTo(LABS);
    expect(String(r.error)).toMatch(/patient 7: labs_json entry 0 cannot be moved/);
    const tables = d.sqlite
      .prepare("select name from sqlite_master where name in ('lab_result', 'binder_change')")
      .all();
    expect(tables).toEqual([]);
    const p = d.sqlite.prepare('select labs_json from patient where id = 1').get() as {
      labs_json: string;
    };
    expect(JSON.parse(p.labs_json)).toEqual(OLD_LABS);
  });
});
