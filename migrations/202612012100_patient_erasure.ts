import { sql, type Kysely } from 'kysely';

// Patient erasure: plan versions stay immutable, except while their patient is being erased
// (a row in patient_erasure, inserted and removed inside the erasing transaction).
// Frozen once landed: fix forward with a new migration.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('patient_erasure')
    .addColumn('patient_id', 'integer', (c) => c.primaryKey())
    .addColumn('started_at', 'text', (c) => c.notNull())
    .execute();
  await sql`drop trigger if exists plan_version_no_delete`.execute(db);
  await sql`create trigger plan_version_no_delete before delete on plan_version
    when not exists (
      select 1 from patient_erasure e join plan p on p.patient_id = e.patient_id
      where p.id = old.plan_id
    )
    begin select raise(abort, 'plan versions are immutable'); end`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop trigger if exists plan_version_no_delete`.execute(db);
  await sql`create trigger plan_version_no_delete before delete on plan_version
    begin select raise(abort, 'plan versions are immutable'); end`.execute(db);
  await db.schema.dropTable('patient_erasure').ifExists().execute();
}
