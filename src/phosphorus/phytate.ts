/** Phytate phosphorus from phytic acid, myo-inositol hexakisphosphate C6H18O24P6. */
import { phosphorusMassFraction } from '../chem/formula.js';

export const PHYTIC_ACID_FORMULA = 'C6H18O24P6';

/** P mass fraction of phytic acid (about 0.2816), computed from the formula and IUPAC 2021 atomic weights. */
export const PHYTIC_ACID_P_FRACTION = phosphorusMassFraction(PHYTIC_ACID_FORMULA);

/** Phytate phosphorus, mg, from a phytic-acid amount in mg. */
export function phytatePhosphorusMg(phyticAcidMg: number): number {
  return phyticAcidMg * PHYTIC_ACID_P_FRACTION;
}
