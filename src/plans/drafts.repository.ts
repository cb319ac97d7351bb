import type { Kysely, Transaction } from 'kysely';
import type { DB } from '../db/schema.js';

export interface PlanDraftRow {
  planId: number;
  baseVersion: number;
  input: unknown;
  updatedAt: string;
}

/** All Kysely code of the plate ledger's unsaved drafts (one per plan). */
export class PlanDraftRepository {
  constructor(private readonly db: Kysely<DB> | Transaction<DB>) {}

  async get(planId: number): Promise<PlanDraftRow | null> {
    const r = await this.db
      .selectFrom('plan_draft')
      .selectAll()
      .where('plan_id', '=', planId)
      .executeTakeFirst();
    if (!r) return null;
    return {
      planId: r.plan_id,
      baseVersion: r.base_version,
      input: JSON.parse(r.input_json) as unknown,
      updatedAt: r.updated_at,
    };
  }

  async put(
    d: { planId: number; baseVersion: number; input: unknown; by: number | null },
    at: string,
  ): Promise<void> {
    const row = {
      base_version: d.baseVersion,
      input_json: JSON.stringify(d.input),
      updated_by: d.by,
      updated_at: at,
    };
    await this.db
      .insertInto('plan_draft')
      .values({ plan_id: d.planId, ...row })
      .onConflict((oc) => oc.column('plan_id').doUpdateSet(row))
      .execute();
  }

  async remove(planId: number): Promise<boolean> {
    const r = await this.db
      .deleteFrom('plan_draft')
      .where('plan_id', '=', planId)
      .executeTakeFirst();
    return Number(r.numDeletedRows) > 0;
  }
}
