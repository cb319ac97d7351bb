import type { Kysely } from 'kysely';
import type { DB } from '../db/schema.js';

export interface StoredScanRow {
  id: number;
  additive_scan: string | null;
  additive_scan_version: string | null;
}

export interface StatementRow {
  id: number;
  ingredients: string;
  ingredients_lang: string | null;
  additive_scan_version: string | null;
}

/** Kysely code for the additive-scan columns of `food`. */
export class AdditiveScanRepository {
  constructor(private readonly db: Kysely<DB>) {}

  /** Stored scans of the given foods (chunked below SQLite's parameter limit). */
  async getScans(ids: readonly number[]): Promise<StoredScanRow[]> {
    const out: StoredScanRow[] = [];
    const unique = [...new Set(ids)];
    for (let i = 0; i < unique.length; i += 5000) {
      const rows = await this.db
        .selectFrom('food')
        .select(['id', 'additive_scan', 'additive_scan_version'])
        .where('id', 'in', unique.slice(i, i + 5000))
        .where('additive_scan', 'is not', null)
        .execute();
      out.push(...rows);
    }
    return out;
  }

  /** One page of foods that have an ingredient statement, by id. */
  async statementsAfter(afterId: number, limit: number): Promise<StatementRow[]> {
    const rows = await this.db
      .selectFrom('food')
      .select(['id', 'ingredients', 'ingredients_lang', 'additive_scan_version'])
      .where('ingredients', 'is not', null)
      .where('id', '>', afterId)
      .orderBy('id')
      .limit(limit)
      .execute();
    return rows as StatementRow[];
  }

  /** Foods with a statement whose scan is missing or from another catalogue version. */
  async countOutdated(version: string): Promise<number> {
    const r = await this.db
      .selectFrom('food')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('ingredients', 'is not', null)
      .where((eb) =>
        eb.or([
          eb('additive_scan_version', 'is', null),
          eb('additive_scan_version', '!=', version),
        ]),
      )
      .executeTakeFirst();
    return Number(r?.n ?? 0);
  }

  async countStatements(): Promise<number> {
    const r = await this.db
      .selectFrom('food')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('ingredients', 'is not', null)
      .executeTakeFirst();
    return Number(r?.n ?? 0);
  }

  /** Writes new scans in one transaction: all of the page or none of it. */
  async saveScans(rows: { id: number; scan: string; version: string }[]): Promise<void> {
    if (rows.length === 0) return;
    await this.db.transaction().execute(async (trx) => {
      for (const r of rows) {
        await trx
          .updateTable('food')
          .set({ additive_scan: r.scan, additive_scan_version: r.version })
          .where('id', '=', r.id)
          .execute();
      }
    });
  }
}
