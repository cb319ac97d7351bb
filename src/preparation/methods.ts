/**
 * The product's table of preparation methods and what each does to a raw food: retained
 * fractions (true retention: nutrient in the cooked food / nutrient in the raw food it came from)
 * of phosphorus, potassium, sodium, calcium and protein, low/typical/high per food class, and the
 * weight change from raw to plate. Pure data.
 *
 * Every factor names its source and says whether it was checked ("verified") or is from memory;
 * users see the latter as "assumed (no published figure)". Ranges are wide on purpose where
 * studies disagree (e.g. meat phosphorus 29-90% retained: Cupisti 2006 beef vs Vrdoljak 2015).
 */
import type { PreparationSourceId } from './sources.js';

export const PREPARATION_METHOD_IDS = [
  'as-listed',
  'boil-drain',
  'soak-boil-drain',
  'pressure-boil-drain',
  'slice-boil-drain',
  'double-boil-drain',
] as const;
export type PreparationMethodId = (typeof PREPARATION_METHOD_IDS)[number];

/** Food classes the preparation table knows (own classes: boiling behaves differently per class). */
export const PREP_CLASSES = [
  'meat',
  'poultry',
  'fish',
  'vegetable',
  'tuber',
  'pulse',
  'pasta',
  'grain',
] as const;
export type PrepClass = (typeof PREP_CLASSES)[number];

export const PREP_NUTRIENTS = ['phosphorus', 'potassium', 'sodium', 'calcium', 'protein'] as const;
export type PrepNutrient = (typeof PREP_NUTRIENTS)[number];

export interface FactorRange {
  low: number;
  typical: number;
  high: number;
}

/** One retained fraction with where it comes from. */
export interface Factor extends FactorRange {
  sources: PreparationSourceId[];
  /** true: the figures were checked against the source; false: from memory (shown as assumed). */
  verified: boolean;
  note: string;
}

export type FactorSet = Record<PrepNutrient, Factor>;

export interface PreparationMethod {
  id: PreparationMethodId;
  /** The product's own name for the method, English (handouts use the catalogues). */
  label: string;
  /** Factors per class; a class not listed cannot be prepared this way. */
  factors: Partial<Record<PrepClass, FactorSet>>;
}

const f = (
  low: number,
  typical: number,
  high: number,
  verified: boolean,
  sources: PreparationSourceId[],
  note: string,
): Factor => ({ low, typical, high, verified, sources, note });

const memory = (low: number, typical: number, high: number, note = 'from memory'): Factor =>
  f(low, typical, high, false, [], note);

// Calcium: Vrdoljak 2015 found boiling in hard water raised calcium in every food (direction
// verified); how much depends on the water, so the range reaches above 1 (size from memory).
const CALCIUM = f(
  0.8,
  1.0,
  1.3,
  false,
  ['vrdoljak-2015'],
  'can rise in hard water (Vrdoljak 2015); amount from memory',
);
// Sodium leaches like potassium when no salt is added to the water (from memory).
const SODIUM_ANIMAL = memory(0.4, 0.6, 0.9, 'from memory; no salt added to the water');
const SODIUM_PLANT = memory(0.5, 0.7, 0.9, 'from memory; no salt added to the water');
const PROTEIN_PLANT = f(
  0.85,
  0.95,
  1.0,
  false,
  ['vrdoljak-2015'],
  'protein mostly unchanged (Vrdoljak 2015); figures from memory',
);

const MEAT_PROTEIN = f(
  0.77,
  0.87,
  1.0,
  true,
  ['cupisti-2006', 'ando-2015'],
  'Cupisti 2006 beef 87 +/- 10%; Ando 2015 protein kept',
);
const POULTRY_PROTEIN = f(
  0.77,
  0.81,
  1.0,
  true,
  ['cupisti-2006', 'vrdoljak-2015'],
  'Cupisti 2006 chicken 81 +/- 4%; Vrdoljak 2015 mostly unchanged',
);
const MEAT_POTASSIUM = memory(0.35, 0.55, 0.8);

const BOIL: Partial<Record<PrepClass, FactorSet>> = {
  meat: {
    phosphorus: f(
      0.29,
      0.5,
      0.9,
      true,
      ['cupisti-2006', 'ando-2015', 'vrdoljak-2015'],
      'Cupisti 2006 beef 42 +/- 13%; Ando 2015 about half; Vrdoljak 2015 10-49% lower',
    ),
    potassium: MEAT_POTASSIUM,
    sodium: SODIUM_ANIMAL,
    calcium: CALCIUM,
    protein: MEAT_PROTEIN,
  },
  poultry: {
    phosphorus: f(
      0.46,
      0.63,
      0.9,
      true,
      ['cupisti-2006', 'uenishi-2022', 'vrdoljak-2015'],
      'Cupisti 2006 chicken 63 +/- 6%; Uenishi 2022 boiled 65%, cut 46%; Vrdoljak 2015 10-49% lower',
    ),
    potassium: MEAT_POTASSIUM,
    sodium: SODIUM_ANIMAL,
    calcium: CALCIUM,
    protein: POULTRY_PROTEIN,
  },
  fish: {
    phosphorus: memory(0.5, 0.7, 0.9),
    potassium: memory(0.4, 0.6, 0.85),
    sodium: SODIUM_ANIMAL,
    calcium: CALCIUM,
    protein: memory(0.85, 0.95, 1.0),
  },
  vegetable: {
    phosphorus: f(0.57, 0.65, 0.73, true, ['vrdoljak-2015'], 'Vrdoljak 2015: 27-43% lower'),
    potassium: memory(0.4, 0.6, 0.85),
    sodium: SODIUM_PLANT,
    calcium: CALCIUM,
    protein: PROTEIN_PLANT,
  },
  tuber: {
    phosphorus: f(
      0.57,
      0.65,
      0.9,
      false,
      ['vrdoljak-2015'],
      'Vrdoljak 2015 potatoes among vegetables 27-43% lower; 0.9 for whole tubers from memory',
    ),
    potassium: f(
      0.25,
      0.65,
      0.95,
      false,
      ['bethke-jansky-2008'],
      'Bethke 2008: up to 75% lower when cubed or shredded; typical and whole-tuber end from memory',
    ),
    sodium: SODIUM_PLANT,
    calcium: CALCIUM,
    protein: PROTEIN_PLANT,
  },
  pulse: {
    phosphorus: memory(0.7, 0.85, 0.95),
    potassium: memory(0.5, 0.7, 0.9),
    sodium: SODIUM_PLANT,
    calcium: CALCIUM,
    protein: PROTEIN_PLANT,
  },
  pasta: {
    phosphorus: f(
      0.85,
      0.93,
      1.0,
      false,
      ['vrdoljak-2015'],
      'Vrdoljak 2015 pasta 7% lower; range ends from memory',
    ),
    potassium: memory(0.5, 0.7, 0.9),
    sodium: SODIUM_PLANT,
    calcium: CALCIUM,
    protein: memory(0.9, 0.97, 1.0),
  },
  grain: {
    phosphorus: f(
      0.7,
      0.77,
      0.95,
      false,
      ['vrdoljak-2015'],
      'Vrdoljak 2015 rice 22.8% lower; range ends from memory',
    ),
    potassium: memory(0.5, 0.7, 0.9),
    sodium: SODIUM_PLANT,
    calcium: CALCIUM,
    protein: memory(0.9, 0.97, 1.0),
  },
};

/** A copy of a boil factor set with some nutrients replaced. */
function like(cls: PrepClass, over: Partial<FactorSet>): FactorSet {
  return { ...(BOIL[cls] as FactorSet), ...over };
}

const SOAK_POTASSIUM_NOTE =
  'soaking adds little for potassium (Burrowes 2006; Bethke 2008); figures from memory';

export const PREPARATION_METHODS: Record<PreparationMethodId, PreparationMethod> = {
  'as-listed': { id: 'as-listed', label: 'As listed in the food table', factors: {} },
  'boil-drain': { id: 'boil-drain', label: 'Boiled, water thrown away', factors: BOIL },
  'soak-boil-drain': {
    id: 'soak-boil-drain',
    label: 'Soaked, then boiled, water thrown away',
    factors: {
      vegetable: like('vegetable', {
        phosphorus: memory(0.5, 0.6, 0.73),
        potassium: f(0.35, 0.55, 0.85, false, ['burrowes-ramer-2006'], SOAK_POTASSIUM_NOTE),
      }),
      tuber: like('tuber', {
        phosphorus: memory(0.5, 0.62, 0.9),
        potassium: f(
          0.25,
          0.6,
          0.95,
          false,
          ['burrowes-ramer-2006', 'bethke-jansky-2008'],
          SOAK_POTASSIUM_NOTE,
        ),
      }),
      pulse: like('pulse', {
        phosphorus: memory(0.6, 0.78, 0.92),
        potassium: memory(0.4, 0.6, 0.85),
      }),
    },
  },
  'pressure-boil-drain': {
    id: 'pressure-boil-drain',
    label: 'Pressure-cooked, water thrown away',
    factors: {
      meat: like('meat', {
        phosphorus: f(
          0.25,
          0.45,
          0.7,
          false,
          ['ando-2015'],
          'Ando 2015: pressure cooker effective; figures from memory',
        ),
        protein: f(
          0.8,
          0.9,
          1.0,
          false,
          ['ando-2015'],
          'Ando 2015: protein kept; figures from memory',
        ),
      }),
      poultry: like('poultry', { phosphorus: memory(0.35, 0.55, 0.75) }),
      pulse: like('pulse', { phosphorus: memory(0.65, 0.8, 0.92) }),
    },
  },
  'slice-boil-drain': {
    id: 'slice-boil-drain',
    label: 'Sliced thin, boiled, water thrown away',
    factors: {
      meat: like('meat', {
        phosphorus: f(
          0.2,
          0.4,
          0.55,
          false,
          ['ando-2015', 'cupisti-2006'],
          'Ando 2015: sliced 30 min kept about half of a block boiled 10 min; figures from memory',
        ),
      }),
      poultry: like('poultry', {
        phosphorus: f(
          0.35,
          0.46,
          0.58,
          true,
          ['uenishi-2022'],
          'Uenishi 2022: cut then boiled 46%, stabbed then boiled 58%',
        ),
      }),
    },
  },
  'double-boil-drain': {
    id: 'double-boil-drain',
    label: 'Boiled twice in fresh water, water thrown away',
    factors: {
      tuber: like('tuber', {
        phosphorus: memory(0.45, 0.6, 0.8),
        potassium: f(
          0.25,
          0.45,
          0.7,
          false,
          ['burrowes-ramer-2006', 'bethke-jansky-2008'],
          'Burrowes 2006: double cooking leaches more than one boiling; Bethke 2008 up to 75% lower; typical from memory',
        ),
      }),
    },
  },
};

/**
 * Plate weight per raw weight (g cooked / g raw) per class, for converting the grams of a plan
 * item: meat and fish lose water, pulses, pasta and rice take it up. Poultry is derived from
 * USDA SR28 NDB 05062 (raw breast, water 73.90 g) and 05065 (stewed, water 68.27 g) with
 * Cupisti 2006's dry-matter retention of 93%: 26.10 g x 0.93 / 31.73% = 0.765. The others are
 * from memory (the USDA cooking-yield tables could not be checked here).
 */
export const PLATE_YIELD: Record<PrepClass, Factor> = {
  meat: memory(0.65, 0.75, 0.85),
  poultry: f(
    0.7,
    0.77,
    0.85,
    true,
    ['usda-sr28-pairs', 'cupisti-2006'],
    'derived from USDA SR28 NDB 05062 and 05065 (water) with Cupisti 2006 dry-matter retention 93%',
  ),
  fish: memory(0.75, 0.85, 0.95),
  vegetable: memory(0.85, 0.95, 1.05),
  tuber: memory(0.9, 1.0, 1.05),
  pulse: memory(2.2, 2.5, 2.9, 'from memory; dry seeds to cooked'),
  pasta: memory(2.0, 2.4, 2.8, 'from memory; dry pasta to cooked'),
  grain: memory(2.4, 2.8, 3.2, 'from memory; raw grain to cooked'),
};

export function isPreparationMethodId(x: string): x is PreparationMethodId {
  return (PREPARATION_METHOD_IDS as readonly string[]).includes(x);
}
