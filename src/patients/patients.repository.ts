import type { Kysely, Selectable, Transaction } from 'kysely';
import type { DB } from '../db/schema.js';
import type { PatientTable } from './patients.tables.js';
import type { LabRecord } from './lab-results.js';
import { LabRepository } from './labs.repository.js';
import {
  toPatientLabs,
  type CkdStage,
  type Dialysis,
  type Patient,
  type PatientInput,
  type TargetOverrides,
} from './patient.js';
import type { BinderPrescription } from '../binders/binder.js';

type PatientRow = Selectable<PatientTable>;

function parseJson<T>(text: string | null, fallback: T): T {
  if (text === null) return fallback;
  try {
    return JSON.parse(text) as T;
  } catch {
    return fallback;
  }
}

/** The one row-to-domain mapper for patients. */
export function rowToPatient(row: PatientRow, labs: readonly LabRecord[]): Patient {
  return {
    id: row.id,
    label: row.label,
    name: row.name,
    language: row.language,
    weightKg: row.weight_kg,
    ckdStage: row.ckd_stage as CkdStage,
    dialysis: row.dialysis as Dialysis,
    diabetes: row.diabetes === 1,
    labs: toPatientLabs(labs),
    binder: parseJson<BinderPrescription | null>(row.binder_json, null),
    targetOverrides: parseJson<TargetOverrides>(row.target_overrides_json, {}),
    identifier:
      row.identifier_value === null
        ? null
        : { system: row.identifier_system, value: row.identifier_value },
    urineOutputMlPerDay: row.urine_output_ml_per_day ?? null,
    pdDialysateGlucoseGPerDay: row.pd_glucose_g_per_day ?? null,
    isDemo: row.is_demo === 1,
    createdAt: row.created_at,
    updatedAt: row.updated_at,
  };
}

function toColumns(p: PatientInput) {
  return {
    label: p.label,
    name: p.name,
    language: p.language,
    weight_kg: p.weightKg,
    ckd_stage: p.ckdStage,
    dialysis: p.dialysis,
    diabetes: p.diabetes ? 1 : 0,
    binder_json: p.binder === null ? null : JSON.stringify(p.binder),
    target_overrides_json: JSON.stringify(p.targetOverrides),
    identifier_system: p.identifier?.system ?? null,
    identifier_value: p.identifier?.value ?? null,
    urine_output_ml_per_day: p.urineOutputMlPerDay ?? null,
    pd_glucose_g_per_day: p.pdDialysateGlucoseGPerDay ?? null,
  };
}

type Q = Kysely<DB> | Transaction<DB>;

export class PatientRepository {
  private readonly labs: LabRepository;
  constructor(private readonly db: Kysely<DB>) {
    this.labs = new LabRepository(db);
  }

  async get(id: number, trx: Q = this.db): Promise<Patient | undefined> {
    const row = await trx.selectFrom('patient').selectAll().where('id', '=', id).executeTakeFirst();
    return row ? rowToPatient(row, await this.labs.list(id, trx)) : undefined;
  }

  async list(): Promise<Patient[]> {
    const rows = await this.db.selectFrom('patient').selectAll().orderBy('id').execute();
    const labs = await this.labs.listFor(rows.map((r) => r.id));
    return rows.map((r) => rowToPatient(r, labs.get(r.id) ?? []));
  }

  async count(trx: Q = this.db): Promise<number> {
    const r = await trx
      .selectFrom('patient')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .executeTakeFirstOrThrow();
    return Number(r.n);
  }

  async insert(p: PatientInput, at: string, isDemo = false, trx: Q = this.db): Promise<number> {
    const r = await trx
      .insertInto('patient')
      .values({ ...toColumns(p), is_demo: isDemo ? 1 : 0, created_at: at, updated_at: at })
      .returning('id')
      .executeTakeFirstOrThrow();
    return r.id;
  }

  async update(id: number, p: PatientInput, at: string, trx: Q = this.db): Promise<void> {
    await trx
      .updateTable('patient')
      .set({ ...toColumns(p), updated_at: at })
      .where('id', '=', id)
      .execute();
  }
}
