import { sql, type Kysely } from 'kysely';

// Frozen once landed: fix forward with a new migration.
// Type-ahead ranks foods whose main name starts with the typed word first. FTS5 can only find
// those by reading the positions of every match (40+ ms for "ch" in a million foods); a B-tree
// on the lower-cased name answers the same prefix as a range scan.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`create index food_kind_name_lower_idx on food (kind, lower(name))`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop index if exists food_kind_name_lower_idx`.execute(db);
}
