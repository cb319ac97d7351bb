import { afterCategory, plainnessPenalty } from './plainness.js';
import { nameWords, searchWords } from './text.js';

export interface RankCandidate {
  id: number;
  name: string;
  kind: 'generic' | 'branded';
  /** Position in the FTS bm25 order (0 = best). */
  ftsOrder: number;
  /** The table's alternate names as stored (a JSON array of strings), when known. */
  altNames?: string;
}

/** Alternate names of a stored row, split into their common names' words (remembered). */
const commonNameWords = new Map<string, readonly (readonly string[])[]>();

function commonNames(altNames: string | undefined): readonly (readonly string[])[] {
  if (!altNames || altNames === '[]') return [];
  let out = commonNameWords.get(altNames);
  if (out === undefined) {
    let list: unknown;
    try {
      list = JSON.parse(altNames);
    } catch {
      list = [altNames];
    }
    const names = Array.isArray(list) ? list.filter((x): x is string => typeof x === 'string') : [];
    out = names.flatMap((n) => n.split(/[,;]/)).map((n) => searchWords(n));
    if (commonNameWords.size > 50_000) commonNameWords.clear();
    commonNameWords.set(altNames, out);
  }
  return out;
}

/** The words are the start of one of the food's common names, in order ("hot dog"). */
function commonNameMatch(words: readonly string[], c: RankCandidate): boolean {
  return commonNames(c.altNames).some(
    (n) => n.length >= words.length && words.every((w, i) => (n[i] as string).startsWith(w)),
  );
}

/**
 * The sort key of a candidate (lower first): name tier, with a common name of the table as
 * good as a main name just after it (and a name after its table category, "Beverages, coffee",
 * as a main name); generic before branded; the plain everyday food first (plainness.ts: whole
 * words, ready-to-eat, no variant, the usual state); shorter names first; bm25 order.
 */
export function rankKey(words: readonly string[], c: RankCandidate): number[] {
  const tier = tierOfWords(words, c);
  let effective: number = tier;
  if (tier > 0) {
    // "Beverages, coffee, brewed": the food after the table's category words heads the name.
    const rest = afterCategory(c.name);
    if (rest !== null && tierOfWords(words, { name: rest }) === 0) effective = 0;
    else if (commonNameMatch(words, c)) effective = 0.5;
  }
  return [
    effective,
    c.kind === 'generic' ? 0 : 1,
    plainnessPenalty(words, c.name),
    c.name.length,
    c.ftsOrder,
  ];
}

export function compareKeys(a: readonly number[], b: readonly number[]): number {
  for (let i = 0; i < a.length; i++) {
    const d = (a[i] as number) - (b[i] as number);
    if (d !== 0) return d;
  }
  return 0;
}

/**
 * Ranks FTS candidates for type-ahead: a main name that starts with the first word comes first,
 * then a common name of the table that starts with the words, then a main name with every word
 * at a word start, then matches on alternate names only; generic before branded; ready-to-eat
 * before dried or powdered forms; shorter names before longer; bm25 order breaks ties.
 */
export function rankCandidates<T extends RankCandidate>(
  query: string,
  candidates: readonly T[],
): T[] {
  return rankByWords(searchWords(query), candidates);
}

/** `rankCandidates` for a query already split into search words. */
export function rankByWords<T extends RankCandidate>(
  words: readonly string[],
  candidates: readonly T[],
): T[] {
  const scored = candidates.map((c) => ({ c, key: rankKey(words, c) }));
  scored.sort((a, b) => compareKeys(a.key, b.key));
  return scored.map((s) => s.c);
}

/**
 * 0: the main name starts with the first word and has every word at a word start; 1: the main
 * name has every word at a word start; 2: otherwise (a match on alternate names only).
 */
export function tierOf(query: string, c: { name: string }): 0 | 1 | 2 {
  return tierOfWords(searchWords(query), c);
}

/** `tierOf` for a query already split into search words. */
export function tierOfWords(words: readonly string[], c: { name: string }): 0 | 1 | 2 {
  const have = nameWords(c.name);
  const first = words[0] ?? '';
  const startsWith = have[0]?.startsWith(first) ?? false;
  const allInName = words.every((w) => have.some((n) => n.startsWith(w)));
  return startsWith && allInName ? 0 : allInName ? 1 : 2;
}

/** Phosphorus-to-protein ratio in mg P per g protein; null when protein is 0 or unknown. */
export function phosphorusProteinRatio(
  phosphorusMg: number | null,
  proteinG: number | null,
): number | null {
  if (phosphorusMg === null || proteinG === null || proteinG <= 0) return null;
  return phosphorusMg / proteinG;
}
