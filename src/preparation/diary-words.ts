/**
 * Cooking words in a patient's diary line (pure): "boiled" and its like in the ten handout
 * languages. When the matched table entry is raw and boiling applies to it, the diary audit
 * counts the food boiled and drained; an entry already cooked gets no second factor, and soup or
 * broth (where the cooking water is eaten) is never taken as drained.
 */
import type { Food } from '../foods/food.js';
import type { AbsorptionFractions } from '../phosphorus/absorption.js';
import type { PhosphorusProfile } from '../phosphorus/profile.js';
import {
  applicability,
  conservativeBasis,
  prepareAmounts,
  type PreparedAmounts,
  type WeightBasis,
} from './apply.js';
import { cookedStateOf, prepClassOf } from './cooked-state.js';
import { PREPARATION_METHODS, type PreparationMethodId } from './methods.js';

// en, es, fr, pt, tl, vi, ru, zh, hi, ar (drafted word lists, common usage, no source).
const BOILED_RE = word(
  'boiled|parboiled|simmered|poached|hervid[oa]s?|cocid[oa]s?|sancochad[oa]s?|bouilli(?:e|s|es)?|poch[ée]e?s?|cozid[oa]s?|fervid[oa]s?|nilaga(?:ng)?|pinakuluan|luộc|luoc|вар[её]н\\p{L}*|отварн\\p{L}*|उबल\\p{M}*\\p{L}*|(?:ال)?مسلوق\\p{L}*',
);
const SOUP_RE = word(
  'soups?|broth|stew|stock|sopa|caldo|soupe|bouillon|potage|sabaw|canh|phở|pho|суп\\p{L}*|бульон\\p{L}*|सूप|शोरबा|شوربة|حساء',
);

/** Whole words in any script (JavaScript's \b only knows ASCII letters). */
function word(alternatives: string): RegExp {
  return new RegExp(`(?<![\\p{L}\\p{M}])(?:${alternatives})(?![\\p{L}\\p{M}])`, 'iu');
}

// Chinese is written without spaces: its words are matched anywhere in the line.
const BOILED_HAN_RE = /水煮|白灼/u;
const SOUP_HAN_RE = /汤/u;

/** The cooking word a diary line uses, or null (soups and broths never count as drained). */
export function cookingWordIn(text: string): string | null {
  if (SOUP_RE.test(text) || SOUP_HAN_RE.test(text)) return null;
  return (BOILED_RE.exec(text) ?? BOILED_HAN_RE.exec(text))?.[0] ?? null;
}

export interface DiaryPreparation {
  /** What the audit says about it, in one line. */
  finding: string;
  /** Plan-item fields for the day totals, when a factor applies. */
  item: { preparation: PreparationMethodId; weightBasis: WeightBasis } | null;
  amounts: PreparedAmounts | null;
}

/** What a diary line's cooking word means for its matched food (null when it has none). */
export function diaryPreparation(
  text: string,
  food: Food,
  profile: PhosphorusProfile,
  fractions: AbsorptionFractions,
  grams: number,
): DiaryPreparation | null {
  const word = cookingWordIn(text);
  if (word === null) return null;
  const method: PreparationMethodId = 'boil-drain';
  const a = applicability(food, method);
  if (!a.ok) {
    // Foods the table has no factors for (eggs, fruit, dishes) need no word about it.
    if (prepClassOf(food) === null) return null;
    const state = cookedStateOf(food).state;
    return {
      finding:
        state === 'cooked'
          ? `the diary says "${word}"; the matched table entry is already cooked: no second factor`
          : `the diary says "${word}"; ${a.reason}`,
      item: null,
      amounts: null,
    };
  }
  // The diary's grams may be raw or cooked: read them the way that gives the larger amounts.
  const basis = conservativeBasis(a.prepClass);
  const amounts = prepareAmounts(food, profile, fractions, grams, basis, method, a);
  return {
    finding: `the diary says "${word}": counted as ${PREPARATION_METHODS[method].label.toLowerCase()} (phosphorus x${a.factors.phosphorus.typical}, potassium x${a.factors.potassium.typical}; ${basis === 'plate' ? 'grams taken as cooked weight' : 'grams taken as raw weight'})`,
    item: { preparation: method, weightBasis: basis },
    amounts,
  };
}
