import { sql, type Kysely } from 'kysely';

// Frozen once landed: fix forward with a new migration.
// ndb_number: the SR28 NDB number an FDC SR Legacy / Foundation food carries (sr_legacy_food.csv,
// foundation_food.csv), and the code of a usda-sr28 food, so the same food from two releases can
// be linked. serving_ml: a label serving given as a volume, kept as millilitres (grams would need
// a density the label does not give). import_reservation: the food ids (and, for a new release,
// the food_source id) an import publishing in steps has taken, so rows it wrote before its last
// step can be removed if it dies (they are invisible: no food row has those ids).
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create table import_reservation (
    id integer primary key,
    food_id_from integer not null,
    food_id_to integer not null,
    source_id integer not null,
    new_source integer not null,
    def_id_floor integer not null,
    pid integer not null,
    created_at text not null
  )`.execute(db);
  await sql`alter table food add column ndb_number text`.execute(db);
  await sql`alter table food add column serving_ml real`.execute(db);
  await sql`create index food_ndb_number_idx on food (ndb_number) where ndb_number is not null`.execute(
    db,
  );
  await sql`update food set ndb_number = code
    where source_id in (select id from food_source where format = 'usda-sr28')`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop table if exists import_reservation`.execute(db);
  await sql`drop index if exists food_ndb_number_idx`.execute(db);
  await sql`alter table food drop column serving_ml`.execute(db);
  await sql`alter table food drop column ndb_number`.execute(db);
}
