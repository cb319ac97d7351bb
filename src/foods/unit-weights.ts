/**
 * Typical unit weights for foods whose table gives grams only (IFCT 2017 has no household
 * measures): an egg, a slice of bread, a chapati. Each weight is the household measure USDA SR28
 * gives for the same food (WEIGHT.txt), cited beside it; the source travels with the weight so
 * the screen and the diary report can show it. Pure.
 */

export interface TypicalUnit {
  /** The unit as a person says it ("egg", "slice"). */
  unit: string;
  /** Which size the weight is for ("large", "medium"), or null. */
  size: string | null;
  /** Grams of one unit. */
  grams: number;
  /** Where the weight comes from. */
  source: string;
  /** The kind of diary unit it answers: a slice, or a count of items. */
  answers: 'slice' | 'count';
}

interface Rule extends TypicalUnit {
  /** Tested on the folded food name (lower case, no accents); `not` excludes. */
  name: RegExp;
  not?: RegExp;
}

const RULES: Rule[] = [
  {
    name: /\beggs?\b|\banda\b|\bmotte\b/,
    not: /\bwhites?\b|\byolks?\b|noodle|plant|substitute|powder|dried|nog\b/,
    unit: 'egg',
    size: 'large',
    grams: 50,
    source: 'USDA SR28 NDB 01123 Egg, whole, raw, fresh: 1 large = 50 g',
    answers: 'count',
  },
  {
    name: /\beggs?\b.*\bwhites?\b/,
    unit: 'egg white',
    size: 'large',
    grams: 33,
    source: 'USDA SR28 NDB 01124 Egg, white, raw, fresh: 1 large = 33 g',
    answers: 'count',
  },
  {
    name: /\bchapati|\broti\b|\bphulka|\bparatha/,
    unit: 'piece',
    size: null,
    grams: 68,
    source:
      'USDA SR28 NDB 28306 Bread, chapati or roti, plain, commercially prepared: 1 piece = 68 g',
    answers: 'count',
  },
  {
    name: /\bnaan\b/,
    unit: 'piece',
    size: null,
    grams: 90,
    source: 'USDA SR28 NDB 28307 Bread, naan, plain, commercially prepared: 1 piece = 90 g',
    answers: 'count',
  },
  {
    name: /\bbananas?\b|\bplantains?\b|\bkela\b/,
    unit: 'banana',
    size: 'medium',
    grams: 118,
    source: 'USDA SR28 NDB 09040 Bananas, raw: 1 medium (7" to 7-7/8" long) = 118 g',
    answers: 'count',
  },
  {
    name: /\bapples?\b|\bseb\b/,
    not: /juice|sauce|dried|pie/,
    unit: 'apple',
    size: 'medium',
    grams: 182,
    source: 'USDA SR28 NDB 09003 Apples, raw, with skin: 1 medium (3" dia) = 182 g',
    answers: 'count',
  },
  {
    name: /\boranges?\b|\bsantra\b/,
    not: /juice|peel/,
    unit: 'orange',
    size: null,
    grams: 131,
    source:
      'USDA SR28 NDB 09200 Oranges, raw, all commercial varieties: 1 fruit (2-5/8" dia) = 131 g',
    answers: 'count',
  },
  {
    name: /\bpotato(es)?\b|\baloo\b/,
    not: /chips|flour|sweet|fries|french/,
    unit: 'potato',
    size: 'medium',
    grams: 213,
    source:
      'USDA SR28 NDB 11352 Potatoes, flesh and skin, raw: 1 potato medium (2-1/4" to 3-1/4" dia) = 213 g',
    answers: 'count',
  },
  {
    name: /\bbread\b/,
    not: /crumb|stuffing|pudding/,
    unit: 'slice',
    size: null,
    grams: 29,
    source: 'USDA SR28 NDB 18069 Bread, white, commercially prepared: 1 slice = 29 g',
    answers: 'slice',
  },
  {
    name: /\bcheese\b|\bpaneer\b/,
    unit: 'slice',
    size: null,
    grams: 21,
    source: 'USDA SR28 NDB 01042 Cheese, pasteurized process, American: 1 slice (3/4 oz) = 21 g',
    answers: 'slice',
  },
  {
    name: /\bham\b|\bturkey\b|\bbologna\b|\bluncheon\b|\bdeli\b/,
    unit: 'slice',
    size: null,
    grams: 28,
    source: 'USDA SR28 NDB 07029 Ham, sliced, regular (approximately 11% fat): 1 slice = 28 g',
    answers: 'slice',
  },
  {
    name: /\bfrankfurters?\b|\bhot ?dogs?\b|\bwieners?\b/,
    unit: 'frankfurter',
    size: null,
    grams: 50,
    source: 'USDA SR28 NDB 07022 Frankfurter, beef, unheated: 1 frankfurter = 50 g',
    answers: 'count',
  },
];

function fold(text: string): string {
  return text
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase();
}

/** The typical unit of a food by its name, for the kind of unit asked ('slice' or a count). */
export function typicalUnit(name: string, answers?: TypicalUnit['answers']): TypicalUnit | null {
  const folded = fold(name);
  for (const r of RULES) {
    if (answers && r.answers !== answers) continue;
    if (!r.name.test(folded) || r.not?.test(folded)) continue;
    const { unit, size, grams, source } = r;
    return { unit, size, grams, source, answers: r.answers };
  }
  return null;
}
