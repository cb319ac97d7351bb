import type { Kysely } from 'kysely';
import type { DB } from '../db/schema.js';
import { NotFoundError } from '../errors.js';
import type { FoodLookup } from '../foods/food.js';
import { profileFood } from '../phosphorus/profile.js';
import type { PlanSettingsSource } from './plans.service.js';
import { SwapRepository } from './plans.repository.js';
import {
  SWAP_MIN_PROTEIN_G_PER_100G,
  SWAP_MIN_PROTEIN_SHARE,
  rankSwaps,
  smallestTypicalFraction,
  swapBasis,
  type SwapResult,
} from './swaps.js';

/** How many prefiltered candidates are profiled in full (bounded cost on large tables). */
const CANDIDATES = 400;

export class SwapService {
  private readonly repo: SwapRepository;

  constructor(
    db: Kysely<DB>,
    private readonly foods: FoodLookup,
    private readonly settings: PlanSettingsSource,
  ) {
    this.repo = new SwapRepository(db);
  }

  /** Up to `limit` (<= 5) swaps for one food from the imported tables. */
  async findSwaps(foodId: number, limit = 5): Promise<SwapResult> {
    const original = (await this.foods.getFoods([foodId])).get(foodId);
    if (!original) throw new NotFoundError('food', foodId);
    const [fractions, thresholds] = await Promise.all([
      this.settings.absorption(),
      this.settings.thresholds(),
    ]);
    const opts = { fractions, maxShare: thresholds.swapMaxShare, limit };
    if (original.group === null) return rankSwaps(original, [], opts);
    let ids: number[];
    if (swapBasis(original) === 'per-g-protein') {
      const abs = profileFood(original, fractions).absorbableMg;
      const prot = original.per100g.proteinG as number;
      if (!abs) return rankSwaps(original, [], opts);
      // A candidate absorbs at least its total P x the smallest typical fraction, so any with
      // total P / protein above this bound cannot reach maxShare of the original's value.
      const bound =
        (thresholds.swapMaxShare * (abs.typical / prot)) / smallestTypicalFraction(fractions);
      ids = await this.repo.proteinCandidates({
        group: original.group,
        excludeId: original.id,
        minProteinG: Math.max(SWAP_MIN_PROTEIN_G_PER_100G, SWAP_MIN_PROTEIN_SHARE * prot),
        maxTotalRatioMgPerG: bound,
        limit: CANDIDATES,
      });
    } else {
      ids = await this.repo.lowProteinCandidates({
        group: original.group,
        excludeId: original.id,
        maxProteinG: SWAP_MIN_PROTEIN_G_PER_100G,
        limit: CANDIDATES,
      });
    }
    const candidates = await this.foods.getFoods(ids);
    return rankSwaps(original, [...candidates.values()], opts);
  }
}
