import { randomBytes } from 'node:crypto';
import type { Clock } from '../clock.js';
import { systemClock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AuditRepository, rowToAuditEvent } from './audit.repository.js';
import type { AuditEntry, AuditEvent, AuditQuery } from './audit.js';

/**
 * Appends one event to the audit log (45 CFR 164.312(b) audit controls). Throws when the write
 * fails: callers let that fail the request rather than serve patient data unrecorded.
 */
export async function recordAudit(
  db: Db,
  entry: AuditEntry,
  clock: Clock = systemClock,
): Promise<number> {
  const repo = new AuditRepository(db.kysely, db.sqlite);
  const username =
    entry.username !== undefined
      ? entry.username
      : entry.userId !== null
        ? await repo.usernameOf(entry.userId)
        : null;
  return repo.insert({
    at: clock.now().toISOString(),
    user_id: entry.userId,
    username,
    action: entry.action,
    entity: entry.entity,
    entity_id: entry.entityId == null ? null : String(entry.entityId),
    patient_id: entry.patientId == null ? null : String(entry.patientId),
    patient_ref: null,
    outcome: entry.outcome ?? 'ok',
    status_code: entry.statusCode ?? null,
    details_json: entry.details ? JSON.stringify(entry.details) : null,
  });
}

/** Reading, exporting and anonymising the log (admin only; the routes check the role). */
export class AuditService {
  private readonly repo: AuditRepository;
  constructor(db: Db) {
    this.repo = new AuditRepository(db.kysely);
  }

  async list(q: AuditQuery): Promise<AuditEvent[]> {
    return (await this.repo.list(q)).map(rowToAuditEvent);
  }

  async *export(q: Omit<AuditQuery, 'limit' | 'before'>): AsyncGenerator<AuditEvent> {
    for await (const row of this.repo.iterate(q)) yield rowToAuditEvent(row);
  }

  /**
   * Unlinks an erased patient from the log: their events stay (who did what when), under a
   * fresh random reference that cannot be traced back to the patient id.
   */
  async anonymisePatient(patientId: string | number): Promise<{ ref: string; events: number }> {
    const ref = `erased-${randomBytes(8).toString('hex')}`;
    const events = await this.repo.anonymisePatient(String(patientId), ref);
    return { ref, events };
  }
}

const CSV_COLUMNS = [
  'id',
  'at',
  'userId',
  'username',
  'action',
  'entity',
  'entityId',
  'patientId',
  'patientRef',
  'outcome',
  'statusCode',
  'details',
] as const;

/**
 * A cell that starts a formula once a spreadsheet trims it: after any run of whitespace,
 * control characters, quotes or separators (`,` `;` tab `|`), one of = + - @ (OWASP "CSV
 * Injection"; fullwidth forms too, which some spreadsheets fold to ASCII).
 */
const FORMULA_START = /^[\s\p{Cc}"',;|\uFEFF]*[=+\-@\uFF1D\uFF0B\uFF0D\uFF20]/u;

/** One CSV cell: always quoted, and a would-be formula made text with a leading apostrophe. */
export function csvCell(v: unknown): string {
  if (v === null || v === undefined) return '""';
  let s = typeof v === 'object' ? JSON.stringify(v) : String(v);
  if (FORMULA_START.test(s)) s = `'${s}`;
  return `"${s.replaceAll('"', '""')}"`;
}

export function auditCsvHeader(): string {
  return `${CSV_COLUMNS.map(csvCell).join(',')}\r\n`;
}

export function auditCsvLine(e: AuditEvent): string {
  return `${CSV_COLUMNS.map((c) => csvCell(e[c])).join(',')}\r\n`;
}
