import { sql, type Kysely } from 'kysely';

// Frozen once landed: fix forward with a new migration.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('food_source')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('format', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('release', 'text', (c) => c.notNull())
    .addColumn('licence', 'text', (c) => c.notNull())
    .addColumn('url', 'text')
    .addColumn('imported_at', 'text', (c) => c.notNull())
    .addColumn('food_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('nutrient_value_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('portion_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('skipped_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addUniqueConstraint('food_source_format_release_uq', ['format', 'release'])
    .execute();

  await db.schema
    .createTable('food')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('source_id', 'integer', (c) =>
      c.notNull().references('food_source.id').onDelete('cascade'),
    )
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    // JSON array of alternate / local-language names
    .addColumn('alt_names', 'text', (c) => c.notNull().defaultTo('[]'))
    .addColumn('food_group', 'text')
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('generic', 'branded')`))
    .addColumn('brand_owner', 'text')
    .addColumn('gtin', 'text')
    .addColumn('ingredients', 'text')
    .addColumn('ingredients_lang', 'text')
    .addColumn('serving_g', 'real')
    .addColumn('serving_text', 'text')
    // Core nutrients per 100 g edible portion, denormalised for search and summaries.
    // NULL means the table has no value, never 0.
    .addColumn('phosphorus_mg', 'real')
    .addColumn('protein_g', 'real')
    .addColumn('energy_kcal', 'real')
    .addColumn('potassium_mg', 'real')
    .addColumn('sodium_mg', 'real')
    .addColumn('calcium_mg', 'real')
    .addColumn('water_g', 'real')
    .addColumn('phytate_mg', 'real')
    // Phosphate-additive scan of the ingredient statement (JSON) and the catalogue version used.
    .addColumn('additive_scan', 'text')
    .addColumn('additive_scan_version', 'text')
    .addUniqueConstraint('food_source_code_uq', ['source_id', 'code'])
    .execute();
  await db.schema.createIndex('food_gtin_idx').on('food').column('gtin').execute();
  await db.schema.createIndex('food_code_idx').on('food').column('code').execute();
  await db.schema.createIndex('food_group_idx').on('food').column('food_group').execute();

  await db.schema
    .createTable('nutrient_def')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('source_id', 'integer', (c) =>
      c.notNull().references('food_source.id').onDelete('cascade'),
    )
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('unit', 'text', (c) => c.notNull())
    .addColumn('tag', 'text')
    .addColumn('sort_order', 'integer')
    .addUniqueConstraint('nutrient_def_source_code_uq', ['source_id', 'code'])
    .execute();

  await sql`create table nutrient_value (
    food_id integer not null references food(id) on delete cascade,
    nutrient_def_id integer not null references nutrient_def(id) on delete cascade,
    value_per_100g real not null,
    derivation_code text,
    source_code text,
    primary key (food_id, nutrient_def_id)
  ) without rowid`.execute(db);
  await db.schema
    .createIndex('nutrient_value_def_idx')
    .on('nutrient_value')
    .column('nutrient_def_id')
    .execute();

  await db.schema
    .createTable('portion')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('food_id', 'integer', (c) => c.notNull().references('food.id').onDelete('cascade'))
    .addColumn('seq', 'integer', (c) => c.notNull())
    .addColumn('amount', 'real', (c) => c.notNull())
    .addColumn('description', 'text', (c) => c.notNull())
    .addColumn('grams', 'real', (c) => c.notNull())
    .execute();
  await db.schema.createIndex('portion_food_idx').on('portion').column('food_id').execute();

  // Names, alternate names and the kind ('generic' | 'branded', so a query can ask for one kind
  // without scanning the other); rowid = food.id. Maintained by the importers in their transaction.
  await sql`create virtual table food_fts using fts5(
    name, alt_names, kind, tokenize = 'unicode61 remove_diacritics 2'
  )`.execute(db);

  await db.schema
    .createTable('setting')
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('value_json', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop table if exists food_fts`.execute(db);
  for (const t of ['setting', 'portion', 'nutrient_value', 'nutrient_def', 'food', 'food_source']) {
    await db.schema.dropTable(t).ifExists().execute();
  }
}
