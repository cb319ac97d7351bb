import { sql, type Kysely } from 'kysely';

// The clinic's food glossary (patient-facing food names per language), the names the food
// tables themselves carry in other languages, and the plate ledger's unsaved draft per plan.
// Frozen once landed: fix forward with a new migration.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('food_glossary')
    .addColumn('food_id', 'integer', (c) => c.notNull().references('food.id').onDelete('cascade'))
    // BCP-47 handout language of the catalogue ('es', 'zh-Hans')
    .addColumn('language', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    // 'drafted' until someone who reads the language has checked it
    .addColumn('status', 'text', (c) => c.notNull().check(sql`status in ('drafted', 'reviewed')`))
    .addColumn('updated_by', 'integer')
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('food_glossary_pk', ['food_id', 'language'])
    .execute();

  await db.schema
    .createTable('food_local_name')
    .addColumn('food_id', 'integer', (c) => c.notNull().references('food.id').onDelete('cascade'))
    .addColumn('language', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('food_local_name_pk', ['food_id', 'language'])
    .execute();

  await db.schema
    .createTable('plan_draft')
    .addColumn('plan_id', 'integer', (c) =>
      c.primaryKey().references('plan.id').onDelete('cascade'),
    )
    // the version the draft was started from (a newer saved version makes the draft stale)
    .addColumn('base_version', 'integer', (c) => c.notNull())
    // the plan as the client last sent it (the plans API input, JSON)
    .addColumn('input_json', 'text', (c) => c.notNull())
    .addColumn('updated_by', 'integer')
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('plan_draft').execute();
  await db.schema.dropTable('food_local_name').execute();
  await db.schema.dropTable('food_glossary').execute();
}
