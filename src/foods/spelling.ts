/**
 * Pure spelling tolerance for the food search: a word that starts no word of any food name
 * ("wite", "procesed", "chese") is replaced by the nearest word of the tables' own vocabulary
 * (the FTS5 index terms), by edit distance with one transposition counted as one edit; among
 * equally near words the one more foods carry wins, so common foods are preferred ("wite" is
 * read as "white", not "wine").
 */

export interface SpellingTerm {
  term: string;
  /** How many foods carry the term in their names. */
  docs: number;
}

export interface Correction {
  from: string;
  to: string;
  distance: number;
}

/**
 * Words of food names that name no food ("with", "prepared"): never offered as a correction, or
 * "wite bread" would read as "with bread".
 */
const FUNCTION_WORDS = new Set(
  (
    'with without and or the of in on from for to by as at a an added made prepared includes ' +
    'include including type types style than other others not all only per'
  ).split(' '),
);

/** Words shorter than this are left alone (a partial word typed so far, or too short to tell). */
const MIN_WORD = 4;

/** The most edits allowed: one for words of up to 5 letters, two for longer ones. */
export function maxEdits(word: string): number {
  return word.length <= 5 ? 1 : 2;
}

/** Optimal string alignment distance, stopping early once it must exceed `max`. */
export function editDistance(a: string, b: string, max: number): number {
  if (Math.abs(a.length - b.length) > max) return max + 1;
  const rows = a.length + 1;
  const cols = b.length + 1;
  let prev2 = new Array<number>(cols).fill(0);
  let prev = Array.from({ length: cols }, (_, j) => j);
  for (let i = 1; i < rows; i++) {
    const cur = new Array<number>(cols).fill(0);
    cur[0] = i;
    let rowMin = cur[0];
    for (let j = 1; j < cols; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min(
        (prev[j] as number) + 1,
        (cur[j - 1] as number) + 1,
        (prev[j - 1] as number) + cost,
      );
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1])
        d = Math.min(d, (prev2[j - 2] as number) + 1);
      cur[j] = d;
      if (d < rowMin) rowMin = d;
    }
    if (rowMin > max) return max + 1;
    prev2 = prev;
    prev = cur;
  }
  return prev[cols - 1] as number;
}

export class SpellingIndex {
  /** Terms sorted, for the prefix test. */
  private readonly sorted: string[];
  private readonly docs: Map<string, number>;
  /** Terms by their first letter (a first letter is rarely mistyped) and by length. */
  private readonly byFirst = new Map<string, SpellingTerm[]>();

  constructor(terms: readonly SpellingTerm[]) {
    this.sorted = terms.map((t) => t.term).sort();
    this.docs = new Map(terms.map((t) => [t.term, t.docs]));
    for (const t of terms) {
      if (t.term.length < 2 || /\d/.test(t.term) || FUNCTION_WORDS.has(t.term)) continue;
      const k = t.term[0] as string;
      const list = this.byFirst.get(k) ?? [];
      list.push(t);
      this.byFirst.set(k, list);
    }
  }

  /** Some term starts with the word (the search matches word prefixes). */
  known(word: string): boolean {
    let lo = 0;
    let hi = this.sorted.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((this.sorted[mid] as string) < word) lo = mid + 1;
      else hi = mid;
    }
    return this.sorted[lo]?.startsWith(word) ?? false;
  }

  /** The nearest common term for an unknown word, or null (known, too short or nothing near). */
  correct(word: string): Correction | null {
    if (word.length < MIN_WORD || /\d/.test(word) || this.known(word)) return null;
    const max = maxEdits(word);
    let best: { t: SpellingTerm; d: number } | null = null;
    for (const t of this.byFirst.get(word[0] as string) ?? []) {
      const d = editDistance(word, t.term, max);
      if (d > max) continue;
      if (!best || d < best.d || (d === best.d && t.docs > best.t.docs)) best = { t, d };
    }
    return best ? { from: word, to: best.t.term, distance: best.d } : null;
  }

  /** Every unknown word of the list corrected where a near term exists. */
  correctWords(words: readonly string[]): { words: string[]; corrections: Correction[] } {
    const corrections: Correction[] = [];
    const out = words.map((w) => {
      const c = this.correct(w);
      if (c) corrections.push(c);
      return c ? c.to : w;
    });
    return { words: out, corrections };
  }

  get size(): number {
    return this.docs.size;
  }
}
