import type { DB } from '../db/schema.js';
import type { Kysely } from 'kysely';
import { BadRequestError, NotFoundError } from '../errors.js';
import type { Food, FoodLookup } from '../foods/food.js';
import { PatientRepository } from '../patients/patients.repository.js';
import { computeTargets } from '../patients/targets.js';
import { planFoodIds, resolvePlan, type PlanContent, type PlanInput } from '../plans/plan.js';
import type { PlanService, PlanSettingsSource } from '../plans/plans.service.js';
import { summarizePlan } from '../plans/summary.js';
import type { SwapService } from '../plans/swaps.service.js';
import {
  balancingSettingsSchema,
  type BalanceRequest,
  type BalanceResult,
  type BalancingSettings,
  type PlacedCandidate,
} from './balance.js';
import { balancePlan } from './balancer.js';
import { highsSolver } from './highs-solver.js';
import type { LpSolver } from './lp-model.js';

/** Candidate foods per balanced day from the swap lists (bounded model size). */
const MAX_CANDIDATES_PER_DAY = 40;
/** Swaps are looked up for this many of a day's heaviest loads. */
const SWAP_CONTRIBUTORS = 3;

export interface BalanceSettingsSource extends PlanSettingsSource {
  balancing(): Promise<BalancingSettings>;
}

/** A stored plan content back in the form the plan routes accept. */
export function contentToInput(content: PlanContent): PlanInput {
  return {
    name: content.name,
    days: content.days.map((d) => ({
      label: d.label,
      occasions: d.occasions.map((o) => ({
        name: o.name,
        kind: o.kind,
        time: o.time,
        items: o.items.map((it) =>
          it.measure
            ? {
                foodId: it.foodId,
                measure: { portionId: it.measure.portionId, count: it.measure.count },
                label: it.label,
              }
            : { foodId: it.foodId, grams: it.grams, label: it.label },
        ),
      })),
    })),
  };
}

export class BalanceService {
  private readonly patients: PatientRepository;

  constructor(
    db: Kysely<DB>,
    private readonly foods: FoodLookup,
    private readonly settings: BalanceSettingsSource,
    private readonly plans: PlanService,
    private readonly swaps: SwapService,
    private readonly solver: () => Promise<LpSolver> = highsSolver,
  ) {
    this.patients = new PatientRepository(db);
  }

  /**
   * Balances the latest version of a plan against the patient's current targets and the
   * clinic's settings; with `accept`, saves the proposal as a new version.
   */
  async balance(
    planId: number,
    req: BalanceRequest,
  ): Promise<BalanceResult & { saved: { version: number } | null }> {
    const { header, version } = await this.plans.get(planId);
    const patient = await this.patients.get(header.patientId);
    if (!patient) throw new NotFoundError('patient', header.patientId);
    const input = contentToInput(version.content);
    const dayCount = input.days.length;
    if (req.day !== undefined && req.day > dayCount) {
      throw new BadRequestError(
        'PHL_BALANCE_DAY',
        `day ${req.day} does not exist: the plan has ${dayCount} day${dayCount === 1 ? '' : 's'}`,
      );
    }
    const days = req.day !== undefined ? [req.day - 1] : input.days.map((_, i) => i);
    const extraIds = (req.candidates ?? []).map((c) => c.foodId);
    const foods = await this.foods.getFoods([...planFoodIds(input), ...extraIds]);
    const resolved = resolvePlan(input, foods);
    if (!resolved.ok) {
      throw new BadRequestError(
        'PHL_BALANCE_PLAN_FOODS',
        `the plan refers to foods or measures that are no longer in the tables: ${resolved.issues.map((i) => i.path).join(', ')}`,
      );
    }
    const [absorption, thresholds, clinic] = await Promise.all([
      this.settings.absorption(),
      this.settings.thresholds(),
      this.settings.balancing(),
    ]);
    const balancing = balancingSettingsSchema.parse({ ...clinic, ...req.settings });
    const targets = computeTargets(patient);
    const content = resolved.value;
    const candidates = this.pickedCandidates(req, content, days, foods);
    if (req.swapCandidates ?? req.candidates === undefined) {
      const summary = summarizePlan(
        { ...content, planId, patientId: header.patientId, version: version.version },
        foods,
        targets,
        { absorption, thresholds },
      );
      candidates.push(...(await this.swapCandidates(content, days, summary, foods)));
    }
    const result = balancePlan(
      {
        plan: content,
        days,
        foods,
        targets,
        settings: { absorption, thresholds },
        binder: patient.binder,
        balancing,
        robust: req.robust ?? false,
        choices: req.items ?? [],
        candidates,
      },
      await this.solver(),
    );
    let saved: { version: number } | null = null;
    if (req.accept) {
      const after = await this.plans.save(planId, result.proposal);
      saved = { version: after.version.version };
    }
    return { ...result, saved };
  }

  /** The dietitian's candidates placed on each balanced day that has an occasion of that name. */
  private pickedCandidates(
    req: BalanceRequest,
    content: PlanContent,
    days: readonly number[],
    foods: ReadonlyMap<number, Food>,
  ): PlacedCandidate[] {
    const out: PlacedCandidate[] = [];
    (req.candidates ?? []).forEach((c, ci) => {
      if (!foods.has(c.foodId)) {
        throw new BadRequestError(
          'PHL_BALANCE_CANDIDATE',
          `candidates.${ci}.foodId: unknown food ${c.foodId}`,
        );
      }
      const onDays = c.day !== undefined ? [c.day - 1].filter((d) => days.includes(d)) : days;
      let placed = 0;
      for (const d of onDays) {
        const oi = content.days[d]?.occasions.findIndex(
          (o) => o.name.toLowerCase() === c.occasion.toLowerCase(),
        );
        if (oi === undefined || oi < 0) continue;
        out.push({
          foodId: c.foodId,
          day: d,
          occasion: oi,
          ...(c.maxGrams ? { maxGrams: c.maxGrams } : {}),
        });
        placed++;
      }
      if (placed === 0) {
        throw new BadRequestError(
          'PHL_BALANCE_CANDIDATE',
          `candidates.${ci}.occasion: no balanced day has an eating occasion named "${c.occasion}"`,
        );
      }
    });
    return out;
  }

  /** Swaps for each day's heaviest loads, offered in the occasions where those foods are eaten. */
  private async swapCandidates(
    content: PlanContent,
    days: readonly number[],
    summary: ReturnType<typeof summarizePlan>,
    foods: Map<number, Food>,
  ): Promise<PlacedCandidate[]> {
    const out: PlacedCandidate[] = [];
    const swapCache = new Map<number, number[]>();
    for (const d of days) {
      const day = content.days[d]!;
      let perDay = 0;
      for (const c of summary.days[d]!.topContributors.slice(0, SWAP_CONTRIBUTORS)) {
        let ids = swapCache.get(c.foodId);
        if (!ids) {
          ids = (await this.swaps.findSwaps(c.foodId)).swaps.map((s) => s.foodId);
          swapCache.set(c.foodId, ids);
        }
        day.occasions.forEach((o, oi) => {
          if (!o.items.some((it) => it.foodId === c.foodId)) return;
          for (const id of ids) {
            if (perDay >= MAX_CANDIDATES_PER_DAY) return;
            out.push({ foodId: id, day: d, occasion: oi });
            perDay++;
          }
        });
      }
    }
    const missing = [...new Set(out.map((c) => c.foodId))].filter((id) => !foods.has(id));
    for (const [id, f] of await this.foods.getFoods(missing)) foods.set(id, f);
    return out.filter((c) => foods.has(c.foodId));
  }
}
