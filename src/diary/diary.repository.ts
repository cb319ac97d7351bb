import type { Kysely, Transaction } from 'kysely';
import type { DB } from '../db/schema.js';

export interface DiaryAuditRow {
  id: number;
  patientId: number | null;
  status: 'complete' | 'incomplete';
  sourceFormat: string;
  entryCount: number;
  matchedCount: number;
  entriesJson: string;
  overridesJson: string;
  reportJson: string;
  createdBy: number | null;
  createdAt: string;
  updatedAt: string;
}

export interface NewDiaryAudit {
  patientId: number | null;
  status: 'complete' | 'incomplete';
  sourceFormat: string;
  entryCount: number;
  matchedCount: number;
  entriesJson: string;
  reportJson: string;
  createdBy: number | null;
  at: string;
}

/** All Kysely code for diary audits and the clinic's remembered matches. */
export class DiaryRepository {
  constructor(private readonly db: Kysely<DB>) {}

  /** Inserts a finished audit in one statement (a half-built audit is never written). */
  async insert(a: NewDiaryAudit): Promise<number> {
    const r = await this.db
      .insertInto('diary_audit')
      .values({
        patient_id: a.patientId,
        status: a.status,
        source_format: a.sourceFormat,
        entry_count: a.entryCount,
        matched_count: a.matchedCount,
        entries_json: a.entriesJson,
        report_json: a.reportJson,
        created_by: a.createdBy,
        created_at: a.at,
        updated_at: a.at,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    return r.id;
  }

  async get(id: number): Promise<DiaryAuditRow | undefined> {
    const r = await this.db
      .selectFrom('diary_audit')
      .selectAll()
      .where('id', '=', id)
      .executeTakeFirst();
    if (!r) return undefined;
    return {
      id: r.id,
      patientId: r.patient_id,
      status: r.status,
      sourceFormat: r.source_format,
      entryCount: r.entry_count,
      matchedCount: r.matched_count,
      entriesJson: r.entries_json,
      overridesJson: r.overrides_json,
      reportJson: r.report_json,
      createdBy: r.created_by,
      createdAt: r.created_at,
      updatedAt: r.updated_at,
    };
  }

  async list(patientId?: number) {
    let q = this.db
      .selectFrom('diary_audit')
      .select(['id', 'patient_id', 'status', 'entry_count', 'matched_count', 'created_at'])
      .orderBy('id', 'desc')
      .limit(500);
    if (patientId !== undefined) q = q.where('patient_id', '=', patientId);
    return q.execute();
  }

  async patientOf(id: number): Promise<number | null> {
    const r = await this.db
      .selectFrom('diary_audit')
      .select('patient_id')
      .where('id', '=', id)
      .executeTakeFirst();
    return r?.patient_id ?? null;
  }

  /** Saves a recomputed report and the dietitian's match and remembers it, in one transaction. */
  async saveChangedMatch(opts: {
    id: number;
    overridesJson: string;
    reportJson: string;
    matchedCount: number;
    at: string;
    remember: { clinic: string; phraseKey: string; foodId: number; userId: number | null } | null;
  }): Promise<void> {
    await this.db.transaction().execute(async (trx) => {
      await trx
        .updateTable('diary_audit')
        .set({
          overrides_json: opts.overridesJson,
          report_json: opts.reportJson,
          matched_count: opts.matchedCount,
          updated_at: opts.at,
        })
        .where('id', '=', opts.id)
        .execute();
      if (opts.remember) await this.remember(trx, { ...opts.remember, at: opts.at });
    });
  }

  private async remember(
    trx: Transaction<DB>,
    m: { clinic: string; phraseKey: string; foodId: number; userId: number | null; at: string },
  ): Promise<void> {
    await trx
      .insertInto('diary_match_memory')
      .values({
        clinic: m.clinic,
        phrase_key: m.phraseKey,
        food_id: m.foodId,
        confirmed_by: m.userId,
        updated_at: m.at,
      })
      .onConflict((oc) =>
        oc.columns(['clinic', 'phrase_key']).doUpdateSet((eb) => ({
          food_id: m.foodId,
          confirmed_by: m.userId,
          updated_at: m.at,
          times_confirmed: eb('diary_match_memory.times_confirmed', '+', 1),
        })),
      )
      .execute();
  }

  /** Remembered food ids for phrase keys of one clinic. */
  async lookupMemory(clinic: string, keys: readonly string[]): Promise<Map<string, number>> {
    const out = new Map<string, number>();
    if (keys.length === 0) return out;
    const rows = await this.db
      .selectFrom('diary_match_memory')
      .select(['phrase_key', 'food_id'])
      .where('clinic', '=', clinic)
      .where('phrase_key', 'in', [...keys])
      .execute();
    for (const r of rows) out.set(r.phrase_key, r.food_id);
    return out;
  }
}
