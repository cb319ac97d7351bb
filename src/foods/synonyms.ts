/**
 * The food search's own synonyms: what people type for foods the tables name otherwise. Each
 * entry is searched besides the words as typed (never instead of them). The tables' own common
 * names (USDA SR28 ComName: "hot dog, frank, wiener" for frankfurters) are searched as they are
 * (alternate names) and ranked as names; this list covers what they leave out. The product's own
 * list (common practice, no source); folded words, whole words only.
 */
export const SEARCH_SYNONYMS: Readonly<Record<string, string>> = {
  'processed cheese': 'cheese pasteurized process american',
  'process cheese': 'cheese pasteurized process american',
  'cheese singles': 'cheese pasteurized process american',
  'american cheese': 'cheese pasteurized process american',
  'hot dog': 'frankfurter',
  'hot dogs': 'frankfurter',
  hotdog: 'frankfurter',
  wiener: 'frankfurter',
  'egg whole': 'egg whole cooked',
  'boiled egg': 'egg whole hard-boiled',
  'hard boiled egg': 'egg whole hard-boiled',
  'scrambled eggs': 'egg whole scrambled',
  'fried egg': 'egg whole fried',
  soda: 'carbonated beverage',
  coke: 'cola',
  fries: 'potatoes french fried',
  'french fries': 'potatoes french fried',
  crisps: 'potato chips',
  'potato chips': 'snacks potato chips',
  ketchup: 'catsup',
  'deli ham': 'ham sliced',
  'lunch meat': 'luncheon',
  'cold cuts': 'luncheon',
  creamer: 'cream substitute',
  'non dairy creamer': 'cream substitute',
  'coffee creamer': 'cream substitute',
  'skim milk': 'milk nonfat',
  'whole milk': 'milk whole',
  'white bread': 'bread white',
  'brown bread': 'bread whole-wheat',
  'whole wheat bread': 'bread whole-wheat',
  toast: 'bread toasted',
  'white rice': 'rice white cooked',
  'brown rice': 'rice brown cooked',
  oatmeal: 'oats cooked',
  porridge: 'oats cooked',
  yoghurt: 'yogurt',
  'ice cream': 'ice creams',
  spaghetti: 'pasta cooked',
  macaroni: 'pasta cooked',
  sugar: 'sugars granulated',
  'peanut butter': 'peanut butter',
  'chicken breast': 'chicken breast meat only cooked',
  'ground beef': 'beef ground',
  hamburger: 'beef ground patty',
  bacon: 'pork cured bacon',
  prawns: 'shrimp',
  aubergine: 'eggplant',
  courgette: 'zucchini',
  biscuits: 'cookies',
  'orange juice': 'orange juice',
  'cola drink': 'carbonated cola',
  'diet coke': 'carbonated cola low calorie',
  mayo: 'mayonnaise',
  'mac and cheese': 'macaroni and cheese',
  'baked beans': 'beans baked',
  'cottage cheese': 'cheese cottage',
  'cream cheese': 'cheese cream',
  'sour cream': 'cream sour',
};

const MAX_PHRASE_WORDS = 4;

/**
 * The word lists to search besides the typed words: each synonym phrase found in the words is
 * replaced (longest first, left to right), giving at most one rewritten list.
 */
export function synonymQueries(words: readonly string[]): string[][] {
  const out: string[] = [];
  let changed = false;
  for (let i = 0; i < words.length;) {
    let done = false;
    for (let n = Math.min(MAX_PHRASE_WORDS, words.length - i); n >= 1; n--) {
      const phrase = words.slice(i, i + n).join(' ');
      const mapped = SEARCH_SYNONYMS[phrase];
      if (mapped !== undefined) {
        out.push(...mapped.split(' '));
        i += n;
        done = true;
        changed = changed || mapped !== phrase;
        break;
      }
    }
    if (!done) out.push(words[i++] as string);
  }
  return changed ? [out] : [];
}
