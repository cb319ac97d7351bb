/**
 * Pure: splits one diary line that names several foods ("2 slices white bread with 1 slice of
 * cheese singles", "coffee with non-dairy creamer", "eggs, bacon and toast", "rice + dal",
 * "pan con queso", "riz et poulet") into one text per food, each keeping its own quantity.
 * Connectors are read in the ten handout languages. A line is kept whole when the words around a
 * connector are one food ("macaroni and cheese", "café con leche", "oatmeal made with water",
 * "chicken with skin", "1 and a half cups"). See docs/diary-and-search.md.
 */
import { foldAligned } from './quantity.js';

/**
 * Words joining two foods, folded (lower case, no accents), each written between spaces:
 * en with/and/plus, es con/y/e, fr avec/et, pt com/e, ru с/со/и, tl at/saka/kasama,
 * vi voi (với)/va (và), hi और/तथा/के साथ, ar مع/و.
 */
const WORD_CONNECTORS = [
  'with',
  'and',
  'plus',
  'con',
  'y',
  'e',
  'avec',
  'et',
  'com',
  'с',
  'со',
  'и',
  'at',
  'saka',
  'kasama',
  'kasama ang',
  'voi',
  'va',
  'और',
  'तथा',
  'के साथ',
  'مع',
  'و',
];
/** Connectors that mean "with": the words after them may only describe the first food. */
const WITH_WORDS = new Set([
  'with',
  'con',
  'avec',
  'com',
  'с',
  'со',
  'kasama',
  'kasama ang',
  'voi',
  'के साथ',
  'مع',
]);
/** Signs joining foods with or without spaces (Chinese 和 与 跟 配 加 and its list comma). */
const SIGN_CONNECTOR = /\s*(?:\+|&|;|、|，|和|与|跟|配)\s*/gu;

/** Dishes and drinks whose name holds a connector: one food, never split (folded). */
const ONE_FOOD = [
  'macaroni and cheese',
  'mac and cheese',
  'mac n cheese',
  'half and half',
  'sweet and sour',
  'salt and pepper',
  'salt and vinegar',
  'sour cream and onion',
  'cookies and cream',
  'pork and beans',
  'franks and beans',
  'peanut butter and jelly',
  'burger with cheese',
  'hamburger with cheese',
  'cafe con leche',
  'arroz con leche',
  'arroz con pollo',
  'chili con carne',
  'chile con carne',
  'pan con tomate',
  'con chispas de chocolate',
  'cafe com leite',
  'arroz e feijao',
  'cafe au lait',
];

/** Words after "with" that describe the food rather than add one (folded). */
const DESCRIBING_AFTER_WITH = new Set(
  (
    'skin bone bones peel seeds salt added no without water ice vitamin calcium low reduced ' +
    'extra less more sauce gravy dressing lemon juice sin agua sal piel hueso eau sel peau ' +
    'agua sem pele'
  ).split(' '),
);
/** Words before "with" that make it part of one food ("made with water", "cooked with milk"). */
const MADE_BEFORE_WITH = new Set(
  'made cooked prepared fried mixed hecho hecha preparado preparada cocido cocida fait cuit feito'.split(
    ' ',
  ),
);
/** "and a half", "y medio": part of an amount. */
const FRACTION_AFTER_AND =
  /^(?:a |an |un |una )?(?:half|quarter|third|medio|media|cuarto|demi|meio|meia)\b/;
/** Words after Tagalog/English "at" that make it a place or a time, not "and". */
const AT_PLACE = /^(?:home|work|school|night|noon|the|a|my|around|about|breakfast|lunch|dinner|\d)/;

/** Words a comma part may hold without naming a food of its own ("roasted", "120 g"). */
const DESCRIBING = new Set(
  (
    'raw cooked boiled fried roasted baked broiled grilled stewed steamed canned frozen dried ' +
    'toasted scrambled poached smoked microwaved sliced diced chopped grated mashed plain ' +
    'white brown whole lean skinless boneless salted unsalted sweetened unsweetened low fat ' +
    'lowfat nonfat free reduced regular light diet small medium large big organic fresh hot cold ' +
    'iced warm homemade with without no skin bone in of a an the 1 2 3 4 5 6 7 8 9 0 g kg oz lb ' +
    'ml l cup cups slice slices piece pieces tbsp tsp can bottle glass bowl serving % ' +
    'cocido cocida frito frita asado asada hervido hervida blanco blanca integral'
  ).split(' '),
);

interface Cut {
  start: number;
  end: number;
  comma: boolean;
  /** The connector means "with": the food after it is added to the one before. */
  with?: boolean;
}

/** One food of a line: its text, and whether it was added "with" the food before it. */
export interface FoodPart {
  text: string;
  added: boolean;
}

function isWordChar(ch: string | undefined): boolean {
  return ch !== undefined && /[\p{L}\p{N}\p{M}]/u.test(ch);
}

/** Spans of the folded text covered by a one-food phrase. */
function protectedSpans(folded: string): [number, number][] {
  const spans: [number, number][] = [];
  for (const phrase of ONE_FOOD) {
    let at = folded.indexOf(phrase);
    while (at >= 0) {
      if (!isWordChar(folded[at - 1]) && !isWordChar(folded[at + phrase.length]))
        spans.push([at, at + phrase.length]);
      at = folded.indexOf(phrase, at + 1);
    }
  }
  return spans;
}

function wordCuts(folded: string): Cut[] {
  const cuts: Cut[] = [];
  for (const w of WORD_CONNECTORS) {
    let at = folded.indexOf(` ${w} `);
    while (at >= 0) {
      const start = at;
      const end = at + w.length + 2;
      if (keepsOneFood(folded, w, start, end)) {
        at = folded.indexOf(` ${w} `, at + 1);
        continue;
      }
      cuts.push({ start, end, comma: false, with: WITH_WORDS.has(w) });
      at = folded.indexOf(` ${w} `, at + 1);
    }
  }
  return cuts;
}

/** The connector at [start, end) joins words of one food, not two foods. */
function keepsOneFood(folded: string, w: string, start: number, end: number): boolean {
  const before = folded.slice(0, start).trimEnd();
  const after = folded.slice(end).trimStart();
  const nextWord = /^[\p{L}\p{N}%]+/u.exec(after)?.[0] ?? '';
  const prevWord = /[\p{L}\p{N}%]+$/u.exec(before)?.[0] ?? '';
  if (!nextWord || !prevWord) return true;
  // "2 y 3 galletas" is a range, "1 and a half cups" an amount.
  if (/\d$/.test(before) && /^\d/.test(after)) return true;
  if (FRACTION_AFTER_AND.test(after)) return true;
  if (WITH_WORDS.has(w)) {
    if (DESCRIBING_AFTER_WITH.has(nextWord) || MADE_BEFORE_WITH.has(prevWord)) return true;
  }
  if (w === 'at' && AT_PLACE.test(after)) return true;
  return false;
}

/** A comma part that only describes the food before it ("roasted", "120 g", "white"). */
function describesOnly(part: string): boolean {
  const words = part.match(/[\p{L}\p{N}%]+/gu) ?? [];
  return words.every((w) => DESCRIBING.has(w) || /^\d+([.,]\d+)?%?$/.test(w));
}

function startsWithAmount(part: string): boolean {
  return /^\s*(?:\d|½|¼|¾|⅓|a |an |one |two |three |un |una |dos |tres )/.test(part);
}

/**
 * The foods of one diary line, in order, each with its own words and quantity as written; a line
 * naming one food comes back as itself. Never loses text: the parts joined are the line less
 * its connectors.
 */
export function splitFoods(text: string): string[] {
  return splitFoodParts(text).map((p) => p.text);
}

/** `splitFoods` with, for each food, whether it was added "with" the food before it. */
export function splitFoodParts(text: string): FoodPart[] {
  const trimmed = text.trim();
  const folded = foldAligned(trimmed);
  const spans = protectedSpans(folded);
  const inSpan = (c: Cut) => spans.some(([s, e]) => c.start < e && c.end > s);
  const cuts = wordCuts(folded).filter((c) => !inSpan(c));
  for (const m of folded.matchAll(SIGN_CONNECTOR)) {
    const c = { start: m.index, end: m.index + m[0].length, comma: false };
    if (!inSpan(c) && c.start > 0) cuts.push(c);
  }
  // Commas split only a list: another connector on the line, or two parts with their own amount.
  const commaCuts: Cut[] = [];
  for (const m of folded.matchAll(/\s*,\s*/g)) {
    // "1,5 kg" is a decimal comma.
    if (/\d/.test(folded[m.index - 1] ?? '') && /\d/.test(folded[m.index + m[0].length] ?? ''))
      continue;
    const c = { start: m.index, end: m.index + m[0].length, comma: true };
    if (!inSpan(c)) commaCuts.push(c);
  }
  if (commaCuts.length > 0) {
    const pieces = cutText(folded, commaCuts);
    const withAmounts = pieces.filter((p) => startsWithAmount(p)).length;
    if (cuts.length > 0 || withAmounts >= 2) cuts.push(...commaCuts);
  }
  if (cuts.length === 0) return [{ text: trimmed, added: false }];
  cuts.sort((a, b) => a.start - b.start);
  const parts: { text: string; folded: string; added: boolean }[] = [];
  let from = 0;
  let added = false;
  for (const c of cuts) {
    if (c.start < from) continue;
    parts.push({ text: trimmed.slice(from, c.start), folded: folded.slice(from, c.start), added });
    from = c.end;
    added = c.with === true;
  }
  parts.push({ text: trimmed.slice(from), folded: folded.slice(from), added });
  // A part that only describes the food before it goes back onto it ("chicken, roasted, 120 g").
  const merged: { text: string; folded: string; added: boolean }[] = [];
  for (const p of parts) {
    const last = merged[merged.length - 1];
    if (last && describesOnly(p.folded)) {
      last.text = `${last.text}, ${p.text.trim()}`;
      last.folded = `${last.folded}, ${p.folded.trim()}`;
    } else merged.push({ ...p });
  }
  const out = merged
    .map((p) => ({ text: p.text.trim(), added: p.added }))
    .filter((p) => /[\p{L}]/u.test(p.text));
  return out.length > 0 ? out : [{ text: trimmed, added: false }];
}

function cutText(text: string, cuts: readonly Cut[]): string[] {
  const out: string[] = [];
  let from = 0;
  for (const c of cuts) {
    out.push(text.slice(from, c.start));
    from = c.end;
  }
  out.push(text.slice(from));
  return out;
}
