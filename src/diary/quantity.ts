/**
 * Pure quantity parser for diary entries: "2 slices", "1 ½ cups", "250g", "media taza",
 * "2-3 slices", "a can (355 ml)". No I/O; the gram conversion takes the food's own measures.
 */
import type { Portion } from '../foods/food.js';
import { typicalUnit } from '../foods/unit-weights.js';

export type QuantityUnit =
  | 'g'
  | 'kg'
  | 'oz'
  | 'lb'
  | 'ml'
  | 'l'
  | 'fl oz'
  | 'cup'
  | 'tbsp'
  | 'tsp'
  | 'slice'
  | 'piece'
  | 'can'
  | 'bottle'
  | 'packet'
  | 'bowl'
  | 'serving'
  | 'handful';

/** A parsed quantity: `amount` units (a range is taken at its midpoint, see docs/diary-audits.md). */
export interface Quantity {
  amount: number;
  /** The stated range when the text gave one ("2-3"), else null. */
  range: { low: number; high: number } | null;
  /** A unit the parser knows, or null (a bare count or one of the food's own measures). */
  unit: QuantityUnit | null;
  /** The measure word as written when it is not a known unit ("large", "medium"). */
  measureText: string | null;
  /** The stated size of one container: "a can (355 ml)" -> {amount: 355, unit: 'ml'}. */
  container: { amount: number; unit: QuantityUnit } | null;
  /** The text the quantity was read from. */
  text: string;
}

export type QuantityResult = { ok: true; value: Quantity } | { ok: false; issues: string[] };

// Exact definitions: international avoirdupois pound = 0.45359237 kg (International Yard and
// Pound Agreement, 1959; NIST Handbook 44 Appendix C); US fluid ounce = 1/128 US gallon of
// 231 cubic inches = 29.5735295625 ml; cup = 8 fl oz, tbsp = 1/2 fl oz, tsp = 1/6 fl oz.
export const GRAMS_PER_OZ = 28.349523125;
export const GRAMS_PER_LB = 453.59237;
export const ML_PER_FL_OZ = 29.5735295625;
export const ML_PER_CUP = 8 * ML_PER_FL_OZ; // 236.5882365 ml
export const ML_PER_TBSP = ML_PER_FL_OZ / 2; // 14.78676478125 ml
export const ML_PER_TSP = ML_PER_FL_OZ / 6; // 4.92892159375 ml

const MASS_G: Partial<Record<QuantityUnit, number>> = {
  g: 1,
  kg: 1000,
  oz: GRAMS_PER_OZ,
  lb: GRAMS_PER_LB,
};
const VOLUME_ML: Partial<Record<QuantityUnit, number>> = {
  ml: 1,
  l: 1000,
  'fl oz': ML_PER_FL_OZ,
  cup: ML_PER_CUP,
  tbsp: ML_PER_TBSP,
  tsp: ML_PER_TSP,
};

/** Unit words in English and Spanish (folded: lower case, no accents), longest first. */
const UNIT_WORDS: [string, QuantityUnit][] = (
  [
    ['fluid ounces', 'fl oz'],
    ['fluid ounce', 'fl oz'],
    ['fl. oz.', 'fl oz'],
    ['fl. oz', 'fl oz'],
    ['fl oz', 'fl oz'],
    ['floz', 'fl oz'],
    ['onzas liquidas', 'fl oz'],
    ['onza liquida', 'fl oz'],
    ['grams', 'g'],
    ['gram', 'g'],
    ['grammes', 'g'],
    ['gramme', 'g'],
    ['gramos', 'g'],
    ['gramo', 'g'],
    ['grs', 'g'],
    ['gr', 'g'],
    ['g', 'g'],
    ['kilograms', 'kg'],
    ['kilogram', 'kg'],
    ['kilogramos', 'kg'],
    ['kilogramo', 'kg'],
    ['kilos', 'kg'],
    ['kilo', 'kg'],
    ['kg', 'kg'],
    ['ounces', 'oz'],
    ['ounce', 'oz'],
    ['onzas', 'oz'],
    ['onza', 'oz'],
    ['oz', 'oz'],
    ['pounds', 'lb'],
    ['pound', 'lb'],
    ['libras', 'lb'],
    ['libra', 'lb'],
    ['lbs', 'lb'],
    ['lb', 'lb'],
    ['millilitres', 'ml'],
    ['millilitre', 'ml'],
    ['milliliters', 'ml'],
    ['milliliter', 'ml'],
    ['mililitros', 'ml'],
    ['mililitro', 'ml'],
    ['ml', 'ml'],
    ['cc', 'ml'],
    ['litres', 'l'],
    ['litre', 'l'],
    ['liters', 'l'],
    ['liter', 'l'],
    ['litros', 'l'],
    ['litro', 'l'],
    ['l', 'l'],
    ['cups', 'cup'],
    ['cup', 'cup'],
    ['tazas', 'cup'],
    ['taza', 'cup'],
    ['glasses', 'cup'],
    ['glass', 'cup'],
    ['vasos', 'cup'],
    ['vaso', 'cup'],
    ['mugs', 'cup'],
    ['mug', 'cup'],
    ['tablespoons', 'tbsp'],
    ['tablespoon', 'tbsp'],
    ['cucharadas', 'tbsp'],
    ['cucharada', 'tbsp'],
    ['tbsps', 'tbsp'],
    ['tbsp', 'tbsp'],
    ['tbs', 'tbsp'],
    ['tbl', 'tbsp'],
    ['teaspoons', 'tsp'],
    ['teaspoon', 'tsp'],
    ['cucharaditas', 'tsp'],
    ['cucharadita', 'tsp'],
    ['tsps', 'tsp'],
    ['tsp', 'tsp'],
    ['slices', 'slice'],
    ['slice', 'slice'],
    ['rebanadas', 'slice'],
    ['rebanada', 'slice'],
    ['lonchas', 'slice'],
    ['loncha', 'slice'],
    ['rodajas', 'slice'],
    ['rodaja', 'slice'],
    ['tajadas', 'slice'],
    ['tajada', 'slice'],
    ['pieces', 'piece'],
    ['piece', 'piece'],
    ['pcs', 'piece'],
    ['pc', 'piece'],
    ['each', 'piece'],
    ['items', 'piece'],
    ['item', 'piece'],
    ['piezas', 'piece'],
    ['pieza', 'piece'],
    ['trozos', 'piece'],
    ['trozo', 'piece'],
    ['unidades', 'piece'],
    ['unidad', 'piece'],
    ['cans', 'can'],
    ['can', 'can'],
    ['tins', 'can'],
    ['tin', 'can'],
    ['latas', 'can'],
    ['lata', 'can'],
    ['bottles', 'bottle'],
    ['bottle', 'bottle'],
    ['botellas', 'bottle'],
    ['botella', 'bottle'],
    ['botellines', 'bottle'],
    ['botellin', 'bottle'],
    ['packets', 'packet'],
    ['packet', 'packet'],
    ['packages', 'packet'],
    ['package', 'packet'],
    ['packs', 'packet'],
    ['pack', 'packet'],
    ['pkg', 'packet'],
    ['sachets', 'packet'],
    ['sachet', 'packet'],
    ['bags', 'packet'],
    ['bag', 'packet'],
    ['paquetes', 'packet'],
    ['paquete', 'packet'],
    ['sobres', 'packet'],
    ['sobre', 'packet'],
    ['bolsas', 'packet'],
    ['bolsa', 'packet'],
    ['bowls', 'bowl'],
    ['bowlful', 'bowl'],
    ['bowl', 'bowl'],
    ['tazones', 'bowl'],
    ['tazon', 'bowl'],
    ['cuencos', 'bowl'],
    ['cuenco', 'bowl'],
    ['boles', 'bowl'],
    ['bol', 'bowl'],
    ['platos', 'bowl'],
    ['plato', 'bowl'],
    ['servings', 'serving'],
    ['serving', 'serving'],
    ['portions', 'serving'],
    ['portion', 'serving'],
    ['helpings', 'serving'],
    ['helping', 'serving'],
    ['porciones', 'serving'],
    ['porcion', 'serving'],
    ['raciones', 'serving'],
    ['racion', 'serving'],
    // A handful has no size of its own: grams come from a stated assumption per food class
    // (see handful.ts), or the line is asked about. Misspellings diaries write are read too.
    ['handfulls', 'handful'],
    ['handfull', 'handful'],
    ['handfuls', 'handful'],
    ['handful', 'handful'],
    ['hand full', 'handful'],
    ['punados', 'handful'],
    ['punado', 'handful'],
    ['poignees', 'handful'],
    ['poignee', 'handful'],
    ['punhados', 'handful'],
    ['punhado', 'handful'],
    ['горсти', 'handful'],
    ['горсть', 'handful'],
    ['dakot', 'handful'],
  ] as [string, QuantityUnit][]
).sort((a, b) => b[0].length - a[0].length);

/** The unit words by first character (longest first within each), for a quick look-up. */
const UNITS_BY_FIRST = new Map<string, [string, QuantityUnit][]>();
for (const entry of UNIT_WORDS) {
  const list = UNITS_BY_FIRST.get(entry[0][0] as string) ?? [];
  list.push(entry);
  UNITS_BY_FIRST.set(entry[0][0] as string, list);
}

/** Whole-number words, English and Spanish (folded). */
const NUMBER_WORDS: Record<string, number> = {
  a: 1,
  an: 1,
  one: 1,
  two: 2,
  three: 3,
  four: 4,
  five: 5,
  six: 6,
  seven: 7,
  eight: 8,
  nine: 9,
  ten: 10,
  eleven: 11,
  twelve: 12,
  dozen: 12,
  couple: 2,
  un: 1,
  uno: 1,
  una: 1,
  dos: 2,
  tres: 3,
  cuatro: 4,
  cinco: 5,
  seis: 6,
  siete: 7,
  ocho: 8,
  nueve: 9,
  diez: 10,
  once: 11,
  doce: 12,
  docena: 12,
  par: 2,
};
const FRACTION_WORDS: Record<string, number> = {
  half: 0.5,
  halves: 0.5,
  medio: 0.5,
  media: 0.5,
  mitad: 0.5,
  quarter: 0.25,
  quarters: 0.25,
  cuarto: 0.25,
  cuartos: 0.25,
  third: 1 / 3,
  thirds: 1 / 3,
  tercio: 1 / 3,
  tercios: 1 / 3,
};
const VULGAR: Record<string, number> = {
  '½': 1 / 2,
  '⅓': 1 / 3,
  '⅔': 2 / 3,
  '¼': 1 / 4,
  '¾': 3 / 4,
  '⅕': 1 / 5,
  '⅛': 1 / 8,
  '⅜': 3 / 8,
  '⅝': 5 / 8,
  '⅞': 7 / 8,
};

/** Lower case without accents, one output character per input character (offsets line up). */
export function foldAligned(text: string): string {
  return fold(text);
}

function fold(text: string): string {
  // eslint-disable-next-line no-control-regex
  if (/^[\x00-\x7f]*$/.test(text)) return text.toLowerCase();
  let out = '';
  for (let i = 0; i < text.length; i++) {
    const ch = text[i] as string;
    if (VULGAR[ch] !== undefined) {
      out += ch; // NFKD would turn ½ into 1⁄2
      continue;
    }
    const f = ch
      .normalize('NFKD')
      .replace(/\p{M}+/gu, '')
      .toLowerCase();
    out += f.length === 1 ? f : ch;
  }
  return out;
}

/** A small cursor over the folded text. */
class Cursor {
  pos = 0;
  constructor(readonly s: string) {}
  skipSpace(): void {
    while (this.pos < this.s.length && /\s/.test(this.s[this.pos] as string)) this.pos++;
  }
  rest(): string {
    return this.s.slice(this.pos);
  }
  /** Consumes the first of the words that comes next, if any. */
  optional(...words: string[]): void {
    for (const w of words) if (this.word(w)) return;
  }
  /** Consumes a whole word (or phrase) if the text continues with it at a word boundary. */
  word(w: string): boolean {
    this.skipSpace();
    if (!this.s.startsWith(w, this.pos)) return false;
    const after = this.s[this.pos + w.length];
    if (after !== undefined && /[\p{L}\p{N}]/u.test(after)) return false;
    this.pos += w.length;
    return true;
  }
}

/** Reads a decimal: "2", "1.5", "1,5"; a comma followed by exactly 3 digits groups thousands. */
function readDecimal(c: Cursor): number | null {
  c.skipSpace();
  const m = /^(\d+(?:,\d{3})+(?!\d)|\d+)(?:[.,](\d+))?/.exec(c.rest());
  if (!m) return null;
  const whole = (m[1] as string).replaceAll(',', '');
  const value = Number(m[2] ? `${whole}.${m[2]}` : whole);
  c.pos += m[0].length;
  return value;
}

/** Reads one amount: digits, decimals, fractions, mixed numbers, vulgar fractions, words. */
function readAmount(c: Cursor): number | null {
  c.skipSpace();
  const start = c.pos;
  const ch = c.s[c.pos];
  if (ch !== undefined && VULGAR[ch] !== undefined) {
    c.pos++;
    return VULGAR[ch];
  }
  const frac = /^(\d+)\s*\/\s*(\d+)/.exec(c.rest());
  if (frac) {
    const d = Number(frac[2]);
    if (d === 0) return null;
    c.pos += frac[0].length;
    return Number(frac[1]) / d;
  }
  const dec = readDecimal(c);
  if (dec !== null && /^\s*%/.test(c.rest())) {
    // "2% milk" names a fat content, not an amount.
    c.pos = start;
    return null;
  }
  if (dec !== null) {
    // Mixed number: "1 1/2", "1 ½", "1½", "1-1/2".
    const save = c.pos;
    const next = c.s[c.pos];
    if (next !== undefined && VULGAR[next] !== undefined) {
      c.pos++;
      return dec + (VULGAR[next] as number);
    }
    c.skipSpace();
    const v = c.s[c.pos];
    if (v !== undefined && VULGAR[v] !== undefined) {
      c.pos++;
      return dec + (VULGAR[v] as number);
    }
    const mixed = /^-?\s*(\d+)\s*\/\s*(\d+)/.exec(c.rest());
    if (mixed && Number(mixed[2]) > Number(mixed[1]) && Number.isInteger(dec)) {
      c.pos += mixed[0].length;
      return dec + Number(mixed[1]) / Number(mixed[2]);
    }
    c.pos = save;
    // "1 and a half", "2 y medio"
    const half = readAndFraction(c);
    return half === null ? dec : dec + half;
  }
  return readWordAmount(c, start);
}

const WORD_AT = /[\p{L}]+/uy;

/** The word (letters) starting at the cursor after spaces, if it ends at a word boundary. */
function peekWord(c: Cursor): string | null {
  c.skipSpace();
  WORD_AT.lastIndex = c.pos;
  const m = WORD_AT.exec(c.s);
  if (!m) return null;
  const after = c.s[c.pos + m[0].length];
  if (after !== undefined && /\d/.test(after)) return null;
  return m[0];
}

/** Consumes the next word if it is in the table; returns its value. */
function takeWord<T>(c: Cursor, table: Record<string, T>): T | undefined {
  const save = c.pos;
  const w = peekWord(c);
  if (w !== null && Object.hasOwn(table, w)) {
    c.pos += w.length;
    return table[w];
  }
  c.pos = save;
  return undefined;
}

const AND_WORDS: Record<string, true> = { and: true, y: true, e: true };
const ARTICLES: Record<string, true> = { a: true, un: true, una: true };
const DOZEN: Record<string, true> = { dozen: true, docena: true };
const COUPLE: Record<string, true> = { couple: true, par: true };
const LINKS: Record<string, true> = { a: true, an: true, of: true, de: true };

/** "and a half" / "y medio" / "y media" / "and a quarter" after a whole amount. */
function readAndFraction(c: Cursor): number | null {
  const save = c.pos;
  if (takeWord(c, AND_WORDS)) {
    takeWord(c, ARTICLES);
    const v = takeWord(c, FRACTION_WORDS);
    if (v !== undefined) return v;
  }
  c.pos = save;
  return null;
}

function readWordAmount(c: Cursor, start: number): number | null {
  c.pos = start;
  // "half a", "half dozen", "media docena", "a half", "a quarter", "three quarters"
  let base = takeWord(c, NUMBER_WORDS) ?? null;
  if (base !== null) {
    // "a couple of", "un par de", "a dozen"
    if (base === 1 && takeWord(c, COUPLE)) base = 2;
    else if (base === 1 && takeWord(c, DOZEN)) base = 12;
    // "a half", "three quarters", "dos tercios": that many halves or quarters
    const frac = takeWord(c, FRACTION_WORDS);
    if (frac !== undefined) return base * frac;
    const more = readAndFraction(c);
    return more === null ? base : base + more;
  }
  const frac = takeWord(c, FRACTION_WORDS);
  if (frac !== undefined) {
    if (takeWord(c, DOZEN)) return frac * 12;
    takeWord(c, LINKS);
    return frac;
  }
  c.pos = start;
  return null;
}

/** Range connectors between two amounts: "2-3", "2 to 3", "2 or 3", "2 o 3", "2 a 3". */
function readRangeEnd(c: Cursor): number | null {
  const save = c.pos;
  c.skipSpace();
  const ch = c.s[c.pos];
  let connector = false;
  if (ch === '-' || ch === '–' || ch === '—' || ch === '~') {
    c.pos++;
    connector = true;
  } else if (c.word('to') || c.word('or') || c.word('o') || c.word('a') || c.word('y')) {
    connector = true;
  }
  if (connector) {
    const high = readAmount(c);
    if (high !== null) return high;
  }
  c.pos = save;
  return null;
}

function readUnit(c: Cursor): QuantityUnit | null {
  c.skipSpace();
  const candidates = UNITS_BY_FIRST.get(c.s[c.pos] ?? '');
  if (!candidates) return null;
  for (const [w, u] of candidates) {
    if (c.s.startsWith(w, c.pos)) {
      const after = c.s[c.pos + w.length];
      if (after === undefined || !/[\p{L}\p{N}]/u.test(after)) {
        c.pos += w.length;
        if (c.s[c.pos] === '.') c.pos++; // "tbsp."
        return u;
      }
    }
  }
  return null;
}

/** "(355 ml)", "(12 oz)", "de 330 ml" after a container unit. */
function readContainer(c: Cursor): Quantity['container'] {
  const save = c.pos;
  c.skipSpace();
  const open = c.s[c.pos] === '(' || c.s[c.pos] === '[';
  if (open) c.pos++;
  else if (!(c.word('of') || c.word('de'))) {
    c.pos = save;
    return null;
  }
  const amount = readDecimal(c);
  const unit = amount === null ? null : readUnit(c);
  if (amount === null || unit === null || (!MASS_G[unit] && !VOLUME_ML[unit])) {
    c.pos = save;
    return null;
  }
  c.skipSpace();
  if (open) {
    if (c.s[c.pos] !== ')' && c.s[c.pos] !== ']') {
      c.pos = save;
      return null;
    }
    c.pos++;
  }
  return { amount, unit };
}

interface PrefixRead {
  quantity: Quantity;
  /** Characters of the folded text consumed. */
  end: number;
}

/** Reads a quantity at the start of a (folded) text; null when there is none. */
function readPrefix(folded: string, original: string): PrefixRead | null {
  const c = new Cursor(folded);
  const amount = readAmount(c);
  if (amount === null) {
    // A unit alone: "cup of tea" is one cup.
    const u = readUnit(c);
    if (u === null) return null;
    return finishUnit(c, 1, null, u, original);
  }
  const high = readRangeEnd(c);
  // "2 x 150 g" is 2 times the quantity that follows.
  const times = /^\s*[x×*]\s*/.exec(c.rest());
  if (times) {
    c.pos += times[0].length;
    const inner = readPrefix(folded.slice(c.pos), original.slice(c.pos));
    if (inner && inner.quantity.unit !== null) {
      const q = inner.quantity;
      const factor = high === null ? amount : (amount + high) / 2;
      return {
        quantity: {
          ...q,
          amount: q.amount * factor,
          range: high === null ? null : { low: amount * q.amount, high: high * q.amount },
          text: original.slice(0, c.pos + inner.end).trim(),
        },
        end: c.pos + inner.end,
      };
    }
  }
  c.optional('of', 'de');
  const unitStart = c.pos;
  const unit = readUnit(c);
  if (unit === null) {
    c.pos = unitStart;
    const range =
      high === null ? null : { low: Math.min(amount, high), high: Math.max(amount, high) };
    return {
      quantity: {
        amount: range ? (range.low + range.high) / 2 : amount,
        range,
        unit: null,
        measureText: null,
        container: null,
        text: original.slice(0, c.pos).trim(),
      },
      end: c.pos,
    };
  }
  return finishUnit(c, amount, high, unit, original);
}

function finishUnit(
  c: Cursor,
  amount: number,
  high: number | null,
  unit: QuantityUnit,
  original: string,
): PrefixRead {
  // "una taza y media", "a cup and a half"
  const extra = readAndFraction(c);
  if (extra !== null) amount += extra;
  const container = readContainer(c);
  const after = c.pos;
  c.optional('of', 'de');
  const range =
    high === null ? null : { low: Math.min(amount, high), high: Math.max(amount, high) };
  return {
    quantity: {
      amount: range ? (range.low + range.high) / 2 : amount,
      range,
      unit,
      measureText: null,
      container,
      text: original.slice(0, after).trim(),
    },
    end: c.pos,
  };
}

const MAX_AMOUNT = 100_000;

function check(q: Quantity): string[] {
  const issues: string[] = [];
  if (q.amount < 0) issues.push(`amount ${q.amount} is negative`);
  else if (!Number.isFinite(q.amount) || q.amount === 0)
    issues.push('amount must be more than zero');
  if (q.amount > MAX_AMOUNT) issues.push(`amount ${q.amount} is not believable`);
  return issues;
}

/**
 * Parses a quantity column ("2 slices", "1 ½ cups", "250g", "2-3", "a can (355 ml)",
 * "1 large"). A word after the number that is not a unit is kept as `measureText` (the food's
 * own household measure). Fails with issues when nothing sensible can be read.
 */
export function parseQuantity(text: string): QuantityResult {
  const trimmed = text.trim();
  if (trimmed.length === 0) return { ok: false, issues: ['quantity is empty'] };
  if (trimmed.length > 100)
    return { ok: false, issues: ['quantity is longer than 100 characters'] };
  if (NEGATIVE_AMOUNT.test(trimmed))
    return { ok: false, issues: [`the amount '${trimmed}' is negative`] };
  const folded = fold(trimmed);
  const read = readPrefix(folded, trimmed);
  if (!read) return { ok: false, issues: [`no amount or unit in '${trimmed}'`] };
  const rest = trimmed.slice(read.end).trim();
  const q = read.quantity;
  if (rest.length > 0) {
    if (q.unit !== null || !/^[\p{L}\s,.()'-]+$/u.test(rest)) {
      return { ok: false, issues: [`'${rest}' after the quantity is not understood`] };
    }
    q.measureText = rest.replace(/^\(|\)$/g, '').trim();
    q.text = trimmed;
  }
  const issues = check(q);
  return issues.length > 0 ? { ok: false, issues } : { ok: true, value: q };
}

/** Amounts a diary writes that say no size ("a handful of", "some", "un poco de"). */
const VAGUE_AMOUNT =
  /^(?:an?\s+|un\s+|una\s+)?(?:pinch|splash|dash|bit|little|few|some|lots|plenty|poco|pizca|chorrito|algo|varios|varias)(?:\s+of|\s+de)?\s+/i;

/** A minus sign before an amount ("-100 g", "−2 slices"): a negative amount, never "no amount". */
const NEGATIVE_AMOUNT = /^\s*[-−–]\s*(\d+(?:[.,]\d+)?(?:\s*[\p{L}.]+)?)/u;

export interface SplitEntry {
  /** The quantity found in the text, or null (none written). */
  quantity: Quantity | null;
  /** A vague amount that was written but says no size ("a pinch of"). */
  vague?: string;
  /** A negative amount as written ("-100 g"): the line cannot be counted until corrected. */
  negative?: string;
  /** The food words once the quantity is taken out. */
  foodText: string;
}

/**
 * Splits free text into quantity and food: "2 slices white toast", "milk 200 ml",
 * "toast, 2 slices", "yogurt (150 g)", "coffee x2". Only a leading or trailing quantity counts.
 */
export function splitQuantity(text: string): SplitEntry {
  const trimmed = text.trim();
  const negative = NEGATIVE_AMOUNT.exec(trimmed);
  if (negative) {
    const lead = readPrefix(fold(negative[1] as string), negative[1] as string);
    const end = negative[0].length - (negative[1] as string).length + (lead?.end ?? 0);
    const foodText = trimmed
      .slice(lead ? end : negative[0].length)
      .replace(/^[\s,:-]+/, '')
      .trim();
    if (foodText.length > 0)
      return { quantity: null, foodText, negative: trimmed.slice(0, end).trim() };
  }
  const vague = VAGUE_AMOUNT.exec(trimmed);
  if (vague && vague[0].length < trimmed.length) {
    return {
      quantity: null,
      foodText: trimmed.slice(vague[0].length).trim(),
      vague: vague[0].trim(),
    };
  }
  const folded = fold(trimmed);
  const lead = readPrefix(folded, trimmed);
  if (lead && lead.end > 0) {
    const foodText = trimmed
      .slice(lead.end)
      .replace(/^[\s,:-]+/, '')
      .trim();
    if (foodText.length > 0 && check(lead.quantity).length === 0) {
      return { quantity: lead.quantity, foodText };
    }
  }
  // Trailing: after the last comma or inside the last brackets, or the last few words.
  const tail = /(?:[,;(]\s*|\s+[x×]\s*|\s+)([^,;()]{1,40}?)\)?\s*$/.exec(trimmed);
  const candidates: number[] = [];
  const lastComma = Math.max(trimmed.lastIndexOf(','), trimmed.lastIndexOf('('));
  if (lastComma > 0) candidates.push(lastComma + 1);
  if (tail) candidates.push(tail.index);
  const words = [...trimmed.matchAll(/\s+/g)].map((m) => (m.index ?? 0) + m[0].length);
  for (const w of words.slice(-4)) candidates.push(w);
  candidates.sort((a, b) => a - b);
  for (const at of candidates) {
    let part = trimmed
      .slice(at)
      .replace(/\)\s*$/, '')
      .trim();
    const food = trimmed
      .slice(0, at)
      .replace(/[\s,;(]+$/, '')
      .trim();
    if (!part || !food) continue;
    if (/^[x×]\s*\d/.test(part)) part = part.replace(/^[x×]\s*/, '');
    const parsed = parseQuantity(part);
    // A trailing quantity must start with an amount ("en lata" alone is part of the food's name).
    const startsWithAmount =
      /^[\d½⅓⅔¼¾⅕⅛⅜⅝⅞]/.test(part) || readWordAmount(new Cursor(fold(part)), 0) !== null;
    if (parsed.ok && startsWithAmount && parsed.value.measureText === null) {
      return { quantity: parsed.value, foodText: food };
    }
  }
  return { quantity: null, foodText: trimmed };
}

/** How the grams of an entry were found. */
export type GramsMethod =
  | 'mass'
  | 'volume-table'
  | 'volume-density'
  | 'volume-water'
  | 'container'
  | 'household-measure'
  | 'generic-size'
  | 'typical-unit'
  | 'default-portion';

export interface GramsResult {
  grams: number;
  method: GramsMethod;
  /** True when the amount was not stated or not understood and a default portion was used. */
  assumed: boolean;
  /** One plain sentence on how the grams were reached. */
  note: string;
}

/** What the converter needs of a food: its own household measures and serving. */
export interface MeasuredFood {
  /** The food's name, to find a typical unit weight when its table has no household measure. */
  name?: string;
  portions: readonly Portion[];
  servingG: number | null;
  servingText?: string | null;
}

const VOLUME_PORTION: [RegExp, number][] = [
  [/^cups?\b/, ML_PER_CUP],
  [/^(tbsp|tablespoons?)\b/, ML_PER_TBSP],
  [/^(tsp|teaspoons?)\b/, ML_PER_TSP],
  [/^fl oz\b/, ML_PER_FL_OZ],
  [/^ml\b/, 1],
  [/^quarts?\b/, 4 * ML_PER_CUP],
  [/^pints?\b/, 2 * ML_PER_CUP],
  [/^(l|liter|litre)\b/, 1000],
];
const UNIT_PORTION_WORDS: Partial<Record<QuantityUnit, RegExp>> = {
  cup: /^cups?\b/,
  tbsp: /^(tbsp|tablespoons?)\b/,
  tsp: /^(tsp|teaspoons?)\b/,
  'fl oz': /^fl oz\b/,
  slice: /^slices?\b/,
  piece: /^(pieces?|each|items?|units?|medium)\b/,
  can: /^cans?\b/,
  bottle: /^bottles?\b/,
  packet: /^(packets?|packages?|pouch|envelope|container|bag)\b/,
  bowl: /^bowls?\b/,
  serving: /^(servings?|serving size|portion)\b/,
};
const MASS_OR_VOLUME =
  /^(oz|lb|g|kg|cups?|tbsp|tablespoons?|tsp|teaspoons?|fl oz|ml|quarts?|pints?)\b/;

/** Generic container and bowl sizes used when the food's table has none (common practice, no source). */
export const GENERIC_SIZES_ML: Partial<Record<QuantityUnit, number>> = {
  can: 355, // a 12 US fl oz soft-drink can
  bottle: 500,
  bowl: 1.5 * ML_PER_CUP,
  cup: ML_PER_CUP,
};

function gramsPerPortion(p: Portion): number {
  // USDA SR28 writes a serving as "grams 1 serving" with Amount = Gm_Wgt (56 and 56 g): the
  // measure is one serving of that weight, not 56 items of 1 g.
  if (/^grams?\b/i.test(p.description)) return p.grams;
  return p.amount > 0 ? p.grams / p.amount : p.grams;
}

/** Density in g/ml from the food's own volume measures, or null. */
function tableDensity(food: MeasuredFood): { gPerMl: number; portion: Portion } | null {
  for (const p of food.portions) {
    const d = p.description.toLowerCase();
    for (const [re, ml] of VOLUME_PORTION) {
      if (re.test(d) && !/crumb|cube|chopped|slice|diced|shredded|grated|pieces/.test(d)) {
        return { gPerMl: gramsPerPortion(p) / ml, portion: p };
      }
    }
  }
  return null;
}

function round1(x: number): number {
  return Math.round(x * 10) / 10;
}

/** The measure of the food that best fits the words ("large", "slice, thin"), or null. */
function findPortion(
  food: MeasuredFood,
  re: RegExp | null,
  words: readonly string[],
): Portion | null {
  let best: { p: Portion; score: number } | null = null;
  for (const [i, p] of food.portions.entries()) {
    const d = p.description.toLowerCase();
    if (re && !re.test(d)) continue;
    if (!re && MASS_OR_VOLUME.test(d)) continue;
    const dWords: string[] = d.match(/[a-z]+/g) ?? [];
    const hits = words.filter((w) => dWords.includes(w)).length;
    if (!re && hits === 0) continue;
    // More matching words first, then the shorter (plainer) description, then table order.
    const score = hits * 1000 - d.length - i * 0.01;
    if (!best || score > best.score) best = { p, score };
  }
  return best?.p ?? null;
}

/** The food's usual single item: a "medium" measure, else its first measure that is not a weight or volume. */
function usualItem(food: MeasuredFood): Portion | null {
  const countLike = food.portions.filter((p) => !MASS_OR_VOLUME.test(p.description.toLowerCase()));
  // A cubic inch or a cup of crumbs is a table's measure, not a portion anyone eats.
  const eaten = countLike.filter((p) => !ODD_MEASURE.test(p.description));
  return (
    eaten.find((p) => /^medium\b/i.test(p.description)) ??
    eaten[0] ??
    countLike.find((p) => /^medium\b/i.test(p.description)) ??
    countLike[0] ??
    null
  );
}
const ODD_MEASURE = /cubic|inch|crumb|cubes?\b|dash|pinch|^grams?\b/i;

/** The typical unit weight (referenced table) when the food's own table has no such measure. */
function typicalGrams(
  food: MeasuredFood,
  answers: 'slice' | 'count',
  n: number,
  label: string,
): GramsResult | null {
  if (!food.name) return null;
  const t = typicalUnit(food.name, answers);
  if (!t) return null;
  const grams = round1(n * t.grams);
  return {
    grams,
    method: 'typical-unit',
    assumed: true,
    note: `${label}: the food table has no ${t.unit} measure; typical ${t.size ? `${t.size} ` : ''}${t.unit} ${t.grams} g (${t.source}) x ${n} = ${grams} g`,
  };
}

/**
 * The documented default portion when no quantity is given or it is not understood: the food's
 * usual item (a "medium" measure, else its first count measure), else its first household measure
 * in the table, else its serving size, else 100 g. Always marked assumed.
 */
export function defaultPortion(food: MeasuredFood, why: string): GramsResult {
  return defaultPortionOf(food, why);
}

/**
 * The default for a food written "with" another and no amount ("coffee with milk"): an
 * addition, so the food's smallest household measure, else the usual default. Assumed.
 */
export function addedPortion(food: MeasuredFood): GramsResult {
  const smallest = [...food.portions]
    .filter((p) => p.grams > 0 && !/^grams?\b/i.test(p.description))
    .sort((a, b) => gramsPerPortion(a) - gramsPerPortion(b))[0];
  if (!smallest) return defaultPortionOf(food, 'no quantity given for a food added to another');
  const g = round1(gramsPerPortion(smallest));
  return {
    grams: g,
    method: 'default-portion',
    assumed: true,
    note: `no quantity given for a food added to another; assumed its smallest measure, 1 ${smallest.description} (${g} g) from the food table`,
  };
}

function defaultPortionOf(food: MeasuredFood, why: string): GramsResult {
  const first = usualItem(food) ?? food.portions[0];
  if (first) {
    const g = round1(gramsPerPortion(first));
    return {
      grams: g,
      method: 'default-portion',
      assumed: true,
      note: `${why}; assumed 1 ${first.description} (${g} g) from the food table`,
    };
  }
  if (food.servingG !== null && food.servingG > 0) {
    return {
      grams: round1(food.servingG),
      method: 'default-portion',
      assumed: true,
      note: `${why}; assumed one serving (${round1(food.servingG)} g)`,
    };
  }
  return { grams: 100, method: 'default-portion', assumed: true, note: `${why}; assumed 100 g` };
}

function volumeToGrams(food: MeasuredFood, ml: number, label: string): GramsResult {
  const density = tableDensity(food);
  if (density) {
    const grams = round1(ml * density.gPerMl);
    return {
      grams,
      method: 'volume-density',
      assumed: false,
      note: `${label} = ${round1(ml)} ml x ${density.gPerMl.toFixed(3)} g/ml (from '${density.portion.description}' in the food table) = ${grams} g`,
    };
  }
  const grams = round1(ml);
  return {
    grams,
    method: 'volume-water',
    assumed: false,
    note: `${label} = ${round1(ml)} ml; density unknown, 1 g/ml taken (${grams} g)`,
  };
}

/**
 * Converts a quantity to grams of the food: mass directly; volume through the food's own measure
 * or its density (1 g/ml when the table has none, said in the note); counts through the food's
 * household measures; containers through their stated size; else a generic size, marked assumed.
 * `entryWords` are the folded words of the entry text (to choose "large" over "medium").
 */
export function quantityToGrams(
  q: Quantity | null,
  food: MeasuredFood,
  entryWords: readonly string[] = [],
): GramsResult {
  if (q === null) return defaultPortion(food, 'no quantity given');
  const n = q.amount;
  const rangeNote = q.range ? ` (range ${q.range.low}-${q.range.high}, midpoint taken)` : '';
  const label = `${q.text}${rangeNote}`;
  if (q.unit && MASS_G[q.unit] !== undefined) {
    const grams = round1(n * (MASS_G[q.unit] as number));
    return { grams, method: 'mass', assumed: false, note: `${label} = ${grams} g` };
  }
  if (q.container) {
    const c = q.container;
    const per = MASS_G[c.unit] !== undefined ? c.amount * (MASS_G[c.unit] as number) : null;
    if (per !== null) {
      const grams = round1(n * per);
      return { grams, method: 'container', assumed: false, note: `${label} = ${grams} g` };
    }
    const r = volumeToGrams(food, n * c.amount * (VOLUME_ML[c.unit] as number), label);
    return { ...r, method: r.method === 'volume-density' ? r.method : 'container' };
  }
  const words = [
    ...entryWords,
    ...(q.measureText ? (fold(q.measureText).match(/[a-z]+/g) ?? []) : []),
  ];
  if (q.unit && VOLUME_ML[q.unit] !== undefined) {
    const re = UNIT_PORTION_WORDS[q.unit];
    const own = re ? findPortion(food, re, words) : null;
    if (own && !/crumb|cube|chopped|diced|shredded|grated/.test(own.description)) {
      const grams = round1(n * gramsPerPortion(own));
      return {
        grams,
        method: 'volume-table',
        assumed: false,
        note: `${label} x ${round1(gramsPerPortion(own))} g per '${own.description}' (food table) = ${grams} g`,
      };
    }
    return volumeToGrams(food, n * (VOLUME_ML[q.unit] as number), label);
  }
  if (q.unit) {
    const own = findPortion(food, UNIT_PORTION_WORDS[q.unit] ?? null, words);
    if (own) {
      const grams = round1(n * gramsPerPortion(own));
      return {
        grams,
        method: 'household-measure',
        assumed: false,
        note: `${label} x ${round1(gramsPerPortion(own))} g per '${own.description}' (food table) = ${grams} g`,
      };
    }
    if (q.unit === 'serving' && food.servingG !== null && food.servingG > 0) {
      const grams = round1(n * food.servingG);
      return {
        grams,
        method: 'household-measure',
        assumed: false,
        note: `${label} x ${food.servingG} g serving = ${grams} g`,
      };
    }
    const typical =
      q.unit === 'slice' || q.unit === 'piece'
        ? typicalGrams(food, q.unit === 'slice' ? 'slice' : 'count', n, label)
        : null;
    if (typical) return typical;
    const generic = GENERIC_SIZES_ML[q.unit];
    if (generic !== undefined) {
      const r = volumeToGrams(
        food,
        n * generic,
        `${label} (generic ${q.unit} of ${round1(generic)} ml)`,
      );
      return { ...r, method: 'generic-size', assumed: true };
    }
    const d = defaultPortion(food, `the food table has no '${q.unit}' measure`);
    return {
      ...d,
      grams: round1(n * d.grams),
      method: 'generic-size',
      note: `${label}: ${d.note}, times ${n}`,
    };
  }
  // A bare count or one of the food's own measure words ("2 large", "1 medium").
  const own = findPortion(food, null, words);
  if (own) {
    const grams = round1(n * gramsPerPortion(own));
    return {
      grams,
      method: 'household-measure',
      assumed: false,
      note: `${label} x ${round1(gramsPerPortion(own))} g per '${own.description}' (food table) = ${grams} g`,
    };
  }
  const countLike = usualItem(food);
  if (!countLike && q.measureText === null) {
    const typical = typicalGrams(food, 'count', n, label);
    if (typical) return typical;
  }
  if (countLike) {
    const grams = round1(n * gramsPerPortion(countLike));
    return {
      grams,
      method: 'household-measure',
      assumed: q.measureText !== null,
      note: `${label} x ${round1(gramsPerPortion(countLike))} g per '${countLike.description}' (food table) = ${grams} g`,
    };
  }
  const d = defaultPortion(food, `'${q.text}' names no unit the food table has`);
  return { ...d, grams: round1(n * d.grams), note: `${d.note}, times ${n}` };
}
