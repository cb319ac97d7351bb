import type { Kysely } from 'kysely';
import type { DB } from '../db/schema.js';
import type { NameStatus } from './glossary.js';

export interface GlossaryRow {
  foodId: number;
  language: string;
  name: string;
  status: NameStatus;
  foodSource: string;
  foodCode: string;
  tableName: string;
}

/** All Kysely code of the clinic glossary and the tables' own names in other languages. */
export class GlossaryRepository {
  constructor(private readonly db: Kysely<DB>) {}

  private base() {
    return this.db
      .selectFrom('food_glossary as g')
      .innerJoin('food as f', 'f.id', 'g.food_id')
      .innerJoin('food_source as s', 's.id', 'f.source_id')
      .select([
        'g.food_id as foodId',
        'g.language as language',
        'g.name as name',
        'g.status as status',
        's.format as foodSource',
        'f.code as foodCode',
        'f.name as tableName',
      ]);
  }

  async list(opts: { language?: string | undefined; foodIds?: readonly number[] } = {}) {
    let q = this.base();
    if (opts.language) q = q.where('g.language', '=', opts.language);
    if (opts.foodIds) {
      if (opts.foodIds.length === 0) return [];
      q = q.where('g.food_id', 'in', [...opts.foodIds]);
    }
    const rows = await q.orderBy('g.language').orderBy('f.name').execute();
    return rows as GlossaryRow[];
  }

  async upsert(
    entry: { foodId: number; language: string; name: string; status: NameStatus },
    by: number | null,
    at: string,
  ): Promise<void> {
    await this.db
      .insertInto('food_glossary')
      .values({
        food_id: entry.foodId,
        language: entry.language,
        name: entry.name,
        status: entry.status,
        updated_by: by,
        updated_at: at,
      })
      .onConflict((oc) =>
        oc.columns(['food_id', 'language']).doUpdateSet({
          name: entry.name,
          status: entry.status,
          updated_by: by,
          updated_at: at,
        }),
      )
      .execute();
  }

  async upsertMany(
    entries: readonly { foodId: number; language: string; name: string; status: NameStatus }[],
    by: number | null,
    at: string,
  ): Promise<void> {
    await this.db.transaction().execute(async (trx) => {
      const repo = new GlossaryRepository(trx);
      for (const e of entries) await repo.upsert(e, by, at);
    });
  }

  async remove(foodId: number, language: string): Promise<boolean> {
    const r = await this.db
      .deleteFrom('food_glossary')
      .where('food_id', '=', foodId)
      .where('language', '=', language)
      .executeTakeFirst();
    return Number(r.numDeletedRows) > 0;
  }

  /** The tables' own names of the foods in the given languages. */
  async localNames(foodIds: readonly number[], languages: readonly string[]) {
    if (foodIds.length === 0 || languages.length === 0) return [];
    return this.db
      .selectFrom('food_local_name')
      .select(['food_id as foodId', 'language', 'name'])
      .where('food_id', 'in', [...foodIds])
      .where('language', 'in', [...languages])
      .execute();
  }

  async findFoodById(foodId: number): Promise<boolean> {
    const r = await this.db
      .selectFrom('food')
      .select('id')
      .where('id', '=', foodId)
      .executeTakeFirst();
    return r !== undefined;
  }

  /** Food ids by source format and code (the newest release first). */
  async findFoods(keys: readonly { foodSource: string; foodCode: string }[]) {
    if (keys.length === 0) return new Map<string, number>();
    const codes = [...new Set(keys.map((k) => k.foodCode))];
    const out = new Map<string, number>();
    for (let i = 0; i < codes.length; i += 500) {
      const rows = await this.db
        .selectFrom('food as f')
        .innerJoin('food_source as s', 's.id', 'f.source_id')
        .select(['f.id as id', 'f.code as code', 's.format as format'])
        .where('f.code', 'in', codes.slice(i, i + 500))
        .orderBy('s.imported_at', 'asc')
        .execute();
      for (const r of rows) out.set(`${r.format}|${r.code}`, r.id);
    }
    return out;
  }
}
