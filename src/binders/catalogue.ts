import type { BinderIngredient } from './binder.js';

/**
 * Reference data per phosphate-binder ingredient. Each number names its source beside it.
 * The product uses it to explain and check a prescription; it never suggests a dose.
 */

// IUPAC standard atomic weights, g/mol (abridged).
const AW = { Ca: 40.078, C: 12.011, H: 1.008, O: 15.999, Mg: 24.305, Al: 26.982 } as const;

/** Molar mass in g/mol from element counts. */
function molarMass(counts: Partial<Record<keyof typeof AW, number>>): number {
  let g = 0;
  for (const [el, n] of Object.entries(counts)) g += AW[el as keyof typeof AW] * (n ?? 0);
  return g;
}

/** Calcium acetate, anhydrous Ca(C2H3O2)2 = CaC4H6O4: 158.166 g/mol, Ca fraction 0.25339. */
export const CALCIUM_ACETATE_G_PER_MOL = molarMass({ Ca: 1, C: 4, H: 6, O: 4 });
/** Calcium carbonate CaCO3: 100.086 g/mol, Ca fraction 0.40044. */
export const CALCIUM_CARBONATE_G_PER_MOL = molarMass({ Ca: 1, C: 1, O: 3 });
/** Aluminium hydroxide Al(OH)3: 78.003 g/mol. */
export const ALUMINIUM_HYDROXIDE_G_PER_MOL = molarMass({ Al: 1, O: 3, H: 3 });
/** Magnesium carbonate, anhydrous MgCO3: 84.311 g/mol. */
export const MAGNESIUM_CARBONATE_G_PER_MOL = molarMass({ Mg: 1, C: 1, O: 3 });

export interface SpacingNote {
  medicines: string;
  instruction: string;
  source: string;
}

export interface BinderInfo {
  ingredient: BinderIngredient;
  displayName: string;
  /** What the unit strength counts: the whole salt, or the element the product is labelled by. */
  strengthBasis: 'salt' | 'elemental lanthanum' | 'elemental iron' | 'polymer';
  /** Chemical formula used for the element fractions below, or null. */
  formula: string | null;
  /** Elemental calcium per mg of salt (computed from the formula and IUPAC weights), or null. */
  calciumMassFraction: number | null;
  /**
   * Relative phosphate-binding coefficient per gram (calcium carbonate = 1.0), Daugirdas JT,
   * Finn WF, Emmett M, Chertow GM, "The phosphate binder equivalent dose", Semin Dial
   * 2011;24(1):41-49; null where that paper published none.
   */
  rpbcPerG: number | null;
  /** How to take it relative to the meal, and whether to chew or swallow whole. */
  timing: string;
  timingSource: string;
  /**
   * How the patient takes it, as the handout says it (the one place handouts read it from):
   * 'swallow' whole, 'chew' (or crush) before swallowing, or 'as-label' where chewable,
   * swallowable or powder forms exist and only the product label can say.
   */
  intake: 'swallow' | 'chew' | 'as-label';
  spacing: SpacingNote[];
  /** Warnings always shown with this ingredient. */
  warnings: string[];
}

const WITH_MEALS_SOURCE =
  'Schiller LR et al., NEJM 1989;320(17):1110-1113: calcium acetate taken with the meal bound ' +
  'about 2.7 times more phosphorus than taken 2 h after it';

export const BINDER_CATALOGUE: Record<BinderIngredient, BinderInfo> = {
  'calcium-acetate': {
    ingredient: 'calcium-acetate',
    displayName: 'calcium acetate',
    strengthBasis: 'salt',
    formula: 'Ca(C2H3O2)2',
    calciumMassFraction: AW.Ca / CALCIUM_ACETATE_G_PER_MOL,
    rpbcPerG: 1.0, // Daugirdas 2011
    timing:
      'Take with meals, starting with the first bites. Swallow the capsule or tablet with the meal.',
    timingSource: `US label (calcium acetate 667 mg): take with meals; ${WITH_MEALS_SOURCE}`,
    intake: 'swallow',
    spacing: [
      {
        medicines: 'quinolone antibiotics (e.g. ciprofloxacin)',
        instruction: 'take the antibiotic 2 h before or 6 h after the binder',
        source:
          'consumer drug information for calcium acetate (label wording from memory); ' +
          'ciprofloxacin bioavailability -51% with calcium acetate (Kays MB et al., 2003)',
      },
      {
        medicines: 'tetracyclines (e.g. doxycycline)',
        instruction: 'take the antibiotic at least 1 h before the binder',
        source: 'consumer drug information for calcium acetate (label wording from memory)',
      },
      {
        medicines: 'levothyroxine',
        instruction: 'keep 4 h apart',
        source: 'consumer drug information for calcium acetate (label wording from memory)',
      },
    ],
    warnings: [
      'Calcium-based: KDOQI 2003 Guideline 5 advises against it when corrected calcium is above 10.2 mg/dL (2.54 mmol/L) or PTH is below 150 pg/mL on two measurements; KDIGO 2017 suggests restricting calcium-based binder doses.',
    ],
  },
  'calcium-carbonate': {
    ingredient: 'calcium-carbonate',
    displayName: 'calcium carbonate',
    strengthBasis: 'salt',
    formula: 'CaCO3',
    calciumMassFraction: AW.Ca / CALCIUM_CARBONATE_G_PER_MOL,
    rpbcPerG: 1.0, // Daugirdas 2011: the reference binder
    timing:
      'Take with meals, starting with the first bites. Chew or swallow as the product label says (chewable and swallowable forms exist).',
    timingSource: WITH_MEALS_SOURCE,
    intake: 'as-label',
    spacing: [
      {
        medicines: 'quinolone and tetracycline antibiotics, levothyroxine, oral iron',
        instruction:
          'keep apart as the product label says (usually at least 2 h; 4 h for levothyroxine)',
        source: 'from memory (calcium salts chelate these medicines); check the product label',
      },
    ],
    warnings: [
      'Calcium-based: KDOQI 2003 Guideline 5 advises against it when corrected calcium is above 10.2 mg/dL (2.54 mmol/L) or PTH is below 150 pg/mL on two measurements; KDIGO 2017 suggests restricting calcium-based binder doses.',
    ],
  },
  'sevelamer-carbonate': {
    ingredient: 'sevelamer-carbonate',
    displayName: 'sevelamer carbonate',
    strengthBasis: 'polymer',
    formula: null,
    calciumMassFraction: null,
    rpbcPerG: 0.75, // Daugirdas 2011 (HCl or carbonate)
    timing:
      'Take with meals, starting with the first bites. Swallow tablets whole; do not crush, chew or break them (powder: mix with water as labelled).',
    timingSource:
      'US label (sevelamer carbonate): take with meals [V]; swallow whole [from memory]',
    intake: 'as-label',
    spacing: [
      {
        medicines:
          'ciprofloxacin, ciclosporin, mycophenolate mofetil, tacrolimus, levothyroxine and other medicines where a lower level matters',
        instruction:
          'take them at least 1 h before or 3 h after the binder, or monitor levels (wording varies by country)',
        source:
          'sevelamer product information (MIMS Philippines); MIMS Malaysia says ciprofloxacin 2 h before or 6 h after',
      },
    ],
    warnings: [],
  },
  'sevelamer-hydrochloride': {
    ingredient: 'sevelamer-hydrochloride',
    displayName: 'sevelamer hydrochloride',
    strengthBasis: 'polymer',
    formula: null,
    calciumMassFraction: null,
    rpbcPerG: 0.75, // Daugirdas 2011 (HCl or carbonate)
    timing:
      'Take with meals, starting with the first bites. Swallow tablets whole; do not crush, chew or break them.',
    timingSource: 'sevelamer product information: take with meals [V]; swallow whole [from memory]',
    intake: 'swallow',
    spacing: [
      {
        medicines:
          'ciprofloxacin, ciclosporin, mycophenolate mofetil, tacrolimus, levothyroxine and other medicines where a lower level matters',
        instruction:
          'take them at least 1 h before or 3 h after the binder, or monitor levels (wording varies by country)',
        source:
          'sevelamer product information (MIMS Philippines); ciprofloxacin -48% (Kays MB et al., 2003)',
      },
    ],
    warnings: [],
  },
  'lanthanum-carbonate': {
    ingredient: 'lanthanum-carbonate',
    displayName: 'lanthanum carbonate',
    strengthBasis: 'elemental lanthanum',
    formula: 'La2(CO3)3',
    calciumMassFraction: null,
    rpbcPerG: 2.0, // Daugirdas 2011, per gram of elemental lanthanum
    timing:
      'Take with or right after the meal. Chew or crush the tablet completely before swallowing; never swallow it whole. Powder may be mixed with soft food such as applesauce.',
    timingSource: 'US label (lanthanum carbonate chewable tablets and oral powder)',
    intake: 'chew',
    spacing: [
      {
        medicines: 'medicines known to interact with antacids',
        instruction: 'not within 2 h of the binder',
        source: 'US label (lanthanum carbonate)',
      },
      {
        medicines: 'quinolone antibiotics (e.g. ciprofloxacin)',
        instruction: 'take the antibiotic at least 1 h before or 4 h after the binder',
        source: 'US label (lanthanum carbonate): ciprofloxacin bioavailability about 50% lower',
      },
      {
        medicines: 'levothyroxine',
        instruction: 'at least 2 h before or after the binder; monitor TSH',
        source: 'US label (lanthanum carbonate): levothyroxine about 40% lower',
      },
    ],
    warnings: [],
  },
  'ferric-citrate': {
    ingredient: 'ferric-citrate',
    displayName: 'ferric citrate',
    strengthBasis: 'salt',
    formula: null,
    calciumMassFraction: null,
    rpbcPerG: null, // iron binders were not in Daugirdas 2011
    timing:
      'Take with meals, starting with the first bites. Swallow tablets whole; do not crush or chew them.',
    timingSource: 'ferric citrate product information (secondary label summaries)',
    intake: 'swallow',
    spacing: [
      {
        medicines: 'doxycycline',
        instruction: 'take it at least 1 h before the binder',
        source: 'ferric citrate product information (hours from memory)',
      },
      {
        medicines: 'ciprofloxacin',
        instruction: 'take it at least 2 h before or after the binder',
        source: 'ferric citrate product information (hours from memory)',
      },
    ],
    warnings: ['Contains iron: iron indices are monitored by the care team.'],
  },
  'sucroferric-oxyhydroxide': {
    ingredient: 'sucroferric-oxyhydroxide',
    displayName: 'sucroferric oxyhydroxide',
    strengthBasis: 'salt',
    formula: null,
    calciumMassFraction: null,
    rpbcPerG: null, // iron binders were not in Daugirdas 2011
    timing:
      'Take with meals, starting with the first bites. Chew or crush the tablet; do not swallow it whole.',
    timingSource: 'sucroferric oxyhydroxide product information (secondary label summaries)',
    intake: 'chew',
    spacing: [
      {
        medicines: 'doxycycline, cefalexin, aspirin',
        instruction: 'take them at least 1 h before the binder',
        source: 'sucroferric oxyhydroxide product information (ADAM, CIMS summaries)',
      },
      {
        medicines: 'levothyroxine',
        instruction: 'at least 4 h before the binder (1 h in some countries)',
        source: 'sucroferric oxyhydroxide product information (wording varies by country)',
      },
    ],
    warnings: ['Contains iron: iron indices are monitored by the care team.'],
  },
  'aluminium-hydroxide': {
    ingredient: 'aluminium-hydroxide',
    displayName: 'aluminium hydroxide',
    strengthBasis: 'salt',
    formula: 'Al(OH)3',
    calciumMassFraction: null,
    rpbcPerG: 1.5, // Daugirdas 2011
    timing: 'Take with meals, starting with the first bites.',
    timingSource: WITH_MEALS_SOURCE,
    intake: 'as-label',
    spacing: [
      {
        medicines: 'quinolone and tetracycline antibiotics, levothyroxine, iron',
        instruction: 'keep apart as the product label says (usually at least 2 h)',
        source: 'from memory (antacid chelation); check the product label',
      },
    ],
    warnings: [
      'Aluminium accumulates in kidney failure (bone disease, encephalopathy): KDIGO 2009 4.1.6 and KDIGO 2017 recommend avoiding long-term use (1C). If used at all, short courses only (about 4 weeks, common practice).',
      'Never combine with citrate (including ferric citrate or citrus drinks taken with it): citrate increases aluminium absorption (from memory).',
    ],
  },
  'magnesium-carbonate': {
    ingredient: 'magnesium-carbonate',
    displayName: 'magnesium carbonate',
    strengthBasis: 'salt',
    formula: 'MgCO3',
    calciumMassFraction: null,
    rpbcPerG: 1.7, // Daugirdas 2011, anhydrous; heavy/hydrated magnesium carbonate 1.3
    timing: 'Take with meals, starting with the first bites.',
    timingSource: WITH_MEALS_SOURCE,
    intake: 'as-label',
    spacing: [
      {
        medicines: 'quinolone and tetracycline antibiotics, levothyroxine, iron',
        instruction: 'keep apart as the product label says (usually at least 2 h)',
        source: 'from memory (antacid chelation); check the product label',
      },
    ],
    warnings: [
      'Magnesium is retained in kidney failure: serum magnesium needs monitoring by the care team; diarrhoea is common (from memory).',
      'The 1.7 equivalence applies to anhydrous magnesium carbonate; heavy (hydrated) magnesium carbonate is 1.3 (Daugirdas 2011).',
    ],
  },
};

/**
 * Phosphorus bound per gram of calcium-carbonate equivalent, mg: 5.36 mmol (166 mg) P bound by
 * 4.4 g calcium acetate taken with a meal (Schiller LR et al., NEJM 1989;320:1110-1113),
 * 166 / 4.4 = 37.8 mg per g, and calcium acetate's equivalence is 1.0 (Daugirdas 2011).
 * Used only to say when a dose could bind more than an occasion carries.
 */
export const BOUND_MG_P_PER_PBED_G = 166 / 4.4;

/** Phosphate-binder equivalent dose of one unit, grams of calcium carbonate; null if unpublished. */
export function pbedGPerUnit(ingredient: BinderIngredient, unitStrengthMg: number): number | null {
  const rpbc = BINDER_CATALOGUE[ingredient].rpbcPerG;
  return rpbc === null ? null : (unitStrengthMg / 1000) * rpbc;
}

/** Elemental calcium in one unit, mg; 0 for binders without calcium. */
export function elementalCalciumMgPerUnit(
  ingredient: BinderIngredient,
  unitStrengthMg: number,
): number {
  const f = BINDER_CATALOGUE[ingredient].calciumMassFraction;
  return f === null ? 0 : unitStrengthMg * f;
}

/**
 * KDOQI 2003 (Am J Kidney Dis 2003;42(4 Suppl 3)) Guideline 5: elemental calcium from
 * calcium-based binders at most 1,500 mg/day, total elemental calcium with diet at most
 * 2,000 mg/day.
 */
export const KDOQI_2003_CALCIUM_LIMITS = { fromBindersMaxMg: 1500, totalMaxMg: 2000 } as const;
