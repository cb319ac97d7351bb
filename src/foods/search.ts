import { nameWords, searchWords } from './text.js';

export interface RankCandidate {
  id: number;
  name: string;
  kind: 'generic' | 'branded';
  /** Position in the FTS bm25 order (0 = best). */
  ftsOrder: number;
}

/**
 * Ranks FTS candidates for type-ahead: a main name that starts with the first word comes first,
 * then a main name with every word at a word start, then matches on alternate names only;
 * generic before branded; shorter names before longer; bm25 order breaks ties.
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
  const scored = candidates.map((c) => {
    const tier = tierOfWords(words, c);
    return { c, tier, kind: c.kind === 'generic' ? 0 : 1, len: c.name.length };
  });
  scored.sort(
    (a, b) => a.tier - b.tier || a.kind - b.kind || a.len - b.len || a.c.ftsOrder - b.c.ftsOrder,
  );
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
