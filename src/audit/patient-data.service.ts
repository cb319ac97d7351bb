import { randomBytes } from 'node:crypto';
import type { AuthUser } from '../auth/auth.js';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { NotFoundError } from '../errors.js';
import { PatientDataRepository } from './patient-data.repository.js';

export const PATIENT_EXPORT_FORMAT = 'phosledger-patient-export';
export const PATIENT_EXPORT_VERSION = 1;

/** Columns named `*_json` hold JSON text: exported as the JSON itself. */
function expand(row: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(row)) {
    if (k.endsWith('_json') && typeof v === 'string') {
      try {
        out[k.slice(0, -5)] = JSON.parse(v);
        continue;
      } catch {
        // keep the text as it is
      }
    }
    out[k] = v;
  }
  return out;
}

/** A patient's right of access and erasure (GDPR Art. 15, 17; HIPAA 45 CFR 164.524). */
export class PatientDataService {
  private readonly repo: PatientDataRepository;
  constructor(
    db: Db,
    private readonly clock: Clock,
  ) {
    this.repo = new PatientDataRepository(db.sqlite);
  }

  /** Everything stored about one patient, with the audit events that name them. */
  export(patientId: number, by: AuthUser) {
    const rows = this.repo.collect(patientId);
    const patient = rows.get('patient')?.[0];
    if (!patient) throw new NotFoundError('patient', patientId);
    const related: Record<string, Array<Record<string, unknown>>> = {};
    for (const [table, list] of rows) {
      if (table !== 'patient') related[table] = list.map(expand);
    }
    return {
      format: PATIENT_EXPORT_FORMAT,
      version: PATIENT_EXPORT_VERSION,
      exportedAt: this.clock.now().toISOString(),
      exportedBy: by.username,
      patient: expand(patient),
      related,
      auditEvents: this.repo.auditEvents(patientId).map(expand),
    };
  }

  /**
   * Deletes the patient with their plans, versions and diaries. Audit events stay (who did
   * what, when: HIPAA 45 CFR 164.316(b)(2) keeps such records six years) but lose the link to
   * the patient: a random reference replaces the id.
   */
  erase(patientId: number, by: AuthUser) {
    const ref = `erased-${randomBytes(8).toString('hex')}`;
    const result = this.repo.erase(patientId, ref, {
      at: this.clock.now().toISOString(),
      userId: by.id,
      username: by.username,
    });
    if (!result) throw new NotFoundError('patient', patientId);
    return { patientRef: ref, ...result };
  }
}
