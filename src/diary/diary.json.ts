import type { SavedAudit } from './diary.service.js';

/** A saved audit as the API and `diary audit --json` give it: its ids and times, then the report. */
export function toAuditJson(a: SavedAudit) {
  return {
    id: a.id,
    patientId: a.patientId,
    createdAt: a.createdAt,
    updatedAt: a.updatedAt,
    ...a.report,
  };
}
