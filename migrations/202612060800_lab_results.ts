import { sql, type Kysely } from 'kysely';

// Lab results move from the patient's `labs_json` to rows of their own; binder prescription
// changes get a history; a patient may carry the identifier the clinic's record system uses.
// Frozen once landed: fix forward with a new migration.

/**
 * mg/dL per mmol/L for the two analytes the JSON could hold, from IUPAC standard atomic weights
 * (P 30.974, Ca 40.078 g/mol; Prohaska et al., Pure Appl Chem 2022): mg/dL = mmol/L x g/mol / 10.
 * Written out here because a migration imports nothing from src/.
 */
const MG_PER_DL_PER_MMOL_PER_L: Record<string, number> = { phosphate: 3.0974, calcium: 4.0078 };

interface OldLab {
  analyte: string;
  value: number;
  unit: string;
  date: string;
}

function checkOldLab(l: unknown, patientId: number, i: number): OldLab {
  const x = l as Partial<OldLab> | null;
  const ok =
    x !== null &&
    typeof x === 'object' &&
    typeof x.analyte === 'string' &&
    x.analyte in MG_PER_DL_PER_MMOL_PER_L &&
    typeof x.value === 'number' &&
    Number.isFinite(x.value) &&
    (x.unit === 'mg/dL' || x.unit === 'mmol/L') &&
    typeof x.date === 'string' &&
    /^\d{4}-\d{2}-\d{2}$/.test(x.date);
  if (!ok) {
    // Refuse rather than drop: the migration stops and the database stays as it was.
    throw new Error(
      `patient ${patientId}: labs_json entry ${i} cannot be moved: ${JSON.stringify(l)}`,
    );
  }
  return x as OldLab;
}

function canonicalMgPerDl(l: OldLab): number {
  const f = MG_PER_DL_PER_MMOL_PER_L[l.analyte] ?? NaN;
  return l.unit === 'mg/dL' ? l.value : Number((l.value * f).toPrecision(6));
}

async function moveLabs(db: Kysely<any>): Promise<void> {
  const patients = (await db
    .selectFrom('patient')
    .select(['id', 'labs_json', 'created_at'])
    .execute()) as Array<{
    id: number;
    labs_json: string;
    created_at: string;
  }>;
  const rows: Record<string, unknown>[] = [];
  for (const p of patients) {
    let list: unknown;
    try {
      list = JSON.parse(p.labs_json);
    } catch {
      throw new Error(`patient ${p.id}: labs_json is not JSON and cannot be moved`);
    }
    if (!Array.isArray(list)) throw new Error(`patient ${p.id}: labs_json is not a list`);
    list.forEach((raw, i) => {
      const l = checkOldLab(raw, p.id, i);
      rows.push({
        patient_id: p.id,
        analyte: l.analyte,
        value: l.value,
        unit: l.unit,
        canonical_value: canonicalMgPerDl(l),
        canonical_unit: 'mg/dL',
        taken_on: l.date,
        taken_at: null,
        source: 'typed',
        source_ref: 'moved from the patient record',
        loinc_code: null,
        entered_by: null,
        created_at: p.created_at,
      });
    });
  }
  for (let i = 0; i < rows.length; i += 500) {
    await db
      .insertInto('lab_result')
      .values(rows.slice(i, i + 500))
      .execute();
  }
}

/** Seeds the binder history from what each plan version froze, then the record's current one. */
async function seedBinderHistory(db: Kysely<any>): Promise<void> {
  const versions = (
    await sql<{ patient_id: number; context_json: string; created_at: string }>`
    select p.patient_id, v.context_json, v.created_at from plan_version v
    join plan p on p.id = v.plan_id order by p.patient_id, v.created_at, v.id`.execute(db)
  ).rows;
  const last = new Map<number, string>();
  for (const v of versions) {
    let binder: unknown = null;
    try {
      binder = (JSON.parse(v.context_json) as { binder?: unknown }).binder ?? null;
    } catch {
      continue;
    }
    const json = binder === null ? null : JSON.stringify(binder);
    if (last.has(v.patient_id) ? last.get(v.patient_id) === (json ?? '') : json === null) continue;
    last.set(v.patient_id, json ?? '');
    await db
      .insertInto('binder_change')
      .values({
        patient_id: v.patient_id,
        binder_json: json,
        changed_at: v.created_at,
        changed_by: null,
        source: 'plan-version',
      })
      .execute();
  }
  const patients = (await db
    .selectFrom('patient')
    .select(['id', 'binder_json', 'updated_at'])
    .execute()) as Array<{
    id: number;
    binder_json: string | null;
    updated_at: string;
  }>;
  for (const p of patients) {
    const prev = last.get(p.id);
    const now = p.binder_json === null ? '' : JSON.stringify(JSON.parse(p.binder_json));
    if (prev === undefined ? now === '' : prev === now) continue;
    await db
      .insertInto('binder_change')
      .values({
        patient_id: p.id,
        binder_json: now === '' ? null : now,
        changed_at: p.updated_at,
        changed_by: null,
        source: 'record',
      })
      .execute();
  }
}

// SQLite DDL is transactional but Kysely's migrator does not open a transaction for it: one is
// opened here, so a result that cannot be moved leaves the database exactly as it was.
export async function up(db: Kysely<any>): Promise<void> {
  await db.transaction().execute((trx) => upInTransaction(trx));
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.transaction().execute((trx) => downInTransaction(trx));
}

async function upInTransaction(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('lab_result')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('patient_id', 'integer', (c) => c.notNull().references('patient.id'))
    .addColumn('analyte', 'text', (c) => c.notNull())
    // as entered (or as the FHIR Observation gave it)
    .addColumn('value', 'real', (c) => c.notNull())
    .addColumn('unit', 'text', (c) => c.notNull())
    .addColumn('canonical_value', 'real', (c) => c.notNull())
    .addColumn('canonical_unit', 'text', (c) => c.notNull())
    // date the sample was taken (YYYY-MM-DD); taken_at keeps a FHIR time when one was given
    .addColumn('taken_on', 'text', (c) => c.notNull())
    .addColumn('taken_at', 'text')
    .addColumn('source', 'text', (c) => c.notNull().check(sql`source in ('typed', 'file', 'fhir')`))
    .addColumn('source_ref', 'text')
    .addColumn('loinc_code', 'text')
    .addColumn('entered_by', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .execute();
  await db.schema
    .createIndex('lab_result_patient_idx')
    .on('lab_result')
    .columns(['patient_id', 'analyte', 'taken_on'])
    .execute();

  await db.schema
    .createTable('binder_change')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('patient_id', 'integer', (c) => c.notNull().references('patient.id'))
    // the prescription from then on (JSON), null = no binder
    .addColumn('binder_json', 'text')
    .addColumn('changed_at', 'text', (c) => c.notNull())
    .addColumn('changed_by', 'text')
    .addColumn('source', 'text', (c) => c.notNull())
    .execute();
  await db.schema
    .createIndex('binder_change_patient_idx')
    .on('binder_change')
    .column('patient_id')
    .execute();

  await db.schema.alterTable('patient').addColumn('identifier_system', 'text').execute();
  await db.schema.alterTable('patient').addColumn('identifier_value', 'text').execute();
  // one patient per identifier; '' stands for "no system" so the pair stays unique
  await sql`create unique index patient_identifier_uq on patient(coalesce(identifier_system, ''), identifier_value)
    where identifier_value is not null`.execute(db);

  await moveLabs(db);
  await seedBinderHistory(db);
  await db.schema.alterTable('patient').dropColumn('labs_json').execute();
}

async function downInTransaction(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable('patient')
    .addColumn('labs_json', 'text', (c) => c.notNull().defaultTo('[]'))
    .execute();
  // Only the results the JSON could hold go back (phosphate and calcium in mg/dL or mmol/L).
  const rows = (await db
    .selectFrom('lab_result')
    .select(['patient_id', 'analyte', 'value', 'unit', 'taken_on'])
    .where('analyte', 'in', ['phosphate', 'calcium'])
    .where('unit', 'in', ['mg/dL', 'mmol/L'])
    .orderBy('id')
    .execute()) as Array<{
    patient_id: number;
    analyte: string;
    value: number;
    unit: string;
    taken_on: string;
  }>;
  const byPatient = new Map<number, OldLab[]>();
  for (const r of rows) {
    const list = byPatient.get(r.patient_id) ?? [];
    list.push({ analyte: r.analyte, value: r.value, unit: r.unit, date: r.taken_on });
    byPatient.set(r.patient_id, list);
  }
  for (const [id, list] of byPatient) {
    await db
      .updateTable('patient')
      .set({ labs_json: JSON.stringify(list) })
      .where('id', '=', id)
      .execute();
  }
  await sql`drop index if exists patient_identifier_uq`.execute(db);
  await db.schema.alterTable('patient').dropColumn('identifier_value').execute();
  await db.schema.alterTable('patient').dropColumn('identifier_system').execute();
  await db.schema.dropTable('binder_change').ifExists().execute();
  await db.schema.dropTable('lab_result').ifExists().execute();
}
