import type Database from 'better-sqlite3';
import type { Kysely, Selectable } from 'kysely';
import type { DB } from '../db/schema.js';
import type { AuditEventTable } from './audit.tables.js';
import type { AuditEvent, AuditQuery } from './audit.js';

type Row = Selectable<AuditEventTable>;

export function rowToAuditEvent(r: Row): AuditEvent {
  return {
    id: r.id,
    at: r.at,
    userId: r.user_id,
    username: r.username,
    action: r.action,
    entity: r.entity,
    entityId: r.entity_id,
    patientId: r.patient_id,
    patientRef: r.patient_ref,
    outcome: r.outcome,
    statusCode: r.status_code,
    details: r.details_json ? (JSON.parse(r.details_json) as Record<string, unknown>) : null,
  };
}

const inserts = new WeakMap<Database.Database, Database.Statement>();

export class AuditRepository {
  /** `sqlite`, when given, writes events through one cached prepared statement (hot path). */
  constructor(
    private readonly db: Kysely<DB>,
    private readonly sqlite?: Database.Database,
  ) {}

  async insert(row: Omit<Row, 'id'>): Promise<number> {
    if (this.sqlite) {
      let stmt = inserts.get(this.sqlite);
      if (!stmt) {
        stmt = this.sqlite.prepare(
          `INSERT INTO audit_event (at, user_id, username, action, entity, entity_id, patient_id,
             patient_ref, outcome, status_code, details_json)
           VALUES (@at, @user_id, @username, @action, @entity, @entity_id, @patient_id,
             @patient_ref, @outcome, @status_code, @details_json)`,
        );
        inserts.set(this.sqlite, stmt);
      }
      return Number(stmt.run(row).lastInsertRowid);
    }
    const r = await this.db
      .insertInto('audit_event')
      .values(row)
      .returning('id')
      .executeTakeFirstOrThrow();
    return r.id;
  }

  async usernameOf(userId: number): Promise<string | null> {
    const r = await this.db
      .selectFrom('app_user')
      .select('username')
      .where('id', '=', userId)
      .executeTakeFirst();
    return r?.username ?? null;
  }

  private filtered(q: Omit<AuditQuery, 'limit'>) {
    let query = this.db.selectFrom('audit_event').selectAll();
    if (q.from) query = query.where('at', '>=', new Date(q.from).toISOString());
    if (q.to) query = query.where('at', '<', new Date(q.to).toISOString());
    if (q.userId !== undefined) query = query.where('user_id', '=', q.userId);
    if (q.patientId !== undefined) query = query.where('patient_id', '=', q.patientId);
    if (q.action !== undefined) query = query.where('action', '=', q.action);
    if (q.entity !== undefined) query = query.where('entity', '=', q.entity);
    if (q.before !== undefined) query = query.where('id', '<', q.before);
    return query;
  }

  async list(q: AuditQuery): Promise<Row[]> {
    return this.filtered(q).orderBy('id', 'desc').limit(q.limit).execute();
  }

  /** Every matching event in id order, in pages, so an export never holds the log in memory. */
  async *iterate(q: Omit<AuditQuery, 'limit' | 'before'>, pageSize = 1000): AsyncGenerator<Row> {
    let after = 0;
    for (;;) {
      const rows = await this.filtered(q)
        .where('id', '>', after)
        .orderBy('id', 'asc')
        .limit(pageSize)
        .execute();
      for (const r of rows) yield r;
      if (rows.length < pageSize) return;
      after = rows[rows.length - 1]!.id;
    }
  }

  /** Replaces one patient's id by an opaque reference on all their events (erasure). */
  async anonymisePatient(patientId: string, ref: string): Promise<number> {
    const r = await this.db
      .updateTable('audit_event')
      .set({ patient_id: null, patient_ref: ref })
      .where('patient_id', '=', patientId)
      .where('patient_ref', 'is', null)
      .executeTakeFirst();
    return Number(r.numUpdatedRows);
  }
}
