import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { openDb } from '../../src/db/database.js';

// No source needed: invented rows in a scratch table, checked against what was written.
describe('kept statements behind Kysely', () => {
  it('give fresh results on every run and follow a schema change', async () => {
    const db = openDb(':memory:');
    await sql`create table t (id integer primary key, v text)`.execute(db.kysely);
    const read = () => sql<Record<string, unknown>>`select * from t order by id`.execute(db.kysely);
    await sql`insert into t (v) values (${'a'})`.execute(db.kysely);
    expect((await read()).rows).toEqual([{ id: 1, v: 'a' }]);
    await sql`insert into t (v) values (${'b'})`.execute(db.kysely);
    expect((await read()).rows).toEqual([
      { id: 1, v: 'a' },
      { id: 2, v: 'b' },
    ]);
    // The same SQL text after the table changed shape: SQLite re-compiles the kept statement.
    await sql`alter table t add column w integer default 7`.execute(db.kysely);
    expect((await read()).rows).toEqual([
      { id: 1, v: 'a', w: 7 },
      { id: 2, v: 'b', w: 7 },
    ]);
    await db.close();
  });

  it('keep working past the number of statements kept', async () => {
    const db = openDb(':memory:');
    for (let i = 0; i < 600; i++) {
      const r = await sql<{ n: number }>`select ${sql.lit(i)} + ${i} as n`.execute(db.kysely);
      expect(r.rows[0]?.n).toBe(2 * i);
    }
    await db.close();
  });
});
