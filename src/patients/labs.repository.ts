import { sql, type Kysely, type Selectable, type Transaction } from 'kysely';
import type { DB } from '../db/schema.js';
import type { BinderPrescription } from '../binders/binder.js';
import type { Analyte } from './analytes.js';
import type { LabRecord, LabSource, NewLabRecord } from './lab-results.js';
import type { LabResultTable } from './patients.tables.js';

type Q = Kysely<DB> | Transaction<DB>;

/** The one row-to-domain mapper for lab results. */
export function rowToLab(r: Selectable<LabResultTable>): LabRecord {
  return {
    id: r.id,
    patientId: r.patient_id,
    analyte: r.analyte as Analyte,
    value: r.value,
    unit: r.unit,
    canonicalValue: r.canonical_value,
    canonicalUnit: r.canonical_unit,
    date: r.taken_on,
    takenAt: r.taken_at,
    source: r.source as LabSource,
    sourceRef: r.source_ref,
    loincCode: r.loinc_code,
    enteredBy: r.entered_by,
    createdAt: r.created_at,
  };
}

export interface BinderChange {
  binder: BinderPrescription | null;
  changedAt: string;
  changedBy: string | null;
  source: string;
}

/** Lab results and binder prescription history: all their Kysely code. */
export class LabRepository {
  constructor(private readonly db: Kysely<DB>) {}

  /** A patient's results, newest first. */
  async list(patientId: number, trx: Q = this.db): Promise<LabRecord[]> {
    const rows = await trx
      .selectFrom('lab_result')
      .selectAll()
      .where('patient_id', '=', patientId)
      .orderBy('taken_on', 'desc')
      .orderBy('taken_at', 'desc')
      .orderBy('id', 'desc')
      .execute();
    return rows.map(rowToLab);
  }

  /** Results of many patients at once (one statement: the id list travels as one JSON array). */
  async listFor(patientIds: readonly number[]): Promise<Map<number, LabRecord[]>> {
    const out = new Map<number, LabRecord[]>();
    if (patientIds.length === 0) return out;
    const rows = await this.db
      .selectFrom('lab_result')
      .selectAll()
      .where(
        sql<boolean>`patient_id in (select value from json_each(${JSON.stringify(patientIds)}))`,
      )
      .orderBy('patient_id')
      .orderBy('taken_on', 'desc')
      .orderBy('taken_at', 'desc')
      .orderBy('id', 'desc')
      .execute();
    for (const r of rows) {
      const list = out.get(r.patient_id) ?? [];
      list.push(rowToLab(r));
      out.set(r.patient_id, list);
    }
    return out;
  }

  async insertMany(trx: Q, records: readonly NewLabRecord[], at: string): Promise<void> {
    for (let i = 0; i < records.length; i += 500) {
      await trx
        .insertInto('lab_result')
        .values(
          records.slice(i, i + 500).map((r) => ({
            patient_id: r.patientId,
            analyte: r.analyte,
            value: r.value,
            unit: r.unit,
            canonical_value: r.canonicalValue,
            canonical_unit: r.canonicalUnit,
            taken_on: r.date,
            taken_at: r.takenAt,
            source: r.source,
            source_ref: r.sourceRef,
            loinc_code: r.loincCode,
            entered_by: r.enteredBy,
            created_at: at,
          })),
        )
        .execute();
    }
  }

  /** Patient id by the identifier the clinic's record system uses (system null = none given). */
  async patientByIdentifier(
    trx: Q,
    system: string | null,
    value: string,
  ): Promise<number | undefined> {
    const r = await trx
      .selectFrom('patient')
      .select('id')
      .where('identifier_value', '=', value)
      .where((eb) =>
        system === null
          ? eb('identifier_system', 'is', null)
          : eb('identifier_system', '=', system),
      )
      .executeTakeFirst();
    return r?.id;
  }

  async addBinderChange(trx: Q, patientId: number, change: BinderChange): Promise<void> {
    await trx
      .insertInto('binder_change')
      .values({
        patient_id: patientId,
        binder_json: change.binder === null ? null : JSON.stringify(change.binder),
        changed_at: change.changedAt,
        changed_by: change.changedBy,
        source: change.source,
      })
      .execute();
  }

  async binderChanges(patientId: number): Promise<BinderChange[]> {
    const rows = await this.db
      .selectFrom('binder_change')
      .selectAll()
      .where('patient_id', '=', patientId)
      .orderBy('changed_at')
      .orderBy('id')
      .execute();
    return rows.map((r) => ({
      binder: r.binder_json === null ? null : (JSON.parse(r.binder_json) as BinderPrescription),
      changedAt: r.changed_at,
      changedBy: r.changed_by,
      source: r.source,
    }));
  }
}
