import { sql, type Kysely } from 'kysely';

// Diary audits and the clinic's remembered diary matches.
// Frozen once landed: fix forward with a new migration.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('diary_audit')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    // null = anonymous audit (no patient linked)
    .addColumn('patient_id', 'integer', (c) => c.references('patient.id').onDelete('cascade'))
    // 'complete' = every line was read; 'incomplete' = some lines could not be read (listed)
    .addColumn('status', 'text', (c) =>
      c.notNull().check(sql`status in ('complete', 'incomplete')`),
    )
    .addColumn('source_format', 'text', (c) => c.notNull())
    .addColumn('entry_count', 'integer', (c) => c.notNull())
    .addColumn('matched_count', 'integer', (c) => c.notNull())
    // The entries as read (JSON), so a changed match can be recomputed.
    .addColumn('entries_json', 'text', (c) => c.notNull())
    // Dietitian's chosen foods by line (JSON object line -> food id).
    .addColumn('overrides_json', 'text', (c) => c.notNull().defaultTo('{}'))
    .addColumn('report_json', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer')
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();
  await db.schema
    .createIndex('diary_audit_patient_idx')
    .on('diary_audit')
    .column('patient_id')
    .execute();

  await db.schema
    .createTable('diary_match_memory')
    .addColumn('clinic', 'text', (c) => c.notNull())
    // folded words of the diary phrase
    .addColumn('phrase_key', 'text', (c) => c.notNull())
    .addColumn('food_id', 'integer', (c) => c.notNull().references('food.id').onDelete('cascade'))
    .addColumn('confirmed_by', 'integer')
    .addColumn('times_confirmed', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('diary_match_memory_pk', ['clinic', 'phrase_key'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('diary_match_memory').ifExists().execute();
  await db.schema.dropTable('diary_audit').ifExists().execute();
}
