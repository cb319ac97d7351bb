import type { Kysely } from 'kysely';
import type { Clock } from '../clock.js';
import type { DB } from '../db/schema.js';
import { BadRequestError, NotFoundError } from '../errors.js';
import type { Analyte } from './analytes.js';
import { readObservationBundle, type EntryRejection } from './fhir-observations.js';
import {
  isSameResult,
  labResultInputSchema,
  latestByAnalyte,
  typedLab,
  type LabRecord,
  type LabSource,
  type LatestLab,
  type NewLabRecord,
} from './lab-results.js';
import { LabRepository } from './labs.repository.js';

type SameResultKey = Pick<LabRecord, 'analyte' | 'date' | 'takenAt' | 'canonicalValue'>;

function addKnown(byDay: Map<string, SameResultKey[]>, r: SameResultKey): void {
  const key = `${r.analyte}|${r.date}`;
  const list = byDay.get(key) ?? [];
  list.push(r);
  byDay.set(key, list);
}

/** The `labs import` answer (a fixed contract). */
export interface LabImportResult {
  imported: number;
  duplicates: number;
  rejected: EntryRejection[];
}

/** Lab results of patients: typed, imported from FHIR, listed, and the latest per analyte. */
export class LabService {
  private readonly repo: LabRepository;

  constructor(
    private readonly db: Kysely<DB>,
    private readonly clock: Clock,
  ) {
    this.repo = new LabRepository(db);
  }

  private async requirePatient(patientId: number): Promise<void> {
    const row = await this.db
      .selectFrom('patient')
      .select('id')
      .where('id', '=', patientId)
      .executeTakeFirst();
    if (!row) throw new NotFoundError('patient', patientId);
  }

  /** A patient's results, newest first. */
  async list(patientId: number): Promise<LabRecord[]> {
    await this.requirePatient(patientId);
    return this.repo.list(patientId);
  }

  /**
   * The latest result of each analyte in its canonical unit (phosphate and calcium mg/dL,
   * albumin g/dL, PTH pg/mL, potassium and bicarbonate mmol/L, 25-OH vitamin D ng/mL).
   */
  async latestCanonical(patientId: number): Promise<Partial<Record<Analyte, LatestLab>>> {
    return latestByAnalyte(await this.list(patientId));
  }

  /** Stores one typed result; an implausible value or a unit the analyte does not take is a 400. */
  async add(patientId: number, input: unknown, by: string | null): Promise<LabRecord> {
    await this.requirePatient(patientId);
    const parsed = labResultInputSchema.safeParse(input);
    if (!parsed.success) {
      const details = parsed.error.issues.map((i) => ({
        path: i.path.map(String).join('.'),
        message: i.message,
      }));
      throw new BadRequestError(
        'PHL_LAB_INVALID',
        details.map((d) => `${d.path}: ${d.message}`).join('; '),
        details,
      );
    }
    const at = this.clock.now().toISOString();
    await this.db
      .transaction()
      .execute((trx) => this.repo.insertMany(trx, [typedLab(patientId, parsed.data, by)], at));
    const list = await this.repo.list(patientId);
    return list.reduce((a, b) => (b.id > a.id ? b : a));
  }

  /**
   * Imports a FHIR R4 Bundle of Observations in one transaction: every accepted entry is stored
   * or none is. Unknown codes, units and patients come back per entry; a result already stored
   * (same analyte, time and value) is counted as a duplicate, not stored twice.
   */
  async importBundle(
    doc: unknown,
    opts: { by: string | null; source: LabSource; sourceRef: string | null },
  ): Promise<LabImportResult & { patientIds: number[] }> {
    const reading = readObservationBundle(doc);
    if (!reading.ok) throw new BadRequestError('PHL_LAB_IMPORT_INVALID', reading.reason);
    const rejected = [...reading.rejected];
    const at = this.clock.now().toISOString();
    return this.db.transaction().execute(async (trx) => {
      const toStore: NewLabRecord[] = [];
      let duplicates = 0;
      // per import: each identifier is looked up once, each patient's results are read once
      const patientOf = new Map<string, number | undefined>();
      const known = new Map<number, Map<string, SameResultKey[]>>();
      for (const r of reading.results) {
        const idKey = JSON.stringify(r.subjectIdentifiers);
        if (!patientOf.has(idKey))
          patientOf.set(idKey, await this.matchPatient(trx, r.subjectIdentifiers));
        const patientId = patientOf.get(idKey);
        if (patientId === undefined) {
          const ids = r.subjectIdentifiers.map((i) => `${i.system ?? '(no system)'}|${i.value}`);
          rejected.push({
            entry: r.entry,
            reason: `entry[${r.entry}] subject: no patient record carries the identifier ${ids.join(' or ')}`,
          });
          continue;
        }
        const record: NewLabRecord = {
          patientId,
          analyte: r.analyte,
          value: r.value,
          unit: r.unit,
          canonicalValue: r.canonicalValue,
          canonicalUnit: r.canonicalUnit,
          date: r.date,
          takenAt: r.takenAt,
          source: opts.source,
          sourceRef:
            [opts.sourceRef, r.observationId ? `Observation/${r.observationId}` : null]
              .filter(Boolean)
              .join(' ') || null,
          loincCode: r.loincCode,
          enteredBy: opts.by,
        };
        let byDay = known.get(patientId);
        if (!byDay) {
          byDay = new Map();
          for (const s of await this.repo.list(patientId, trx)) addKnown(byDay, s);
          known.set(patientId, byDay);
        }
        if ((byDay.get(`${r.analyte}|${r.date}`) ?? []).some((s) => isSameResult(s, record))) {
          duplicates += 1;
          continue;
        }
        addKnown(byDay, record);
        toStore.push(record);
      }
      await this.repo.insertMany(trx, toStore, at);
      rejected.sort((a, b) => a.entry - b.entry);
      const patientIds = [...new Set(toStore.map((s) => s.patientId))];
      return { imported: toStore.length, duplicates, rejected, patientIds };
    });
  }

  private async matchPatient(
    trx: Parameters<LabRepository['patientByIdentifier']>[0],
    ids: ReadonlyArray<{ system: string | null; value: string }>,
  ): Promise<number | undefined> {
    for (const i of ids) {
      const id = await this.repo.patientByIdentifier(trx, i.system, i.value);
      if (id !== undefined) return id;
    }
    return undefined;
  }
}
