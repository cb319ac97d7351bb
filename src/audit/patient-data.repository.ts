import type Database from 'better-sqlite3';

/** A table holding rows that belong to a patient, reached through a chain of references. */
export interface PatientDataNode {
  table: string;
  /** Column in this table that points at `parentColumn` of the parent's rows. */
  column: string;
  parent: string;
  parentColumn: string;
  depth: number;
}

/** Tables that never hold patient rows of their own (the log is anonymised, not deleted). */
const EXCLUDED = new Set(['audit_event', 'patient_erasure', 'patient']);

function quoteId(name: string): string {
  return `"${name.replaceAll('"', '""')}"`;
}

/**
 * Raw SQL over the schema as it is at run time: finds every table that refers to a patient
 * (by foreign key, or by a `patient_id` column), so tables added later (diaries) are exported
 * and erased without changes here.
 */
export class PatientDataRepository {
  constructor(private readonly sqlite: Database.Database) {}

  private tables(): string[] {
    return (
      this.sqlite
        .prepare(
          "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE 'kysely_%' AND sql NOT LIKE 'CREATE VIRTUAL%'",
        )
        .all() as Array<{ name: string }>
    ).map((r) => r.name);
  }

  /** Every table reachable from `patient` through references, parents before children. */
  graph(): PatientDataNode[] {
    const tables = this.tables();
    const edges: PatientDataNode[] = [];
    for (const t of tables) {
      if (EXCLUDED.has(t)) continue;
      const fks = this.sqlite.pragma(`foreign_key_list(${quoteId(t)})`) as Array<{
        table: string;
        from: string;
        to: string | null;
      }>;
      for (const fk of fks) {
        edges.push({
          table: t,
          column: fk.from,
          parent: fk.table,
          parentColumn: fk.to ?? 'id',
          depth: 0,
        });
      }
      const cols = this.sqlite.pragma(`table_info(${quoteId(t)})`) as Array<{ name: string }>;
      if (cols.some((c) => c.name === 'patient_id') && !fks.some((f) => f.table === 'patient')) {
        edges.push({
          table: t,
          column: 'patient_id',
          parent: 'patient',
          parentColumn: 'id',
          depth: 0,
        });
      }
    }
    const out: PatientDataNode[] = [];
    const seen = new Set<string>(['patient']);
    let frontier = ['patient'];
    for (let depth = 1; frontier.length > 0 && depth <= 8; depth++) {
      const next: string[] = [];
      for (const e of edges) {
        if (!frontier.includes(e.parent) || seen.has(e.table)) continue;
        out.push({ ...e, depth });
        next.push(e.table);
      }
      for (const t of next) seen.add(t);
      frontier = next;
    }
    return out;
  }

  patientRow(id: number): Record<string, unknown> | undefined {
    return this.sqlite.prepare('SELECT * FROM patient WHERE id = ?').get(id) as
      Record<string, unknown> | undefined;
  }

  /** Rows of every related table, keyed by table name. */
  collect(patientId: number): Map<string, Array<Record<string, unknown>>> {
    const rows = new Map<string, Array<Record<string, unknown>>>();
    const patient = this.patientRow(patientId);
    if (!patient) return rows;
    rows.set('patient', [patient]);
    for (const node of this.graph()) {
      const parentRows = rows.get(node.parent) ?? [];
      const keys = [...new Set(parentRows.map((r) => r[node.parentColumn]))].filter(
        (k) => k != null,
      );
      const found: Array<Record<string, unknown>> = [];
      // chunks stay well below SQLite's bound-parameter limit
      for (let i = 0; i < keys.length; i += 500) {
        const chunk = keys.slice(i, i + 500);
        found.push(
          ...(this.sqlite
            .prepare(
              `SELECT * FROM ${quoteId(node.table)} WHERE ${quoteId(node.column)} IN (${chunk.map(() => '?').join(',')})`,
            )
            .all(...chunk) as Array<Record<string, unknown>>),
        );
      }
      rows.set(node.table, [...(rows.get(node.table) ?? []), ...found]);
    }
    return rows;
  }

  auditEvents(patientId: number): Array<Record<string, unknown>> {
    return this.sqlite
      .prepare('SELECT * FROM audit_event WHERE patient_id = ? ORDER BY id')
      .all(String(patientId)) as Array<Record<string, unknown>>;
  }

  /**
   * Deletes the patient and every related row, children first, in one transaction with the
   * audit anonymisation and the erasure's own audit event: all of it happens or none.
   */
  erase(
    patientId: number,
    ref: string,
    event: { at: string; userId: number; username: string },
  ): { deleted: Record<string, number>; auditEventsAnonymised: number } | null {
    const run = this.sqlite.transaction(() => {
      const rows = this.collect(patientId);
      if (!rows.has('patient')) return null;
      this.sqlite
        .prepare('INSERT INTO patient_erasure(patient_id, started_at) VALUES (?, ?)')
        .run(patientId, event.at);
      const deleted: Record<string, number> = {};
      const nodes = this.graph().sort((a, b) => b.depth - a.depth);
      for (const node of nodes) {
        const keys = [
          ...new Set((rows.get(node.parent) ?? []).map((r) => r[node.parentColumn])),
        ].filter((k) => k != null);
        for (let i = 0; i < keys.length; i += 500) {
          const chunk = keys.slice(i, i + 500);
          const r = this.sqlite
            .prepare(
              `DELETE FROM ${quoteId(node.table)} WHERE ${quoteId(node.column)} IN (${chunk.map(() => '?').join(',')})`,
            )
            .run(...chunk);
          deleted[node.table] = (deleted[node.table] ?? 0) + r.changes;
        }
      }
      deleted.patient = this.sqlite
        .prepare('DELETE FROM patient WHERE id = ?')
        .run(patientId).changes;
      this.sqlite.prepare('DELETE FROM patient_erasure WHERE patient_id = ?').run(patientId);
      const anonymised = this.sqlite
        .prepare(
          `UPDATE audit_event SET patient_id = NULL, patient_ref = ?,
             entity_id = CASE WHEN entity = 'patient' THEN NULL ELSE entity_id END
           WHERE patient_id = ? AND patient_ref IS NULL`,
        )
        .run(ref, String(patientId)).changes;
      this.sqlite
        .prepare(
          `INSERT INTO audit_event(at, user_id, username, action, entity, entity_id, patient_id, patient_ref, outcome, status_code, details_json)
           VALUES (?, ?, ?, 'patient.erase', 'patient', NULL, NULL, ?, 'ok', NULL, ?)`,
        )
        .run(
          event.at,
          event.userId,
          event.username,
          ref,
          JSON.stringify({ rows: Object.values(deleted).reduce((a, b) => a + b, 0) }),
        );
      return { deleted, auditEventsAnonymised: anonymised };
    });
    return run();
  }
}
