import { sql, type Kysely } from 'kysely';

// Frozen once landed: fix forward with a new migration.
// Type-ahead sends one- to three-letter prefixes ("c", "ch", "che"): without a prefix index FTS5
// merges the doclists of every matching term (100+ ms on a million foods); with one it reads a
// single list (under 1 ms). Rebuilds food_fts with prefix = '1 2 3' and refills it from food.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`drop table if exists food_fts`.execute(db);
  await sql`create virtual table food_fts using fts5(
    name, alt_names, kind, tokenize = 'unicode61 remove_diacritics 2', prefix = '1 2 3'
  )`.execute(db);
  await sql`insert into food_fts (rowid, name, alt_names, kind)
    select id, name, coalesce((select group_concat(value, ' | ') from json_each(food.alt_names)), ''), kind
    from food`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop table if exists food_fts`.execute(db);
  await sql`create virtual table food_fts using fts5(
    name, alt_names, kind, tokenize = 'unicode61 remove_diacritics 2'
  )`.execute(db);
  await sql`insert into food_fts (rowid, name, alt_names, kind)
    select id, name, coalesce((select group_concat(value, ' | ') from json_each(food.alt_names)), ''), kind
    from food`.execute(db);
}
