import type { Kysely } from 'kysely';
import type { Clock } from '../clock.js';
import type { DB } from '../db/schema.js';
import { BadRequestError, NotFoundError } from '../errors.js';
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

  constructor(
    db: Kysely<DB>,
    private readonly clock: Clock,
  ) {
    this.repo = new PatientRepository(db);
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
  async create(input: unknown, opts: { isDemo?: boolean } = {}): Promise<Patient> {
    const parsed = patientInputSchema.safeParse(input);
    if (!parsed.success) invalidPatient(parsed.error.issues);
    const id = await this.repo.insert(parsed.data, this.clock.now().toISOString(), opts.isDemo);
    return this.get(id);
  }

  /** Applies a partial update; the merged record is validated as a whole (stage vs modality). */
  async update(id: number, update: PatientUpdate): Promise<Patient> {
    const current = await this.get(id);
    const merged: PatientInput = { ...patientToInput(current) };
    for (const [k, v] of Object.entries(update)) {
      if (v !== undefined) (merged as Record<string, unknown>)[k] = v;
    }
    const parsed = patientInputSchema.safeParse(merged);
    if (!parsed.success) invalidPatient(parsed.error.issues);
    await this.repo.update(id, parsed.data, this.clock.now().toISOString());
    return this.get(id);
  }

  async targets(id: number): Promise<Targets> {
    return computeTargets(await this.get(id));
  }
}
