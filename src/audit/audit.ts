import { z } from 'zod';

/** One audit entry to record. Never put names, passwords, tokens or free text in here. */
export interface AuditEntry {
  userId: number | null;
  /** Snapshot of the username (the log outlives accounts); looked up from userId if omitted. */
  username?: string | null;
  /** Dotted verb, e.g. 'patient.read', 'plan.update', 'import.run', 'session.sign-in'. */
  action: string;
  patientId?: string | number | null;
  /** What was touched: 'patient', 'plan', 'handout', 'diary', 'import', 'session', ... */
  entity: string;
  entityId?: string | number | null;
  outcome?: 'ok' | 'denied' | 'failed';
  statusCode?: number | null;
  /** Small structured facts (counts, formats, versions); no patient-identifying values. */
  details?: Record<string, string | number | boolean | null>;
}

export interface AuditEvent {
  id: number;
  at: string;
  userId: number | null;
  username: string | null;
  action: string;
  entity: string;
  entityId: string | null;
  patientId: string | null;
  patientRef: string | null;
  outcome: string;
  statusCode: number | null;
  details: Record<string, unknown> | null;
}

export const auditQuerySchema = z.object({
  from: z.iso.datetime({ offset: true }).optional(),
  to: z.iso.datetime({ offset: true }).optional(),
  userId: z.coerce.number().int().positive().optional(),
  patientId: z.string().min(1).max(64).optional(),
  action: z.string().min(1).max(64).optional(),
  entity: z.string().min(1).max(64).optional(),
  /** Events with an id below this one (for paging backwards). */
  before: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(1000).default(100),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;
