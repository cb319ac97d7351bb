import type { Kysely, Selectable, Transaction } from 'kysely';
import type { DB } from '../db/schema.js';
import type { Food } from '../foods/food.js';
import type { PlanContent } from './plan.js';
import type { PlanTable, PlanVersionTable } from './plans.tables.js';
import type { VersionContext } from './summary-types.js';

/** A plan header: what `plan list` shows. */
export interface PlanHeader {
  id: number;
  patientId: number;
  name: string;
  days: number;
  latestVersion: number;
  isDemo: boolean;
  createdAt: string;
  updatedAt: string;
}

/** One immutable saved version with everything its summary needs. */
export interface PlanVersion {
  planId: number;
  version: number;
  name: string;
  note: string | null;
  createdAt: string;
  content: PlanContent;
  foods: Food[];
  context: VersionContext;
}

export function rowToPlanHeader(r: Selectable<PlanTable>): PlanHeader {
  return {
    id: r.id,
    patientId: r.patient_id,
    name: r.name,
    days: r.day_count,
    latestVersion: r.latest_version,
    isDemo: r.is_demo === 1,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
  };
}

export function rowToPlanVersion(r: Selectable<PlanVersionTable>): PlanVersion {
  return {
    planId: r.plan_id,
    version: r.version,
    name: r.name,
    note: r.note,
    createdAt: r.created_at,
    content: JSON.parse(r.content_json) as PlanContent,
    foods: JSON.parse(r.foods_json) as Food[],
    context: JSON.parse(r.context_json) as VersionContext,
  };
}

export class PlanRepository {
  constructor(readonly db: Kysely<DB>) {}

  /** The patient a plan belongs to (for the audit log), or null when there is no such plan. */
  async patientIdOf(planId: number): Promise<number | null> {
    const r = await this.db
      .selectFrom('plan')
      .select('patient_id')
      .where('id', '=', planId)
      .executeTakeFirst();
    return r?.patient_id ?? null;
  }

  async list(patientId?: number): Promise<PlanHeader[]> {
    let q = this.db.selectFrom('plan').selectAll().orderBy('id');
    if (patientId !== undefined) q = q.where('patient_id', '=', patientId);
    return (await q.execute()).map(rowToPlanHeader);
  }

  async header(
    id: number,
    trx: Kysely<DB> | Transaction<DB> = this.db,
  ): Promise<PlanHeader | undefined> {
    const r = await trx.selectFrom('plan').selectAll().where('id', '=', id).executeTakeFirst();
    return r ? rowToPlanHeader(r) : undefined;
  }

  async version(planId: number, version: number): Promise<PlanVersion | undefined> {
    const r = await this.db
      .selectFrom('plan_version')
      .selectAll()
      .where('plan_id', '=', planId)
      .where('version', '=', version)
      .executeTakeFirst();
    return r ? rowToPlanVersion(r) : undefined;
  }

  async versions(planId: number) {
    const rows = await this.db
      .selectFrom('plan_version')
      .select(['version', 'name', 'note', 'created_at', 'content_json'])
      .where('plan_id', '=', planId)
      .orderBy('version')
      .execute();
    return rows.map((r) => ({
      version: r.version,
      name: r.name,
      note: r.note,
      createdAt: r.created_at,
      days: (JSON.parse(r.content_json) as PlanContent).days.length,
    }));
  }

  async insertPlan(
    trx: Transaction<DB>,
    p: { patientId: number; name: string; days: number; isDemo: boolean; at: string },
  ): Promise<number> {
    const r = await trx
      .insertInto('plan')
      .values({
        patient_id: p.patientId,
        name: p.name,
        is_demo: p.isDemo ? 1 : 0,
        latest_version: 0,
        day_count: p.days,
        created_at: p.at,
        updated_at: p.at,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    return r.id;
  }

  /** Appends the next version and moves the plan's header to it. */
  async appendVersion(
    trx: Transaction<DB>,
    planId: number,
    v: Omit<PlanVersion, 'planId' | 'version'>,
  ): Promise<number> {
    const head = await trx
      .selectFrom('plan')
      .select('latest_version')
      .where('id', '=', planId)
      .executeTakeFirstOrThrow();
    const version = head.latest_version + 1;
    await trx
      .insertInto('plan_version')
      .values({
        plan_id: planId,
        version,
        name: v.name,
        note: v.note,
        created_at: v.createdAt,
        content_json: JSON.stringify(v.content),
        foods_json: JSON.stringify(v.foods),
        context_json: JSON.stringify(v.context),
      })
      .execute();
    await trx
      .updateTable('plan')
      .set({
        latest_version: version,
        name: v.name,
        day_count: v.content.days.length,
        updated_at: v.createdAt,
      })
      .where('id', '=', planId)
      .execute();
    return version;
  }
}

/** SQL prefilter for swaps: same group, bounded by what could possibly qualify. */
export class SwapRepository {
  constructor(private readonly db: Kysely<DB>) {}

  /** Candidate ids with protein, whose total P per g protein is at most `maxTotalRatioMgPerG`. */
  async proteinCandidates(opts: {
    group: string;
    excludeId: number;
    minProteinG: number;
    maxTotalRatioMgPerG: number;
    limit: number;
  }): Promise<number[]> {
    const rows = await this.db
      .selectFrom('food')
      .select('id')
      .where('food_group', '=', opts.group)
      .where('id', '!=', opts.excludeId)
      .where('phosphorus_mg', 'is not', null)
      .where('protein_g', '>=', opts.minProteinG)
      .where(({ eb, ref }) =>
        eb('phosphorus_mg', '<=', eb(ref('protein_g'), '*', opts.maxTotalRatioMgPerG)),
      )
      .orderBy(({ eb, ref }) => eb(ref('phosphorus_mg'), '/', ref('protein_g')))
      .limit(opts.limit)
      .execute();
    return rows.map((r) => r.id);
  }

  /** Candidate ids with little or no protein, lowest phosphorus first. */
  async lowProteinCandidates(opts: {
    group: string;
    excludeId: number;
    maxProteinG: number;
    limit: number;
  }): Promise<number[]> {
    const rows = await this.db
      .selectFrom('food')
      .select('id')
      .where('food_group', '=', opts.group)
      .where('id', '!=', opts.excludeId)
      .where('phosphorus_mg', 'is not', null)
      .where((eb) => eb.or([eb('protein_g', 'is', null), eb('protein_g', '<', opts.maxProteinG)]))
      .orderBy('phosphorus_mg')
      .limit(opts.limit)
      .execute();
    return rows.map((r) => r.id);
  }
}
