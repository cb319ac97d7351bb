import type { Kysely } from 'kysely';
import type { Clock } from '../clock.js';
import type { DB } from '../db/schema.js';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.js';
import { typedLab } from './lab-results.js';
import { LabRepository } from './labs.repository.js';
import {
  patientInputSchema,
  patientToInput,
  type Patient,
  type PatientInput,
  type PatientUpdate,
} from './patient.js';
import { PatientRepository } from './patients.repository.js';
import { computeTargets, type Targets } from './targets.js';

/** Turns zod issues into the product's 400 with every field named. */
export function invalidPatient(issues: readonly { path: PropertyKey[]; message: string }[]): never {
  const details = issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
  throw new BadRequestError(
    'PHL_PATIENT_INVALID',
    details.map((d) => `${d.path}: ${d.message}`).join('; '),
    details,
  );
}

export class PatientService {
  private readonly repo: PatientRepository;
  private readonly labs: LabRepository;

  constructor(
    private readonly db: Kysely<DB>,
    private readonly clock: Clock,
  ) {
    this.repo = new PatientRepository(db);
    this.labs = new LabRepository(db);
  }

  /** One patient per identifier: a clash is a clear 409, not a constraint error. */
  private async checkIdentifier(p: PatientInput, selfId?: number): Promise<void> {
    if (!p.identifier) return;
    const holder = await this.labs.patientByIdentifier(
      this.db,
      p.identifier.system,
      p.identifier.value,
    );
    if (holder !== undefined && holder !== selfId) {
      throw new ConflictError(
        'PHL_PATIENT_IDENTIFIER_TAKEN',
        `identifier: another patient record already carries this identifier (patient ${holder})`,
      );
    }
  }

  async get(id: number): Promise<Patient> {
    const p = await this.repo.get(id);
    if (!p) throw new NotFoundError('patient', id);
    return p;
  }

  list(): Promise<Patient[]> {
    return this.repo.list();
  }

  /** Validates (again, for callers outside HTTP) and stores a new patient. */
  async create(
    input: unknown,
    opts: { isDemo?: boolean; by?: string | null } = {},
  ): Promise<Patient> {
    const parsed = patientInputSchema.safeParse(input);
    if (!parsed.success) invalidPatient(parsed.error.issues);
    const p = parsed.data;
    await this.checkIdentifier(p);
    const at = this.clock.now().toISOString();
    const by = opts.by ?? null;
    const id = await this.db.transaction().execute(async (trx) => {
      const newId = await this.repo.insert(p, at, opts.isDemo, trx);
      await this.labs.insertMany(
        trx,
        p.labs.map((l) => typedLab(newId, l, by)),
        at,
      );
      if (p.binder) {
        const change = { binder: p.binder, changedAt: at, changedBy: by, source: 'record' };
        await this.labs.addBinderChange(trx, newId, change);
      }
      return newId;
    });
    return this.get(id);
  }

  /** Applies a partial update; the merged record is validated as a whole (stage vs modality). */
  async update(id: number, update: PatientUpdate, by: string | null = null): Promise<Patient> {
    const current = await this.get(id);
    const merged: PatientInput = { ...patientToInput(current) };
    for (const [k, v] of Object.entries(update)) {
      if (v !== undefined) (merged as Record<string, unknown>)[k] = v;
    }
    const parsed = patientInputSchema.safeParse(merged);
    if (!parsed.success) invalidPatient(parsed.error.issues);
    await this.checkIdentifier(parsed.data, id);
    const at = this.clock.now().toISOString();
    const binderChanged = JSON.stringify(current.binder) !== JSON.stringify(parsed.data.binder);
    await this.db.transaction().execute(async (trx) => {
      await this.repo.update(id, parsed.data, at, trx);
      // the history behind the trend view: when the prescription changed, as written
      if (binderChanged) {
        const change = {
          binder: parsed.data.binder,
          changedAt: at,
          changedBy: by,
          source: 'record',
        };
        await this.labs.addBinderChange(trx, id, change);
      }
    });
    return this.get(id);
  }

  async targets(id: number): Promise<Targets> {
    return computeTargets(await this.get(id));
  }
}
