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
const COOKED = /\b(cooked|boiled|roasted|baked|broiled|grilled|stewed|fried|heated|brewed|pan-fried)\b/;
/** Regional or restaurant foods a bare query rarely means. */
const SPECIAL_SOURCE = /\((alaska native|hopi|navajo|apache|shoshone)\)|^fast food|restaurant|'s\b/i;

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

/** The plainness penalty of a name for a query's words (0 = the plain everyday food). */
export function plainnessPenalty(words: readonly string[], name: string): number {
  const have = nameWords(name);
  // Words in brackets only explain ("(fat free or skim)"): they make no variant.
  const outside = nameWords(name.replace(/\([^)]*\)/g, ' '));
  const named = (n: string) => words.some((w) => n.startsWith(w));
  let p = 3 * wholeWordMisses(words, have);
  // Each form word counts: "frozen, unprepared" is further from the plate than "frozen".
  p += 2 * new Set(outside.filter((n) => NOT_READY.has(n) && !named(n))).size;
  if (outside.some((n) => VARIANT.has(n) && !named(n))) p += 2;
  const lower = name.toLowerCase();
  if (PROTOTYPE.test(lower)) p -= 1;
  if (SPECIAL_SOURCE.test(name)) p += 3;
  // Brand-like words in capitals ("SPAGHETTIOS") unless the query names them.
  const caps = name.match(/\b[A-Z]{3,}[A-Z']*\b/g) ?? [];
  if (caps.some((c) => !named(c.toLowerCase().replace(/'s$/, '')))) p += 2;
  const head = words[0] ?? '';
  const cookedHead = [...USUALLY_COOKED].some((h) => head === h || head === `${h}s`);
  if (cookedHead) {
    if (have.includes('raw') && !named('raw')) p += 2;
    if (COOKED.test(lower)) p -= 1;
  } else if (have.includes('raw')) p -= 1;
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
  const segments = name.split(',').map((s) => s.trim().toLowerCase());
  for (const n of [2, 1]) {
    if (segments.length > n && CATEGORY_HEADS.has(segments.slice(0, n).join(', ')))
      return segments.slice(n).join(', ');
  }
  return null;
}
