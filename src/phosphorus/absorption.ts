/**
 * Fractions of dietary phosphorus absorbed, by source (0-1), with a low/typical/high range.
 * No guideline fixes these coefficients (KDOQI 2020 and KDIGO 2017 only say to consider the
 * source); the defaults below come from the published ranges named beside each, and a clinic
 * may override them in settings (key "absorption").
 */
import { z } from 'zod';

export interface AbsorptionRange {
  low: number;
  typical: number;
  high: number;
} // fractions 0-1

export interface AbsorptionFractions {
  animalOrganic: AbsorptionRange;
  plantOrganic: AbsorptionRange; // plant non-phytate
  phytate: AbsorptionRange;
  additive: AbsorptionRange;
  unknown: AbsorptionRange; // used when the split is unknown
}

/** Where each default comes from, for the settings screen and the evidence list. */
export const ABSORPTION_SOURCES: Record<keyof AbsorptionFractions, string> = {
  animalOrganic:
    'Organic P of meat, fish, eggs and dairy: 40-60% absorbed (Kalantar-Zadeh K et al., CJASN 2010;5:519-530; ' +
    'table of commonly quoted fractions in Ren Replace Ther 2017, doi 10.1186/s41100-017-0095-x); typical = midpoint',
  plantOrganic:
    'Non-phytate P of plant foods: taken as absorbed like organic animal P, 40-60% (assumption: no study gives ' +
    'this fraction on its own; from memory, no source)',
  phytate:
    'Phytate-bound P: humans have little intestinal phytase; 0-25%, typical 10% (derived here so that whole plant ' +
    'foods with 46-73% of their P as phytate (Matyka 1993, quoted secondhand) give the 20-40% commonly quoted for ' +
    'plant P (Ren Replace Ther 2017); yeast fermentation and soaking raise it)',
  additive:
    'Inorganic additive phosphate: 80-90% absorbed as free orthophosphate (EFSA FAF Panel 2019, EFSA J 17(6):5674); ' +
    'high end 100% as often quoted (Ren Replace Ther 2017); pooled feeding studies suggest it may be lower ' +
    '(St-Jules DE et al., J Ren Nutr 2017)',
  unknown:
    'Split unknown: net absorption from mixed diets, 55-70% in adults (IOM 1997 DRI report, ch. 5; from memory) and ' +
    '78% from a mixed test meal (Schiller LR et al., NEJM 1989;320:1110-1113); range 40-80%',
};

export const DEFAULT_ABSORPTION_FRACTIONS: AbsorptionFractions = Object.freeze({
  // Kalantar-Zadeh 2010 / Ren Replace Ther 2017: 40-60%
  animalOrganic: Object.freeze({ low: 0.4, typical: 0.5, high: 0.6 }),
  // assumption, see ABSORPTION_SOURCES.plantOrganic
  plantOrganic: Object.freeze({ low: 0.4, typical: 0.5, high: 0.6 }),
  // derived from plant P 20-40% with 46-73% phytate, see ABSORPTION_SOURCES.phytate
  phytate: Object.freeze({ low: 0.0, typical: 0.1, high: 0.25 }),
  // EFSA 2019: 80-90%; up to ~100% commonly quoted
  additive: Object.freeze({ low: 0.8, typical: 0.9, high: 1.0 }),
  // IOM 1997 55-70% (from memory), Schiller 1989 78%
  unknown: Object.freeze({ low: 0.4, typical: 0.6, high: 0.8 }),
}) as AbsorptionFractions;

const fraction = z.number().min(0, 'must be at least 0').max(1, 'must be at most 1');

export const absorptionRangeSchema = z
  .object({ low: fraction, typical: fraction, high: fraction })
  .strict()
  .refine((r) => r.low <= r.typical && r.typical <= r.high, {
    message: 'low <= typical <= high is required',
  });

export const absorptionFractionsSchema: z.ZodType<AbsorptionFractions> = z
  .object({
    animalOrganic: absorptionRangeSchema,
    plantOrganic: absorptionRangeSchema,
    phytate: absorptionRangeSchema,
    additive: absorptionRangeSchema,
    unknown: absorptionRangeSchema,
  })
  .strict();

/** Amounts of phosphorus by source, mg (any basis: per 100 g, per portion). */
export interface PhosphorusBySourceMg {
  animalOrganicMg: number;
  plantNonPhytateMg: number;
  phytateMg: number;
  additiveMg: number;
  unknownMg: number;
}

/** Absorbable phosphorus, mg: the sum over sources of mg x fraction, at each end of the range. */
export function absorbableMg(
  amounts: PhosphorusBySourceMg,
  fractions: AbsorptionFractions = DEFAULT_ABSORPTION_FRACTIONS,
): AbsorptionRange {
  return {
    low: absorbableAt(amounts, fractions, 'low'),
    typical: absorbableAt(amounts, fractions, 'typical'),
    high: absorbableAt(amounts, fractions, 'high'),
  };
}

function absorbableAt(
  amounts: PhosphorusBySourceMg,
  fractions: AbsorptionFractions,
  k: keyof AbsorptionRange,
): number {
  return (
    amounts.animalOrganicMg * fractions.animalOrganic[k] +
    amounts.plantNonPhytateMg * fractions.plantOrganic[k] +
    amounts.phytateMg * fractions.phytate[k] +
    amounts.additiveMg * fractions.additive[k] +
    amounts.unknownMg * fractions.unknown[k]
  );
}
