import type { Targets } from '../patients/targets.js';

/** A caution shown with a summary, a handout or a diary report, with where it comes from. */
export interface ClinicalCaution {
  code: 'potassium-dialysis' | 'protein-below-target' | 'additive-variability';
  text: string;
  source: string;
}

export const ADDITIVE_VARIABILITY_CAUTION: ClinicalCaution = {
  code: 'additive-variability',
  text: 'Additive phosphorus varies by brand and batch and is often not declared: table values for processed foods can be well below what is eaten; check labels of the foods the patient buys.',
  source:
    'Sherman RA, Mehta O, CJASN 2009;4:1370-1373 (enhanced meats up to ~100% more P per g protein); Leon JB et al., J Ren Nutr 2013;23:265-270',
};

export const PROTEIN_BELOW_TARGET_CAUTION: ClinicalCaution = {
  code: 'protein-below-target',
  text: 'Protein is below target on at least one day: do not meet phosphorus by cutting protein, which risks protein-energy wasting; choose lower-ratio protein foods and pair the binder with meals instead.',
  source:
    'KDOQI 2020 (Ikizler TA et al., Am J Kidney Dis 2020;76(3 Suppl 1)): protein targets and monitoring of nutritional status; KDOQI 2003 Guideline 4.1: phosphorus restriction adjusted for protein needs',
};

export const POTASSIUM_DIALYSIS_CAUTION: ClinicalCaution = {
  code: 'potassium-dialysis',
  text: 'On dialysis, potassium builds up between sessions: check the plan, and any swap to fruit, vegetables, legumes, nuts or low-phosphorus dairy alternatives, against serum potassium with the care team.',
  source:
    'KDOQI 2020: adjust dietary potassium to keep serum potassium in the normal range (OPINION); common practice for plant swaps, no source',
};

/** Said with swaps whenever a plant food is offered or a swap carries more potassium (common practice, no source). */
export const PLANT_SWAP_POTASSIUM_CAUTION =
  'Plant foods that save phosphorus (legumes, nuts, whole grains) often carry more potassium: check it against the potassium target, especially on dialysis.';

/**
 * The cautions for a plan or diary (pure): potassium when the targets are a dialysis patient's,
 * malnutrition when protein is under target on any day, and additive variability always.
 */
export function clinicalCautions(input: {
  targets: Targets;
  proteinBelowTarget: boolean;
}): ClinicalCaution[] {
  const out: ClinicalCaution[] = [];
  const k = input.targets.potassiumMg as Targets['potassiumMg'] | undefined;
  if (k?.onDialysis) out.push(POTASSIUM_DIALYSIS_CAUTION);
  if (input.proteinBelowTarget) out.push(PROTEIN_BELOW_TARGET_CAUTION);
  out.push(ADDITIVE_VARIABILITY_CAUTION);
  return out;
}
