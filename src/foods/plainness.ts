/**
 * Pure: how far a food name is from the plain, everyday food a short query means (lower is
 * plainer). "egg whole" means an egg as eaten, not dried egg; "coffee" means brewed coffee, not
 * coffeecake; "lentils" means cooked lentils; "orange" means the fruit of all commercial
 * varieties, not the peel. Every rule reads the name only (the product's own ranking rules,
 * common practice, no source), and a word the query names is never held against a food.
 */
import { nameWords } from './text.js';

/** Forms not eaten as they are, unless the query names them. */
const NOT_READY = new Set(
  'dried dry powder powdered dehydrated mix concentrate frozen unprepared condensed evaporated flour uncooked purchased'.split(
    ' ',
  ),
);
/** Variants of a food, unless the query names them. */
const VARIANT = new Set(
  (
    'low lowfat reduced free fat-free nonfat non lite light diet imitation substitute spread ' +
    'product food sodium unsalted babyfood infant toddler meatless vegetarian glutinous sprouted ' +
    'peel chocolate strawberry fruit flavored sweetened homemade recipe tenders breaded canned ' +
    'grass-fed smoked refrigerated fresh-refrigerated whole-wheat whole-grain unenriched'
  ).split(' '),
);
/** Wording of the tables for the generic average of a food: the one a bare query means. */
const PROTOTYPE =
  /\b(all commercial varieties|year round average|commercially prepared|mixed species|all types|regular|plain|tap water)\b/;
/** Heads of foods usually eaten cooked: their raw or dry forms are not what a bare query means. */
const USUALLY_COOKED = new Set(
  'rice pasta spaghetti noodles lentils beans chickpeas beef pork chicken turkey lamb bacon salmon fish shrimp oats'.split(
    ' ',
  ),
);
const COOKED =
  /\b(cooked|boiled|roasted|baked|broiled|grilled|stewed|fried|heated|brewed|pan-fried)\b/;
/** Regional or restaurant foods a bare query rarely means. */
const SPECIAL_SOURCE =
  /\((alaska native|hopi|navajo|apache|shoshone)\)|^fast food|restaurant|'s\b/i;

/** The query's words found as whole words (or plural/singular) of the name, not only as prefixes. */
function wholeWordMisses(words: readonly string[], have: readonly string[]): number {
  let misses = 0;
  words.forEach((w, i) => {
    const last = i === words.length - 1;
    const whole = have.some((n) => n === w || n === `${w}s` || n === `${w}es` || `${n}s` === w);
    // The last word may still be being typed: a prefix of it is no miss while it is short.
    if (!whole && !(last && w.length < 4)) misses++;
  });
  return misses;
}

/** What the penalty reads from a name alone, worked out once per name (names come back). */
interface NameFacts {
  have: readonly string[];
  notReady: readonly string[];
  variants: readonly string[];
  prototype: boolean;
  special: boolean;
  caps: readonly string[];
  raw: boolean;
  cooked: boolean;
}
const FACTS_MAX = 50_000;
const factsByName = new Map<string, NameFacts>();

function nameFacts(name: string): NameFacts {
  let f = factsByName.get(name);
  if (f === undefined) {
    const have = nameWords(name);
    // Words in brackets only explain ("(fat free or skim)"): they make no variant.
    const outside = name.includes('(') ? nameWords(name.replace(/\([^)]*\)/g, ' ')) : have;
    const lower = name.toLowerCase();
    f = {
      have,
      notReady: [...new Set(outside.filter((n) => NOT_READY.has(n)))],
      variants: outside.filter((n) => VARIANT.has(n)),
      prototype: PROTOTYPE.test(lower),
      special: SPECIAL_SOURCE.test(name),
      caps: (name.match(/\b[A-Z]{3,}[A-Z']*\b/g) ?? []).map((c) =>
        c.toLowerCase().replace(/'s$/, ''),
      ),
      raw: have.includes('raw'),
      cooked: COOKED.test(lower),
    };
    if (factsByName.size >= FACTS_MAX) factsByName.clear();
    factsByName.set(name, f);
  }
  return f;
}

/** The plainness penalty of a name for a query's words (0 = the plain everyday food). */
export function plainnessPenalty(words: readonly string[], name: string): number {
  const f = nameFacts(name);
  const named = (n: string) => words.some((w) => n.startsWith(w));
  let p = 3 * wholeWordMisses(words, f.have);
  // Each form word counts: "frozen, unprepared" is further from the plate than "frozen".
  for (const n of f.notReady) if (!named(n)) p += 2;
  if (f.variants.some((n) => !named(n))) p += 2;
  if (f.prototype) p -= 1;
  if (f.special) p += 3;
  // Brand-like words in capitals ("SPAGHETTIOS") unless the query names them.
  if (f.caps.some((c) => !named(c))) p += 2;
  const head = words[0] ?? '';
  const cookedHead = USUALLY_COOKED.has(head) || USUALLY_COOKED.has(head.replace(/e?s$/, ''));
  if (cookedHead) {
    if (f.raw && !named('raw')) p += 2;
    if (f.cooked) p -= 1;
  } else if (f.raw) p -= 1;
  return p;
}

/** Leading category words of table names: the food is the segment after them. */
const CATEGORY_HEADS = new Set([
  'beverages',
  'alcoholic beverage',
  'alcoholic beverages',
  'fish',
  'crustaceans',
  'mollusks',
  'snacks',
  'candies',
  'cereals',
  'cereals ready-to-eat',
  'nuts',
  'seeds',
  'spices',
  'sweeteners',
  'pork, cured',
]);

/** The name after its category words ("Beverages, coffee, brewed" -> "coffee, brewed"), or null. */
export function afterCategory(name: string): string | null {
  if (!name.includes(',')) return null;
  let hit = categoryRest.get(name);
  if (hit === undefined) {
    hit = null;
    const segments = name.split(',').map((s) => s.trim().toLowerCase());
    for (const n of [2, 1]) {
      if (segments.length > n && CATEGORY_HEADS.has(segments.slice(0, n).join(', '))) {
        hit = segments.slice(n).join(', ');
        break;
      }
    }
    if (categoryRest.size >= FACTS_MAX) categoryRest.clear();
    categoryRest.set(name, hit);
  }
  return hit;
}
const categoryRest = new Map<string, string | null>();
