/**
 * The plan summary as `GET /api/plans/:id/summary` returns it. Type-only imports from the
 * plans area (erased by the bundler), so the screens break at type-check if the contract moves.
 */
export type {
  BinderOccasionEntry,
  BinderSummary,
  Contributor,
  DaySummary,
  ItemSummary,
  MgRange as AbsorbableRange,
  Nutrients,
  PlanSummary,
  TargetCheck,
} from '../../plans/summary-types.js';
export type { SwapCandidate, SwapResult } from '../../plans/swaps.js';
