import { randomUUID } from 'node:crypto';
import type { Bundle } from '@medplum/fhirtypes';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { HandoutService, handoutSourcesFromDb } from '../handouts/handouts.service.js';
import type { Languages } from '../i18n/loader.js';
import { PatientService } from '../patients/patients.service.js';
import { TARGETS_CAUTION } from '../patients/targets.js';
import { planBundle } from './fhir-export.js';
import { settingsSource } from './plan-settings-source.js';
import { PlanService } from './plans.service.js';

/** Exports a plan version as a FHIR R4 Bundle: NutritionOrder plus the handout PDF. */
export class PlanFhirExportService {
  private readonly plans: PlanService;
  private readonly patients: PatientService;
  private readonly handouts: HandoutService;

  constructor(
    db: Db,
    private readonly clock: Clock,
    languages: Languages,
    private readonly newId: () => string = randomUUID,
  ) {
    this.plans = new PlanService(
      db.kysely,
      clock,
      new FoodRepository(db.kysely),
      settingsSource(db),
    );
    this.patients = new PatientService(db.kysely, clock);
    this.handouts = new HandoutService(
      handoutSourcesFromDb(db, clock, languages.list()),
      languages,
      clock,
    );
  }

  async export(
    planId: number,
    opts: { version?: number | undefined; lang?: string | undefined } = {},
  ): Promise<{ bundle: Bundle; patientId: number }> {
    const { header, version } = await this.plans.get(planId, opts.version);
    const patient = await this.patients.get(header.patientId);
    const pdf = await this.handouts.pdf(planId, {
      paper: 'a4',
      version: version.version,
      lang: opts.lang,
    });
    const bundle = planBundle({
      plan: {
        id: header.id,
        name: version.name,
        version: version.version,
        savedAt: version.createdAt,
      },
      patient: { label: patient.label, identifier: patient.identifier },
      targets: version.context.targets,
      handout: {
        pdf: pdf.bytes,
        language: pdf.language,
        title: `Take-home sheet: ${version.name}, version ${version.version} (${pdf.language})`,
      },
      caution: TARGETS_CAUTION,
      now: this.clock.now().toISOString(),
      ids: { nutritionOrder: this.newId(), documentReference: this.newId(), bundle: this.newId() },
    });
    return { bundle, patientId: header.patientId };
  }
}
