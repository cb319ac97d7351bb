import { withUserWording } from '../i18n/user-wording.js';
import { gzipSync } from 'node:zlib';
import type { Kysely } from 'kysely';
import type { Clock } from '../clock.js';
import type { DB } from '../db/schema.js';
import { BadRequestError, NotFoundError } from '../errors.js';
import type { Food, FoodLookup } from '../foods/food.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import { PatientRepository } from '../patients/patients.repository.js';
import { latestLabs } from '../patients/labs.js';
import { computeTargets } from '../patients/targets.js';
import { planFoodIds, planInputSchema, resolvePlan, type PlanInput } from './plan.js';
import { thresholdsSchema, type Thresholds } from './plan-settings.js';
import { PlanDraftRepository } from './drafts.repository.js';
import { PlanRepository, type PlanHeader, type PlanVersion } from './plans.repository.js';
import { summarizePlan } from './summary.js';
import type { PlanSummary, VersionContext } from './summary-types.js';

/** The settings a save freezes into its version (narrow, so tests pass plain values). */
export interface PlanSettingsSource {
  absorption(): Promise<AbsorptionFractions>;
  thresholds(): Promise<Thresholds>;
}

/** The JSON of one version as the API and CLI show it. */
export function toPlanVersionJson(h: PlanHeader, v: PlanVersion) {
  return {
    id: h.id,
    patientId: h.patientId,
    name: v.name,
    version: v.version,
    latestVersion: h.latestVersion,
    isDemo: h.isDemo,
    note: v.note,
    savedAt: v.createdAt,
    days: v.content.days,
  };
}

function planInvalid(issues: readonly { path: string; message: string }[]): never {
  throw new BadRequestError(
    'PHL_PLAN_INVALID',
    issues.map((i) => `${i.path}: ${i.message}`).join('; '),
    issues,
  );
}

interface SummaryEntry {
  summary: PlanSummary;
  json?: string;
  bytes?: Buffer;
  gzip?: Buffer;
}

/** Summaries kept per service (versions are immutable, so a cached summary never goes stale). */
const SUMMARY_CACHE_SIZE = 200;

export class PlanService {
  private readonly repo: PlanRepository;
  private readonly patients: PatientRepository;
  private readonly summaries = new Map<string, SummaryEntry>();

  constructor(
    private readonly db: Kysely<DB>,
    private readonly clock: Clock,
    private readonly foods: FoodLookup,
    private readonly settings: PlanSettingsSource,
  ) {
    this.repo = new PlanRepository(db);
    this.patients = new PatientRepository(db);
  }

  list(patientId?: number): Promise<PlanHeader[]> {
    return this.repo.list(patientId);
  }

  async header(planId: number): Promise<PlanHeader> {
    const h = await this.repo.header(planId);
    if (!h) throw new NotFoundError('plan', planId);
    return h;
  }

  /** One version (the latest when none is given). */
  async get(
    planId: number,
    version?: number,
  ): Promise<{ header: PlanHeader; version: PlanVersion }> {
    const header = await this.header(planId);
    const v = await this.repo.version(planId, version ?? header.latestVersion);
    if (!v) throw new NotFoundError('plan version', `${planId}/${version ?? header.latestVersion}`);
    return { header, version: v };
  }

  async versions(planId: number) {
    await this.header(planId);
    return this.repo.versions(planId);
  }

  /** Creates a plan with its first version; validation happens before anything is written. */
  async create(patientId: number, input: unknown, opts: { isDemo?: boolean } = {}) {
    const patient = await this.patients.get(patientId);
    if (!patient) throw new NotFoundError('patient', patientId);
    const prepared = await this.prepare(input, patient);
    const at = this.clock.now().toISOString();
    const planId = await this.db.transaction().execute(async (trx) => {
      const id = await this.repo.insertPlan(trx, {
        patientId,
        name: prepared.content.name,
        days: prepared.content.days.length,
        isDemo: opts.isDemo ?? false,
        at,
      });
      await this.repo.appendVersion(trx, id, { ...prepared, createdAt: at });
      return id;
    });
    return this.get(planId);
  }

  /** Saves a new version; earlier versions stay exactly as they were. */
  async save(planId: number, input: unknown) {
    const header = await this.header(planId);
    const patient = await this.patients.get(header.patientId);
    if (!patient) throw new NotFoundError('patient', header.patientId);
    const prepared = await this.prepare(input, patient);
    const at = this.clock.now().toISOString();
    await this.db.transaction().execute(async (trx) => {
      await this.repo.appendVersion(trx, planId, { ...prepared, createdAt: at });
      // The unsaved draft is now this version.
      await new PlanDraftRepository(trx).remove(planId);
    });
    return this.get(planId);
  }

  /**
   * The summary an input would have if saved now (validated exactly as a save), without
   * writing a version: the plate ledger's unsaved draft.
   */
  async previewSummary(planId: number, input: unknown): Promise<PlanSummary> {
    const header = await this.header(planId);
    const patient = await this.patients.get(header.patientId);
    if (!patient) throw new NotFoundError('patient', header.patientId);
    const prepared = await this.prepare(input, patient);
    const v: PlanVersion = {
      planId,
      version: header.latestVersion,
      name: prepared.name,
      note: prepared.note,
      createdAt: this.clock.now().toISOString(),
      content: prepared.content,
      foods: prepared.foods,
      context: prepared.context,
    };
    return withUserWording(summarizeVersion(header, v));
  }

  /** The summary of a version, recomputed from what that version froze: the same every time. */
  async getSummary(planId: number, version?: number): Promise<PlanSummary> {
    return (await this.cachedSummary(planId, version)).summary;
  }

  /** The summary serialised once per version (the summary endpoint sends it as is). */
  async getSummaryJson(planId: number, version?: number): Promise<string> {
    const entry = await this.cachedSummary(planId, version);
    entry.json ??= JSON.stringify(entry.summary);
    return entry.json;
  }

  /** The serialised summary as UTF-8 bytes, and gzipped on first request for it (both cached). */
  async getSummaryBytes(
    planId: number,
    version: number | undefined,
    encoding: 'identity' | 'gzip',
  ): Promise<Buffer> {
    const entry = await this.cachedSummary(planId, version);
    entry.bytes ??= Buffer.from((entry.json ??= JSON.stringify(entry.summary)), 'utf8');
    if (encoding === 'identity') return entry.bytes;
    entry.gzip ??= gzipSync(entry.bytes);
    return entry.gzip;
  }

  private async cachedSummary(planId: number, version?: number) {
    const header = await this.header(planId);
    const n = version ?? header.latestVersion;
    const key = `${planId}/${n}`;
    const hit = this.summaries.get(key);
    if (hit) return hit;
    const v = await this.repo.version(planId, n);
    if (!v) throw new NotFoundError('plan version', key);
    // Evidence shown to users says "assumed (no published figure)", never "from memory".
    const entry: SummaryEntry = { summary: withUserWording(summarizeVersion(header, v)) };
    if (this.summaries.size >= SUMMARY_CACHE_SIZE) {
      const oldest = this.summaries.keys().next().value;
      if (oldest !== undefined) this.summaries.delete(oldest);
    }
    this.summaries.set(key, entry);
    return entry;
  }

  private async prepare(
    input: unknown,
    patient: Parameters<typeof computeTargets>[0] & { binder: VersionContext['binder'] },
  ) {
    const parsed = planInputSchema.safeParse(input);
    if (!parsed.success) {
      planInvalid(
        parsed.error.issues.map((i) => ({
          path: i.path.map(String).join('.'),
          message: i.message,
        })),
      );
    }
    const data: PlanInput = parsed.data;
    const foods = await this.foods.getFoods(planFoodIds(data));
    const resolved = resolvePlan(data, foods);
    if (!resolved.ok) planInvalid(resolved.issues);
    const [absorption, thresholds] = await Promise.all([
      this.settings.absorption(),
      this.settings.thresholds(),
    ]);
    const context: VersionContext = {
      patient: {
        weightKg: patient.weightKg,
        ckdStage: patient.ckdStage,
        dialysis: patient.dialysis,
        diabetes: patient.diabetes,
      },
      targets: computeTargets(patient),
      labs: latestLabs(patient.labs ?? []),
      binder: patient.binder,
      absorption,
      thresholds,
    };
    const used = new Set(planFoodIds(resolved.value));
    const snapshot: Food[] = [...foods.values()].filter((f) => used.has(f.id));
    return {
      name: resolved.value.name,
      note: data.note ?? null,
      content: resolved.value,
      foods: snapshot,
      context,
    };
  }
}

/** Summary of a stored version from its own frozen foods, targets and settings (pure). */
export function summarizeVersion(header: PlanHeader, v: PlanVersion): PlanSummary {
  const foods = new Map(v.foods.map((f) => [f.id, f]));
  return summarizePlan(
    { planId: header.id, patientId: header.patientId, version: v.version, ...v.content },
    foods,
    v.context.targets,
    // Older versions may lack thresholds added since: the schema fills their defaults.
    { absorption: v.context.absorption, thresholds: thresholdsSchema.parse(v.context.thresholds) },
    v.context.binder,
    v.context.labs ?? null,
  );
}
