/**
 * Pure scoring for diary matching, on top of the food search: turns a diary phrase into search
 * words (plain-language and Spanish words mapped to food-table words), then scores each found
 * food: coverage of the words, the main word in the food's head, a plain generic food before a
 * branded or special one unless a brand is named, and the usual state (cooked meat, raw fruit).
 */
import { foldText, isAscii } from '../foods/text.js';

/** What the scorer needs of a food. */
export interface ScorableFood {
  id: number;
  name: string;
  kind: 'generic' | 'branded';
  brandOwner: string | null;
  group: string | null;
  /** The food's household measures: common foods have more of them in the tables. */
  portions?: readonly { description: string }[];
}

export interface PreparedQuery {
  /** The text as given (quantity already removed). */
  text: string;
  /** Content words after mapping, folded and stemmed. */
  words: string[];
  /** Words that must not be dropped when searching with fewer words (the head food words). */
  headWords: string[];
  /** States the diary named (cooked, raw, fried, canned...). */
  states: Set<string>;
  /** Folded original words (to see whether a brand is named). */
  rawWords: Set<string>;
  /** The whole text folded (lower case, no accents). */
  folded: string;
  /** Words after "with" that name a second food, not matched ("toast with margarine"). */
  dropped: string[];
}

export interface ScoredFood<F extends ScorableFood = ScorableFood> {
  food: F;
  score: number;
  /** Share of the query words found in the food's name, 0-1. */
  coverage: number;
}

const stemCache = new Map<string, string>();

/** Words that carry no food meaning in a diary line (English and Spanish). */
const STOP = new Set(
  (
    'a an the of with and or some my usual little bit few piece pieces plain regular normal homemade ' +
    'home made fresh small medium large big extra glass glasses cup cups bowl mug mugs serving portion ' +
    'x of in on for to from at had ate drank about approx approximately like just also then side ' +
    'handful handfuls punado ' +
    'de del la el los las un una unos unas con y o al en mi mis poco para ' +
    'vaso taza plato trozo racion porcion chunks chunk cubes cubed diced chopped bits'
  ).split(' '),
);
/** Words that keep their meaning even though they look like stop words in a food name. */
const KEEP_WITH = new Set(['oil', 'water', 'syrup', 'skin', 'salt', 'bone']);

/**
 * Diary words to food-table words (folded). Common household and Spanish names; the labeller's
 * own list (common practice, no source). A value may hold several words.
 */
export const DIARY_SYNONYMS: Record<string, string> = {
  // English household words
  toast: 'bread toasted',
  coke: 'cola',
  soda: 'carbonated',
  pop: 'carbonated',
  oj: 'orange juice',
  fries: 'french fried potato',
  chips: 'chips',
  porridge: 'oats cooked water',
  oatmeal: 'oats cooked water',
  cornflakes: 'corn flakes',
  yoghurt: 'yogurt',
  yogourt: 'yogurt',
  spaghetti: 'pasta cooked',
  macaroni: 'pasta cooked',
  hamburger: 'beef ground patty',
  burger: 'cheeseburger',
  steak: 'beef steak',
  'hot dog': 'frankfurter',
  hotdog: 'frankfurter',
  frank: 'frankfurter',
  frankfurter: 'frankfurter',
  ketchup: 'catsup',
  mayo: 'mayonnaise',
  mayonnaise: 'mayonnaise',
  doughnut: 'doughnuts',
  donut: 'doughnuts',
  nuggets: 'chicken tenders',
  nugget: 'chicken tenders',
  sausage: 'sausage',
  zucchini: 'zucchini',
  courgette: 'zucchini',
  aubergine: 'eggplant',
  prawns: 'shrimp',
  prawn: 'shrimp',
  crisps: 'potato chips',
  biscuit: 'cookies',
  biscuits: 'cookies',
  cookie: 'cookies',
  cookies: 'cookies',
  jam: 'jams preserves',
  jelly: 'jams preserves',
  cheeseburger: 'cheeseburger',
  pancake: 'pancakes',
  waffle: 'waffles',
  muffin: 'muffins',
  bagel: 'bagels',
  croissant: 'croissants',
  tortilla: 'tortillas',
  cracker: 'crackers',
  crackers: 'crackers',
  saltine: 'saltines',
  saltines: 'saltines',
  pretzel: 'pretzels',
  raisin: 'raisins',
  peanut: 'peanuts',
  almond: 'almonds',
  walnut: 'walnuts',
  cashew: 'cashew',
  cashews: 'cashew',
  chickpea: 'chickpeas',
  garbanzo: 'chickpeas',
  apricot: 'apricots',
  mango: 'mangos',
  plum: 'plums',
  peach: 'peaches',
  pear: 'pears',
  orange: 'oranges',
  grape: 'grapes',
  avocado: 'avocados',
  kiwi: 'kiwifruit',
  cantaloupe: 'cantaloupe',
  lentil: 'lentils',
  mushroom: 'mushrooms',
  onion: 'onions',
  tomato: 'tomatoes',
  potato: 'potatoes',
  carrot: 'carrots',
  pepper: 'peppers',
  pepperoni: 'pepperoni',
  coffee: 'coffee',
  tea: 'tea',
  beer: 'beer',
  wine: 'wine',
  'hot chocolate': 'cocoa mix prepared',
  cocoa: 'cocoa',
  'ice cream': 'ice creams',
  'soy milk': 'soymilk',
  soymilk: 'soymilk',
  'egg whites': 'egg white',
  'egg white': 'egg white',
  'sour cream': 'cream sour',
  'heavy cream': 'cream heavy',
  'cream cheese': 'cheese cream',
  'cottage cheese': 'cheese cottage',
  'american cheese': 'cheese american',
  'processed cheese': 'cheese process american',
  'process cheese': 'cheese process american',
  'cheese singles': 'cheese process american',
  'cheese single': 'cheese process american',
  'non-dairy creamer': 'cream substitute liquid',
  'non dairy creamer': 'cream substitute liquid',
  'nondairy creamer': 'cream substitute liquid',
  'coffee creamer': 'cream substitute liquid',
  creamer: 'cream substitute liquid',
  'swiss cheese': 'cheese swiss',
  'feta cheese': 'cheese feta',
  'cheddar cheese': 'cheese cheddar',
  cheddar: 'cheese cheddar',
  mozzarella: 'cheese mozzarella',
  parmesan: 'cheese parmesan',
  brie: 'cheese brie',
  feta: 'cheese feta',
  'lemon lime': 'lemon-lime',
  'diet coke': 'low calorie cola aspartame',
  'diet cola': 'low calorie cola aspartame',
  'whole wheat': 'whole-wheat',
  wholemeal: 'whole-wheat',
  'brown bread': 'bread whole-wheat',
  'corn on the cob': 'corn sweet cooked',
  'sweet corn': 'corn sweet',
  'green beans': 'beans snap green',
  'string beans': 'beans snap green',
  'baked beans': 'beans baked',
  'kidney beans': 'beans kidney',
  'black beans': 'beans black',
  'refried beans': 'refried beans',
  'french fries': 'french fried potato',
  'chicken noodle soup': 'soup chicken noodle',
  'tomato soup': 'soup tomato',
  'tomato sauce': 'sauce pasta',
  'soy sauce': 'soy sauce',
  'peanut butter': 'peanut butter',
  'olive oil': 'oil olive',
  'vegetable oil': 'oil soybean',
  'maple syrup': 'syrups maple',
  'potato chips': 'potato chips',
  'tortilla chips': 'tortilla chips',
  'granola bar': 'granola bars',
  'chocolate bar': 'candies milk chocolate',
  'chocolate milk': 'milk chocolate fluid',
  'fish sticks': 'fish sticks',
  'fish fingers': 'fish sticks',
  'apple juice': 'apple juice',
  'grape juice': 'grape juice',
  'orange juice': 'orange juice',
  'cranberry juice': 'cranberry juice',
  'lemon juice': 'lemon juice',
  'roast beef': 'beef roast',
  'corned beef': 'beef corned',
  'beef liver': 'beef liver',
  'ground beef': 'beef ground',
  'lamb chop': 'lamb loin',
  'pork chop': 'pork loin chops',
  'mashed potatoes': 'potatoes mashed',
  'baked potato': 'potatoes baked',
  'boiled potatoes': 'potatoes boiled',
  'sweet potato': 'sweet potato',
  'english muffin': 'english muffins',
  'pita bread': 'bread pita',
  'rye bread': 'bread rye',
  'skim milk': 'milk nonfat',
  'low fat': 'lowfat',
  'non fat': 'nonfat',
  'fat free': 'fat-free',
  'green tea': 'tea green',
  'black coffee': 'coffee brewed',
  'instant coffee': 'coffee instant',
  'red wine': 'wine red',
  'white wine': 'wine white',
  'root beer': 'root beer',
  'ginger ale': 'ginger ale',
  'canned tuna': 'tuna canned',
  'canned salmon': 'salmon canned',
  'canned peaches': 'peaches canned',
  'canned sweet corn': 'corn sweet canned',
  'iceberg lettuce': 'lettuce iceberg',
  'green pepper': 'peppers sweet green',
  'chicken breast': 'chicken breast',
  'chicken thigh': 'chicken thigh',
  'fried chicken': 'chicken fried',
  'scrambled eggs': 'egg scrambled',
  'boiled eggs': 'egg hard-boiled',
  'boiled egg': 'egg hard-boiled',
  'hard boiled egg': 'egg hard-boiled',
  'fried eggs': 'egg fried',
  'fried egg': 'egg fried',
  'poached egg': 'egg poached',
  'turkey slices': 'turkey breast sliced',
  'deli turkey': 'turkey breast sliced',
  'chocolate cake': 'cake chocolate',
  'apple pie': 'pie apple',
  'vanilla pudding': 'puddings vanilla',
  'sunflower seeds': 'sunflower seed kernels',
  'blueberry muffin': 'muffins blueberry',
  'macaroni and cheese': 'macaroni cheese',
  'mac and cheese': 'macaroni cheese',
  'cheese pizza': 'pizza cheese',
  water: 'water tap',
  sugar: 'sugars granulated',
  honey: 'honey',
  margarine: 'margarine',
  butter: 'butter',
  // Spanish
  pan: 'bread',
  'pan blanco': 'bread white',
  'pan integral': 'bread whole-wheat',
  tostada: 'bread toasted',
  leche: 'milk',
  'leche desnatada': 'milk nonfat',
  arroz: 'rice',
  'arroz blanco': 'rice white',
  huevo: 'egg',
  huevos: 'egg',
  'huevos fritos': 'egg fried',
  'huevo frito': 'egg fried',
  'huevo cocido': 'egg hard-boiled',
  frito: 'fried',
  fritos: 'fried',
  platano: 'bananas',
  banana: 'bananas',
  manzana: 'apples',
  apple: 'apples',
  naranja: 'oranges',
  pollo: 'chicken',
  pechuga: 'breast',
  asada: 'roasted',
  asado: 'roasted',
  queso: 'cheese',
  frijoles: 'beans',
  judias: 'beans',
  alubias: 'beans',
  negros: 'black',
  refresco: 'carbonated',
  cafe: 'coffee',
  'cafe solo': 'coffee brewed',
  'cafe con leche': 'coffee brewed',
  yogur: 'yogurt',
  natural: 'plain',
  jamon: 'ham sliced',
  lonchas: '',
  zumo: 'juice',
  jugo: 'juice',
  'zumo de naranja': 'orange juice',
  lentejas: 'lentils',
  cocidas: 'cooked',
  cocido: 'cooked',
  cocida: 'cooked',
  'patatas fritas': 'french fried potato',
  patatas: 'potatoes',
  papas: 'potatoes',
  mantequilla: 'butter',
  atun: 'tuna',
  'en lata': 'canned',
  lata: 'canned',
  cerveza: 'beer',
  vino: 'wine',
  galletas: 'cookies',
  galleta: 'cookies',
  pescado: 'fish',
  carne: 'beef',
  cerdo: 'pork',
  tomate: 'tomatoes',
  lechuga: 'lettuce',
  zanahoria: 'carrots',
  cebolla: 'onions',
  azucar: 'sugars granulated',
  agua: 'water tap',
  aceite: 'oil',
  'aceite de oliva': 'oil olive',
  blanco: 'white',
  blanca: 'white',
  white: 'white',
  'chispas de chocolate': 'chocolate chip',
  'con chispas de chocolate': 'chocolate chip',
};

/** State words a food name can carry; a diary that names none gets the usual state. */
const STATE_WORDS = new Set([
  'raw',
  'cooked',
  'boiled',
  'fried',
  'roasted',
  'baked',
  'broiled',
  'grilled',
  'stewed',
  'steamed',
  'canned',
  'frozen',
  'dried',
  'dry',
  'toasted',
  'scrambled',
  'poached',
  'smoked',
  'microwaved',
]);
/** Diary words that mean a food-table state (grilled meat is listed as broiled or roasted). */
const STATE_ALIASES: Record<string, string[]> = {
  grilled: ['grilled', 'broiled', 'roasted'],
  roast: ['roasted'],
  baked: ['baked', 'roasted', 'dry heat'],
  boiled: ['boiled', 'moist heat', 'cooked'],
  cooked: ['cooked', 'boiled', 'roasted', 'baked', 'broiled', 'moist heat', 'dry heat', 'prepared'],
  tinned: ['canned'],
};

/** Groups whose foods a diary usually means cooked (meat, fish, grains, legumes). */
const USUALLY_COOKED_GROUPS = new Set([
  'Poultry Products',
  'Beef Products',
  'Pork Products',
  'Lamb, Veal, and Game Products',
  'Finfish and Shellfish Products',
  'Legumes and Legume Products',
  'Cereal Grains and Pasta',
]);
/** Vegetables usually eaten cooked when the diary does not say (labeller's judgement). */
const USUALLY_COOKED_WORDS = new Set(
  [
    'potatoes',
    'potato',
    'broccoli',
    'cauliflower',
    'beans',
    'peas',
    'corn',
    'lentils',
    'chickpeas',
    'rice',
    'pasta',
    'noodles',
    'spinach',
    'squash',
  ].map((w) => stem(w)),
);

/** Name words that mark a special rather than the plain generic food. */
const SPECIAL_WORDS = new Set([
  'babyfood',
  'infant',
  'formula',
  'toddler',
  'school',
  'lunch',
  'commodity',
  'usda',
  'industrial',
  'restaurant',
  'imitation',
  'substitute',
  'mix',
  'powder',
  'dehydrated',
  'concentrate',
  'low',
  'reduced',
  'free',
  'unenriched',
  'imported',
  'unheated',
  'unprepared',
  'purchased',
  'glucose',
  'stabilized',
  'unsalted',
  'evaporated',
  'meatless',
  'goat',
  'sheep',
  'buffalo',
  'human',
  'vegan',
  'instant',
  'nonfat',
  'lowfat',
  'skim',
  'part-skim',
  'fat-free',
  'whole-wheat',
  'whole-grain',
  'multigrain',
  'sodium',
  'lite',
  'light',
  'diet',
  'organic',
  'vegetarian',
  // Flavoured and textured variants: the plain one unless the diary names it.
  'chunk',
  'chocolate',
  'vanilla',
  'strawberry',
]);

/**
 * Name words that, right after the diary's food word, make a different product from it ("cashew
 * butter" for cashews, "grape juice drink" for grape juice).
 */
const PRODUCT_NOUNS = new Set(
  'butter juice drink oil flour sauce soup salad dressing cakes crumbs crust bar bars spread shells'
    .split(' ')
    .map((w) => stem(w)),
);

/** Forms a food is made into ("Snacks, popcorn, cakes"): a different product when not asked for. */
const FORM_NOUNS = new Set(['cakes', 'crumbs', 'crust', 'bar', 'bars', 'shells']);

/** Sausages and luncheon meats come in poultry versions; the diary means the usual red-meat one. */
const POULTRY_VARIANTS = new Set(['turkey', 'chicken']);

/** Words after "with" that do not add another food. */
const WITH_NEUTRAL = new Set([
  'added',
  'salt',
  'skin',
  'bone',
  'peel',
  'seeds',
  'vitamin',
  'calcium',
  'ca',
  'water',
  'oil',
  'or',
  'and',
  'low',
  'reduced',
  'sodium',
  'no',
  'tap',
  'equal',
]);

/** Describing words of food-table names that do not make a food a different variety. */
const FILLER = new Set(
  (
    'with and or added vitamin vitamins per ounce grams includes such as type types fluid enriched ' +
    'commercially prepared commercial regular ready-to-serve ready-to-eat drained solids liquids ' +
    'without salt all varieties bottled made from in water meat only cooked boiled flesh equal volume ' +
    'whole ca prop chilled'
  ).split(' '),
);

/** Forms that are not food as eaten (diaries record what was eaten), unless also "prepared". */
const NOT_AS_EATEN =
  /\b(condensed|evaporated|dry mix|powder|mix|concentrate|undiluted|dehydrated|unprepared|as purchased|uncooked|unheated|dry(?![ -](heat|roasted)))\b/;
const DECAF = /\b(without caffeine|decaffeinated|caffeine free|no caffeine)\b/;

/** Simple English plural stem that still prefix-matches both forms ("berries" -> "berr"). */
export function stem(word: string): string {
  let s = stemCache.get(word);
  if (s === undefined) {
    s = stemUncached(word);
    if (stemCache.size > 50_000) stemCache.clear();
    stemCache.set(word, s);
  }
  return s;
}

function stemUncached(word: string): string {
  if (word.length <= 3) return word;
  if (word.endsWith('ies')) return word.slice(0, -3);
  if (word.endsWith('oes')) return word.slice(0, -2);
  if (/(ss|us|is)$/.test(word)) return word;
  if (/(ches|shes|xes|sses)$/.test(word)) return word.slice(0, -2);
  if (word.endsWith('s')) return word.slice(0, -1);
  return word;
}

function words(text: string): string[] {
  const folded = foldText(text);
  // In ASCII the letters and digits are exactly a-z and 0-9 once folded (lower-cased).
  return (
    (isAscii(folded) ? folded.match(/[a-z0-9%'-]+/g) : folded.match(/[\p{L}\p{N}%'-]+/gu)) ?? []
  );
}

/** Applies the phrase and word synonyms, longest phrase first. */
function mapSynonyms(tokens: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < tokens.length;) {
    let done = false;
    for (let n = Math.min(4, tokens.length - i); n >= 1; n--) {
      const phrase = tokens.slice(i, i + n).join(' ');
      const mapped = DIARY_SYNONYMS[phrase];
      if (mapped !== undefined && (n > 1 || !STOP.has(phrase))) {
        out.push(...mapped.split(' ').filter(Boolean));
        i += n;
        done = true;
        break;
      }
    }
    if (!done) {
      out.push(tokens[i] as string);
      i++;
    }
  }
  return out;
}

/** Prepares a diary phrase (quantity already taken out) for search and scoring. */
export function prepareQuery(text: string): PreparedQuery {
  const raw = words(text).map((w) => w.replace(/^'+|'+$/g, ''));
  // Phrases first ("galletas con chispas de chocolate", "cafe con leche"), then "with" joins a
  // second food ("toast with margarine"): the head food is before it.
  const all = mapSynonyms(raw.filter((w) => !/^\d+([.,]\d+)?$/.test(w) || /%$/.test(w)));
  const withAt = all.findIndex(
    (w, i) => i > 0 && (w === 'with' || w === 'con') && !KEEP_WITH.has(all[i + 1] ?? ''),
  );
  const mapped = withAt > 0 ? all.slice(0, withAt) : all;
  const content = mapped.filter((w) => w.length > 0 && (!STOP.has(w) || KEEP_WITH.has(w)));
  const states = new Set<string>();
  for (const w of content) {
    if (STATE_WORDS.has(w) || STATE_ALIASES[w]) states.add(w);
  }
  const stemmed = [...new Set(content.map(stem))];
  const head = stemmed.filter((w) => !STATE_WORDS.has(w) && !STATE_ALIASES[w]);
  return {
    text,
    words: stemmed,
    headWords: head.length > 0 ? head : stemmed,
    states,
    rawWords: new Set(raw),
    folded: foldText(text),
    dropped: withAt > 0 ? all.slice(withAt + 1) : [],
  };
}

/** The search texts to try, best first: all words, then without state words, then each head pair and word. */
export function searchTexts(q: PreparedQuery): string[] {
  const out: string[] = [];
  const add = (ws: string[]) => {
    const t = ws.join(' ').trim();
    if (t && !out.includes(t)) out.push(t);
  };
  add(q.words);
  add(q.headWords);
  const h = q.headWords;
  if (h.length > 2) for (let i = 0; i < h.length; i++) add(h.filter((_, j) => j !== i));
  if (h.length > 1) for (const w of h) if (w.length >= 3) add([w]);
  return out.slice(0, 8);
}

/**
 * The other spellings of a search text that food-table names use ("lowfat" is also written
 * "low fat"), searched together with it.
 */
export function spellingVariants(text: string): string[] {
  const split = text
    .replace(/\blowfat\b/g, 'low fat')
    .replace(/\bnonfat\b/g, 'non fat')
    .replace(/\bfat-free\b/g, 'fat free');
  return split === text ? [] : [split];
}

/** Spelling variants of food-table names brought to one word ("low fat" = "lowfat"). */
function normaliseName(folded: string): string {
  if (!folded.includes('fat')) return folded; // every rewrite below is about "fat"
  return folded
    .replace(/\blow[ -]fat\b/g, 'lowfat')
    .replace(/\bnon[ -]fat\b/g, 'nonfat')
    .replace(/\bfat[ -]free\b/g, 'fat-free');
}

function nameWords(name: string): string[] {
  const ws = words(normaliseName(foldText(name)));
  return name.includes("'") ? ws.map((w) => w.replace(/^'+|'+$/g, '')) : ws;
}

/**
 * Brand-like phrases of a name: runs of words written in capitals ("TACO BELL", "KELLOGG'S"),
 * outside brackets ("(includes USDA commodity)" names the table's source, not a brand).
 */
function brandPhrases(name: string): string[][] {
  return (
    name.replace(/\([^)]*\)/g, ' ').match(/\b[A-Z][A-Z'&.-]+(?:\s+[A-Z][A-Z'&.-]+)*\b/g) ?? []
  )
    .filter((p) => p.replace(/[^A-Z]/g, '').length >= 3)
    .map((p) => p.split(/\s+/).map((t) => foldText(t).replace(/'s$/, '').replace(/'/g, '')));
}

const COOKED_FAMILY =
  /\b(cooked|boiled|roasted|baked|broiled|grilled|stewed|steamed|fried|braised|pan-fried|heat|toasted|scrambled|poached|microwaved|prepared)\b/;

/** 1 when a name word is the query word (or its plural), 0.5 for a longer word it starts, else 0. */
function wordMatch(q: string, nameWord: string): number {
  if (nameWord === q) return 1;
  const s = stem(nameWord);
  if (s === q || s === stem(q)) return 1;
  if (q.length >= 4 && nameWord.startsWith(q)) return 0.5;
  return 0;
}

function matchesWord(q: string, nameWord: string): boolean {
  return wordMatch(q, nameWord) === 1;
}

/** Leading category words of food-table names ("Beverages, tea, ..."): the head is what follows. */
const CATEGORY_HEADS = new Set([
  'beverages',
  'beverage',
  'alcoholic beverage',
  'alcoholic beverages',
  'carbonated beverage',
  'snacks',
  'candies',
  'cereals',
  'cereals ready-to-eat',
  'fast foods',
  'nuts',
  'seeds',
  'fish',
  'crustaceans',
  'mollusks',
  'salad dressing',
  'sauce',
  'soup',
  'spices',
  'sweeteners',
]);

/** Generic-average wording in food-table names: the prototype of a food, not a special one. */
const PROTOTYPE =
  /\b(all types|all commercial varieties|year round average|mixed species|regular|plain|commercially prepared|commercial|all grades|all varieties|all flavors|salad or cooking|unspecified fat content)\b/g;

/** Words of a brand owner's name that are not the brand ("Kellogg Company"). */
const COMPANY_WORDS = new Set(
  'inc co company corp corporation llc ltd lp the and of usa international'.split(' '),
);

/** Groups of special foods a diary rarely means unless it names them. */
const SPECIAL_GROUPS = new Set([
  'American Indian/Alaska Native Foods',
  'Baby Foods',
  'Restaurant Foods',
]);

interface NameFeatures {
  folded: string;
  nw: string[];
  bracketed: Set<string>;
  segments: string[][];
  /** The first segment is a category word ("Beverages") rather than the food. */
  categoryFirst: boolean;
  measureWords: string[];
  brandPhrases: string[][];
  brandWords: Set<string>;
  prototypes: string[];
  /** Name words outside brackets. */
  outsideBrackets: string[];
  /** Tests on the folded name alone, made once per name (the scorer asks them per query). */
  has: NameTests;
  /** Words right after "with" ("with rice cereal"). */
  withWords: string[];
  /** Words on either side of "or" ("red or green"). */
  orWords: Set<string>;
  /** Words of the prototypes ("all types", "regular"). */
  protoWords: Set<string>;
  /** State words of the name (raw, canned, cooked...). */
  nameStates: string[];
}

/** The name-only tests scoreFood makes, by name. */
interface NameTests {
  meatOnly: boolean;
  separableLeanOnly: boolean;
  fromConcentrate: boolean;
  drained: boolean;
  sweetened: boolean;
  withSalt: boolean;
  cooked: boolean;
  flavour: boolean;
  withoutAddedVitamin: boolean;
  withAddedAscorbic: boolean;
  saltOnlyWithout: boolean;
  without: boolean;
  fastFoodHead: boolean;
  seedsHead: boolean;
  roasted: boolean;
  dryRoasted: boolean;
  oilRoasted: boolean;
  withoutSalt: boolean;
  preparedOrReady: boolean;
  friedOrBattered: boolean;
  doubleOrJumbo: boolean;
  notAsEaten: boolean;
  decaf: boolean;
}

function nameTests(folded: string): NameTests {
  // Cheap substring checks first: most names have no "with", "roast" or "fat" words at all.
  const withs = folded.includes('with');
  const withoutText = withs ? folded.replace(/\bwithout added ascorbic acid\b/g, '') : folded;
  const roast = folded.includes('roast');
  return {
    meatOnly: folded.includes('meat only') && /\bmeat only\b/.test(folded),
    separableLeanOnly:
      folded.includes('separable lean only') && /\bseparable lean only\b/.test(folded),
    fromConcentrate: folded.includes('from concentrate') && /\bfrom concentrate\b/.test(folded),
    drained: folded.includes('drained') && /\bdrained\b/.test(folded),
    sweetened: folded.includes('sweetened') && /\b(?<!un)sweetened\b/.test(folded),
    withSalt: withs && /\bwith (added )?salt\b/.test(folded),
    cooked: COOKED_FAMILY.test(folded),
    flavour: folded.includes('flavo') && /flavou?r/.test(folded),
    withoutAddedVitamin: withs && folded.includes('without added vitamin'),
    withAddedAscorbic: withs && /\bwith added ascorbic acid\b/.test(folded),
    // Vitamin C is an optional addition to juices: "without added ascorbic acid" is the plain juice.
    saltOnlyWithout:
      withs &&
      /\bwithout (added )?salt\b/.test(withoutText) &&
      !/\bwithout (?!(added )?salt\b)/.test(withoutText),
    without: withs && /\bwithout\b/.test(withoutText),
    fastFoodHead: /^(fast foods|restaurant|school lunch)/.test(folded),
    seedsHead: folded.startsWith('seeds'),
    roasted: roast && folded.includes('roasted'),
    dryRoasted: roast && /\bdry[ -]roasted\b/.test(folded),
    oilRoasted: roast && /\boil[ -]roasted\b/.test(folded),
    withoutSalt: withs && /\bwithout (added )?salt\b/.test(folded),
    preparedOrReady: /prepared|ready-to/.test(folded),
    friedOrBattered: /\b(fried|breaded|batter|battered)\b/.test(folded),
    doubleOrJumbo: /\b(double|triple|jumbo)\b/.test(folded),
    notAsEaten:
      NOT_AS_EATEN.test(folded.replace(/\bfrom concentrate\b/g, '')) &&
      !/prepared|cooked/.test(folded),
    decaf: DECAF.test(folded),
  };
}

/** Query tests by pattern: a query is scored against dozens of foods, each asking the same. */
const saidCache = new WeakMap<PreparedQuery, Map<string, boolean>>();

function saidIn(q: PreparedQuery, re: RegExp): boolean {
  let m = saidCache.get(q);
  if (!m) {
    m = new Map();
    saidCache.set(q, m);
  }
  let v = m.get(re.source);
  if (v === undefined) {
    v = re.test(q.folded);
    m.set(re.source, v);
  }
  return v;
}

/**
 * Name features per food object. Audits share their food objects (loaded once per table state),
 * so a food's features are worked out once however many entries and audits find it.
 */
const featuresByObject = new WeakMap<object, NameFeatures>();

function features(food: ScorableFood): NameFeatures {
  let f = featuresByObject.get(food);
  if (!f) {
    const folded = foldText(food.name);
    const rawSegments = food.name.split(/[,;]/);
    const phrases = brandPhrases(food.name);
    const nw = nameWords(food.name);
    const prototypes = folded.match(PROTOTYPE) ?? [];
    f = {
      folded,
      nw,
      // Words in brackets only clarify ("(includes soft bread crumbs)"): they count as filler.
      bracketed: new Set(nameWords((folded.match(/\([^)]*\)/g) ?? []).join(' '))),
      segments: rawSegments.map((x) => nameWords(x)),
      categoryFirst:
        rawSegments.length > 1 && CATEGORY_HEADS.has(foldText(rawSegments[0] ?? '').trim()),
      measureWords: nameWords((food.portions ?? []).map((p) => p.description).join(' ')),
      brandPhrases: phrases,
      brandWords: new Set(phrases.flat()),
      prototypes,
      outsideBrackets: nameWords(folded.replace(/\([^)]*\)/g, ' ')),
      has: nameTests(folded),
      withWords: [...folded.matchAll(/\bwith ([a-z]+)/g)].map((m) => m[1] as string),
      orWords: new Set(nw.filter((_, i) => nw[i - 1] === 'or' || nw[i + 1] === 'or')),
      protoWords: new Set(prototypes.flatMap((p) => p.split(' '))),
      nameStates: nw.filter((n) => STATE_WORDS.has(n)),
    };
    featuresByObject.set(food, f);
  }
  return f;
}

/** The diary said this word (or its plural or singular). */
function wordNamed(q: PreparedQuery, t: string): boolean {
  return q.rawWords.has(t) || q.rawWords.has(`${t}s`) || q.rawWords.has(t.replace(/s$/, ''));
}

/** Works out a food's name features ahead of its first scoring (start-up preparation). */
export function prepareForScoring(food: ScorableFood): void {
  features(food);
}

/**
 * Scores one food for a prepared query (higher is better): coverage of the query words dominates;
 * then the head of the name, fewer unrelated words, the plain generic food, the usual state.
 */
export function scoreFood(q: PreparedQuery, food: ScorableFood): ScoredFood {
  const fx = features(food);
  const { folded, nw, bracketed, measureWords, brandWords, has } = fx;
  let segments = fx.segments;
  // "Beverages, tea, black" has its head after the category word.
  if (fx.categoryFirst) {
    const category = segments[0] ?? [];
    if (!q.words.some((w) => category.some((n) => matchesWord(w, n)))) segments = segments.slice(1);
  }
  const first = segments[0] ?? [];
  let credit = 0;
  for (const w of q.words) {
    let c = 0;
    let plain = false;
    for (const n of nw) {
      const m = wordMatch(w, n);
      if (m > c) c = m;
      if (m === 1 && !brandWords.has(n)) plain = true;
    }
    // A diary word found only in a brand ("taco" in "TACO BELL, Nachos") or only in brackets
    // ("Chicken, skin (drumsticks and thighs)") counts half.
    if (c === 1 && !plain) c = 0.5;
    if (c === 1 && !fx.outsideBrackets.some((n) => wordMatch(w, n) === 1)) c = 0.5;
    const aliases = STATE_ALIASES[w];
    if (c < 1 && aliases && aliases.some((a) => folded.includes(a))) c = 1;
    // A word of the food's own measures ("fillet", "thigh") counts half.
    if (c < 0.5 && measureWords.some((n) => wordMatch(w, n) === 1)) c = 0.5;
    credit += c;
  }
  const coverage = q.words.length === 0 ? 0 : credit / q.words.length;
  let score = coverage * 100;
  // The diary's own word spelled exactly as in the name ("almonds" in "Nuts, almonds").
  for (const r of q.rawWords) if (r.length > 2 && nw.includes(r)) score += 3;
  if (food.group !== null && SPECIAL_GROUPS.has(food.group)) score -= 12;
  const prototypes = fx.prototypes;
  score += Math.min(2, prototypes.length) * 2;
  // The name's head (before the first comma) holds a query word, and is covered by the query.
  const headHits = first.filter((n) => q.words.some((w) => matchesWord(w, n))).length;
  if (headHits > 0) score += 12;
  if (first.length > 0 && headHits === first.length) score += 6;
  // The earliest segments should carry the query words: reward word position.
  let positionBonus = 0;
  for (const w of q.words) {
    const seg = segments.findIndex((s) => s.some((n) => matchesWord(w, n)));
    if (seg >= 0) positionBonus += Math.max(0, 4 - seg);
  }
  score += positionBonus;
  // Unrelated words: a plainer food has fewer.
  const protoWords = fx.protoWords;
  const extra = nw.filter(
    (n) => !q.words.some((w) => matchesWord(w, n)) && n.length > 1 && !protoWords.has(n),
  );
  const fromConcentrate = has.fromConcentrate;
  // "2% milk": the fat words of "reduced fat, 2% milkfat" say what the diary said.
  const fatStated = q.words.some((w) => /^\d+(\.\d+)?%$/.test(w));
  // Fried chicken is eaten with its skin and batter unless the diary says otherwise.
  if (
    food.group === 'Poultry Products' &&
    has.meatOnly &&
    saidIn(q, /fri|frit/) &&
    !saidIn(q, /skinless|meat only|no skin|without skin|sin piel/)
  )
    score -= 4;
  // Red meat cuts are eaten as served (lean and fat) unless the diary says lean.
  if (
    has.separableLeanOnly &&
    !saidIn(q, /\blean\b/) &&
    (food.group === 'Beef Products' ||
      food.group === 'Pork Products' ||
      food.group === 'Lamb, Veal, and Game Products')
  )
    score -= 2;
  // "red or green", "canned or bottled": an entry naming alternatives covers both.
  const orWords = fx.orWords;
  for (const n of extra) {
    const filler =
      orWords.has(n) ||
      FILLER.has(n) ||
      bracketed.has(n) ||
      /^\d/.test(n) ||
      (n === 'concentrate' && fromConcentrate);
    score -= filler ? 0.3 : 1.6;
    // Special products unless asked for; "(includes USDA commodity)" only widens the average.
    // "plain or vegetarian": the alternative named after "plain" is the plain food too.
    const plainAlternative = folded.includes(`plain or ${n}`);
    const fatWord = fatStated && /^(reduced|low|lowfat|nonfat|fat|milkfat)$/.test(n);
    if (
      SPECIAL_WORDS.has(n) &&
      !bracketed.has(n) &&
      !fatWord &&
      !plainAlternative &&
      !(n === 'concentrate' && fromConcentrate)
    )
      score -= 4;
    if (POULTRY_VARIANTS.has(n) && food.group === 'Sausages and Luncheon Meats') score -= 4;
  }
  // "cashew butter", "grape juice drink", "corn flake crust": a product made from the diary's food.
  for (const seg of segments) {
    for (let i = 1; i < seg.length; i++) {
      const n = seg[i] as string;
      if (!PRODUCT_NOUNS.has(stem(n)) || bracketed.has(n) || q.words.some((w) => matchesWord(w, n)))
        continue;
      if (q.words.some((w) => matchesWord(w, seg[i - 1] as string))) score -= 5;
    }
  }
  for (let i = 1; i < segments.length; i++) {
    const seg = segments[i] as string[];
    const before = segments[i - 1] as string[];
    if (
      seg.length === 1 &&
      FORM_NOUNS.has(seg[0] as string) &&
      !q.rawWords.has(seg[0] as string) &&
      before.some((n) => q.words.some((w) => matchesWord(w, n)))
    )
      score -= 5;
  }
  // "peaches in syrup": the packing liquid is eaten too, so not the drained solids.
  if (has.drained && saidIn(q, /\b(in|en) (heavy |light )?(syrup|juice|almibar|jugo|zumo)\b/))
    score -= 5;
  // Fruit as it comes: no sugar or salt added unless the diary says so.
  if (food.group === 'Fruits and Fruit Juices') {
    if (has.sweetened && !saidIn(q, /sweet|sugar|syrup|azucar/)) score -= 2;
    if (has.withSalt && !saidIn(q, /salt|sal\b/)) score -= 3;
  }
  const cookedInName = has.cooked;
  const usuallyRoasted =
    (food.group === 'Nut and Seed Products' && !has.seedsHead) ||
    (q.headWords.includes('peanut') && !q.headWords.includes('butter'));
  const cookedUsualFood =
    !usuallyRoasted &&
    ((food.group !== null && USUALLY_COOKED_GROUPS.has(food.group)) ||
      q.headWords.some((w) => USUALLY_COOKED_WORDS.has(w)));
  // "with rice cereal", "with vegetables": another food added, unless the diary says so.
  for (const w of fx.withWords) {
    if (!WITH_NEUTRAL.has(w) && !q.words.some((x) => wordMatch(x, w) === 1)) score -= 3;
  }

  if (has.flavour && !saidIn(q, /flavou?r/)) score -= 4;
  if (has.withoutAddedVitamin) score -= 3;
  // "without X" marks the special variant ("Butter, without salt"), except salt in cooked foods below
  // (has.without ignores "without added ascorbic acid": see nameTests).
  if (has.withAddedAscorbic && !saidIn(q, /vitamin c|ascorbic/)) score -= 1.5;
  const saltOnly = has.saltOnlyWithout;
  if (
    has.without &&
    !saidIn(q, /without|sin\b|unsalted|no salt/) &&
    !(saltOnly && cookedInName && (q.states.size > 0 || cookedUsualFood))
  )
    score -= 1.5;
  // Brands: a plain generic food first unless a brand is named (all words of it).
  const phrases = [...fx.brandPhrases];
  // The whole owner name ("Burger King"), without company words, must be named.
  const owner = food.brandOwner ? words(food.brandOwner).filter((w) => !COMPANY_WORDS.has(w)) : [];
  if (owner.length > 0) phrases.push(owner);
  const brandNamed = phrases.some((ph) => ph.every((t) => wordNamed(q, t)));
  if (brandNamed) score += 15;
  else if (food.kind === 'branded' || phrases.length > 0) score -= 12;
  if (has.fastFoodHead && !brandNamed) score -= 2;
  // State: what the diary said, else the usual state for the kind of food.
  const nameStates = fx.nameStates;
  let cookedExpected = q.states.size === 0 && cookedUsualFood;
  if (q.states.size > 0) {
    let cookedAsked = false;
    for (const st of q.states) {
      const wanted = STATE_ALIASES[st] ?? [st];
      if (wanted.some((x) => folded.includes(x))) score += 8;
      if (st !== 'raw' && st !== 'canned' && st !== 'frozen' && st !== 'dried' && st !== 'dry')
        cookedAsked = true;
    }
    if (cookedAsked && nameStates.includes('raw')) score -= 8;
    cookedExpected = cookedAsked;
  } else {
    if (usuallyRoasted) {
      // Nuts and peanuts are eaten roasted, not boiled or raw.
      if (has.roasted) score += 6;
      else if (cookedInName) score -= 6;
      // Dry roasted and salted is the usual bag; oil roasted and unsalted are the variants.
      if (has.dryRoasted) score += 2;
      if (has.oilRoasted) score -= 1.5;
      if (has.withoutSalt && !saidIn(q, /salt/)) score -= 2;
      if (nameStates.includes('raw')) score -= 3;
    } else if (cookedUsualFood) {
      if (cookedInName) score += 6;
      if (nameStates.includes('raw')) score -= 6;
    } else {
      // A "raw" juice is freshly squeezed; the usual one is bought.
      if (nameStates.includes('raw')) score += q.headWords.includes('juice') ? -3 : 3;
      if (cookedInName && !has.preparedOrReady) score -= 3;
    }
    for (const st of ['canned', 'frozen', 'dried', 'smoked', 'microwaved'])
      if (nameStates.includes(st)) score -= 3;
  }
  if (has.friedOrBattered && !saidIn(q, /fri|bread|batter|frit/)) score -= 3;
  if (has.doubleOrJumbo && !saidIn(q, /double|triple|jumbo/)) score -= 4;
  if (has.notAsEaten && !saidIn(q, NOT_AS_EATEN)) score -= 5;
  if (has.decaf && !saidIn(q, /decaf|caffeine/)) score -= 3;
  // Cooked vegetables and legumes are tabled without salt; "with salt" entries are derived from them.
  if (cookedExpected && cookedInName && has.withoutSalt && !saidIn(q, /\bsalt/)) score += 3;
  // Foods with more household measures in the table are commonly eaten ones.
  score += Math.min(8, food.portions?.length ?? 0) * PORTION_WEIGHT;
  return { food, score, coverage };
}

const PORTION_WEIGHT = 2.5;

/** Ranks foods for a query, best first (ties by shorter name, then id). */
export function rankFoods<F extends ScorableFood>(
  q: PreparedQuery,
  foods: readonly F[],
): ScoredFood<F>[] {
  return sortScored(foods.map((f) => scoreFood(q, f) as ScoredFood<F>));
}

/** Best first: higher score, then the shorter name, then the lower id (sorts in place). */
export function sortScored<F extends ScorableFood>(scored: ScoredFood<F>[]): ScoredFood<F>[] {
  return scored.sort(
    (a, b) => b.score - a.score || a.food.name.length - b.food.name.length || a.food.id - b.food.id,
  );
}

/**
 * Confidence of the best match, 0-1: its word coverage, lowered when the runner-up scores
 * close to it (a near tie is a guess between two foods).
 */
export function matchConfidence(best: ScoredFood, runnerUp: ScoredFood | undefined): number {
  const margin = runnerUp ? best.score - runnerUp.score : 20;
  const separation = Math.min(1, Math.max(0, margin) / 20);
  const c = best.coverage * (0.55 + 0.45 * separation);
  return Math.round(c * 100) / 100;
}

/** Below this coverage the best food is not offered as a match: the entry is unmatched. */
export const MIN_MATCH_COVERAGE = 0.5;

/** The key a remembered match is stored under: folded words of the food text, in order. */
export function memoryKey(foodText: string): string {
  return words(foodText).join(' ').slice(0, 200);
}
