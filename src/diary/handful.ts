/**
 * Pure: how many grams "a handful" of a food is. A handful has no published size, so each food
 * class gets a stated assumption, shown with the entry; for classes where a handful is not a
 * believable portion (meat, dishes, drinks...) the entry is asked about instead of guessed.
 */
import type { Food } from '../foods/food.js';
import { classifyFood, type FoodClass } from '../phosphorus/food-class.js';
import { GRAMS_PER_OZ, ML_PER_CUP, type GramsResult, type Quantity } from './quantity.js';

/** The assumption for one class: a fixed weight, or a share of the food's own cup measure. */
type HandfulRule =
  | { kind: 'mass'; grams: number; label: string }
  | { kind: 'cup-share'; share: number; fallbackGrams: number; label: string };

/**
 * Handful sizes by food class. No study gives a handful's weight: these are common practice, no
 * source (1 oz of nuts or snacks; half a cup of fruit, vegetables or cereal); users see
 * "assumed (no published figure)".
 */
export const HANDFUL_RULES: Partial<Record<FoodClass, HandfulRule>> = {
  'nut-seed': { kind: 'mass', grams: GRAMS_PER_OZ, label: '1 oz (28.35 g)' },
  sweet: { kind: 'mass', grams: GRAMS_PER_OZ, label: '1 oz (28.35 g)' },
  fruit: { kind: 'cup-share', share: 0.5, fallbackGrams: 75, label: 'half a cup' },
  vegetable: { kind: 'cup-share', share: 0.5, fallbackGrams: 45, label: 'half a cup' },
  'grain-refined': { kind: 'cup-share', share: 0.5, fallbackGrams: 15, label: 'half a cup' },
  'grain-whole': { kind: 'cup-share', share: 0.5, fallbackGrams: 15, label: 'half a cup' },
  legume: { kind: 'cup-share', share: 0.5, fallbackGrams: 45, label: 'half a cup' },
};

/**
 * Nuts and snack foods a handful is usually said of, whatever their table group (peanuts are
 * legumes in USDA SR28; chips and crackers are snacks or baked products).
 */
const SNACK_NAME =
  /\b(peanuts?|chips?|crisps|crackers?|pretzels?|popcorn|snacks?|trail mix|candies)\b/i;

/** The grams of one cup of the food from its own measures, or null. */
function cupGrams(food: Pick<Food, 'portions'>): number | null {
  for (const p of food.portions) {
    if (/^cups?\b/i.test(p.description) && !/crumb|ground|sliced|chopped/i.test(p.description))
      return p.amount > 0 ? p.grams / p.amount : p.grams;
  }
  return null;
}

export type HandfulResult = { ok: true; grams: GramsResult } | { ok: false; question: string };

/**
 * Grams for "n handfuls" of the food (g), with the assumption in the note and `assumed: true`;
 * `ok: false` with a question when a handful is not a believable amount of this kind of food.
 */
export function handfulToGrams(
  q: Quantity,
  food: Pick<Food, 'name' | 'group' | 'portions'>,
): HandfulResult {
  const cls = SNACK_NAME.test(food.name) ? 'nut-seed' : classifyFood(food).foodClass;
  const rule = HANDFUL_RULES[cls];
  const n = q.amount;
  if (!rule) {
    return {
      ok: false,
      question: `how much is '${q.text}' of this food? A handful is no measure for ${cls} foods: enter the amount (g, cups, pieces)`,
    };
  }
  let per: number;
  let how: string;
  if (rule.kind === 'mass') {
    per = rule.grams;
    how = `a handful taken as ${rule.label} for ${cls} foods`;
  } else {
    const cup = cupGrams(food);
    per = cup === null ? rule.fallbackGrams : cup * rule.share;
    how =
      cup === null
        ? `a handful taken as ${rule.fallbackGrams} g for ${cls} foods (no cup measure in the food table)`
        : `a handful taken as ${rule.label} (${Math.round(ML_PER_CUP * rule.share)} ml) of the food's own cup measure`;
  }
  const grams = Math.round(n * per * 10) / 10;
  return {
    ok: true,
    grams: {
      grams,
      method: 'generic-size',
      assumed: true,
      note: `${q.text}: ${how}, assumed (no published figure) = ${grams} g`,
    },
  };
}
