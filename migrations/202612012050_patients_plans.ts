import { sql, type Kysely } from 'kysely';

// Frozen once landed: fix forward with a new migration.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('patient')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    // Clinic label or pseudonym (always present); the name is optional.
    .addColumn('label', 'text', (c) => c.notNull())
    .addColumn('name', 'text')
    .addColumn('language', 'text', (c) => c.notNull())
    .addColumn('weight_kg', 'real', (c) => c.notNull())
    .addColumn('ckd_stage', 'text', (c) => c.notNull())
    .addColumn('dialysis', 'text', (c) => c.notNull())
    .addColumn('diabetes', 'integer', (c) => c.notNull())
    // JSON: lab results, binder prescription, target overrides (validated by the service).
    .addColumn('labs_json', 'text', (c) => c.notNull().defaultTo('[]'))
    .addColumn('binder_json', 'text')
    .addColumn('target_overrides_json', 'text', (c) => c.notNull().defaultTo('{}'))
    .addColumn('is_demo', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();

  await db.schema
    .createTable('plan')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('patient_id', 'integer', (c) => c.notNull().references('patient.id'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('is_demo', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('latest_version', 'integer', (c) => c.notNull())
    .addColumn('day_count', 'integer', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();
  await db.schema.createIndex('plan_patient_idx').on('plan').column('patient_id').execute();

  // One row per save. A version holds everything its summary needs (plan content with resolved
  // grams, the foods' values, the targets, binder prescription and settings in force), so a
  // past consult is shown again exactly even after the food tables or the record change.
  await db.schema
    .createTable('plan_version')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('plan_id', 'integer', (c) => c.notNull().references('plan.id'))
    .addColumn('version', 'integer', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('content_json', 'text', (c) => c.notNull())
    .addColumn('foods_json', 'text', (c) => c.notNull())
    .addColumn('context_json', 'text', (c) => c.notNull())
    .addColumn('note', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addUniqueConstraint('plan_version_plan_version_uq', ['plan_id', 'version'])
    .execute();

  // Versions are immutable: the database itself refuses to change or remove one.
  await sql`create trigger plan_version_no_update before update on plan_version
    begin select raise(abort, 'plan versions are immutable'); end`.execute(db);
  await sql`create trigger plan_version_no_delete before delete on plan_version
    begin select raise(abort, 'plan versions are immutable'); end`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop trigger if exists plan_version_no_delete`.execute(db);
  await sql`drop trigger if exists plan_version_no_update`.execute(db);
  for (const t of ['plan_version', 'plan', 'patient']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
