import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { NotFoundError } from '../errors.js';
import { PlanRepository } from '../plans/plans.repository.js';
import { summarizeVersion } from '../plans/plans.service.js';
import { SettingsService } from '../settings/settings.service.js';
import { DEFAULT_LAB_BANDS } from './lab-bands.js';
import { LabRepository } from './labs.repository.js';
import { PatientRepository } from './patients.repository.js';
import { buildTrends, type PlanVersionMark, type Trends } from './trends.js';

/** Gathers a patient's results, plan versions and binder history for the trend view. */
export class TrendService {
  private readonly patients: PatientRepository;
  private readonly labs: LabRepository;
  private readonly plans: PlanRepository;
  private readonly settings: SettingsService;
  /** Plan version marks by "planId/version" (versions are immutable, so this never goes stale). */
  private readonly marks = new Map<string, PlanVersionMark>();

  constructor(db: Db, clock: Clock) {
    this.patients = new PatientRepository(db.kysely);
    this.labs = new LabRepository(db.kysely);
    this.plans = new PlanRepository(db.kysely);
    this.settings = new SettingsService(db, clock);
  }

  async trends(patientId: number): Promise<Trends> {
    const patient = await this.patients.get(patientId);
    if (!patient) throw new NotFoundError('patient', patientId);
    const [labs, bands, binderChanges, planVersions] = await Promise.all([
      this.labs.list(patientId),
      this.settings.get('labBands'),
      this.labs.binderChanges(patientId),
      this.planVersions(patientId),
    ]);
    return buildTrends({
      labs,
      bands,
      defaultBands: DEFAULT_LAB_BANDS,
      dialysis: patient.dialysis,
      planVersions,
      binderChanges,
    });
  }

  private async planVersions(patientId: number): Promise<PlanVersionMark[]> {
    const out: PlanVersionMark[] = [];
    for (const header of await this.plans.list(patientId)) {
      for (const row of await this.plans.versions(header.id)) {
        const key = `${header.id}/${row.version}`;
        let mark = this.marks.get(key);
        if (!mark) {
          const v = await this.plans.version(header.id, row.version);
          if (!v) continue;
          const summary = summarizeVersion(header, v);
          mark = {
            planId: header.id,
            planName: v.name,
            version: v.version,
            savedAt: v.createdAt,
            date: v.createdAt.slice(0, 10),
            absorbablePhosphorusMgPerDay: summary.average.nutrients.absorbablePhosphorusMg,
          };
          this.marks.set(key, mark);
        }
        out.push(mark);
      }
    }
    return out;
  }
}
