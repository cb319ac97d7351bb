import type { Food, FoodSearchQuery } from './food.js';
import type { FoodRepository } from './foods.repository.js';
import { compareKeys, rankByWords, rankKey, tierOfWords, type RankCandidate } from './search.js';
import { SpellingIndex, type Correction } from './spelling.js';
import { synonymQueries } from './synonyms.js';
import { searchWords } from './text.js';

/**
 * How many candidates of each kind and tier the ranking looks at: bounded work on a million
 * branded foods. In USDA SR28 97 main names start with "cheese" (all ranked) and 967 with "beef"
 * (the first 400 in alphabetical order are ranked: a second word narrows it at once).
 */
const CANDIDATES = { generic: 400, branded: 200 } as const;
/**
 * Branded FTS candidates beyond the name-start tier: an FTS5 AND of two common words reads both
 * doclists until it has this many (15 ms for "chicken br" in a million foods at 200, 2 ms at 60).
 */
const BRANDED_FTS_CANDIDATES = 60;

/** Words of a candidate's main and alternate names, kept per row object (index rows persist). */
const rowWords = new WeakMap<object, readonly string[]>();

/** Every query word starts a word of the name or of an alternate name (as FTS prefix matching). */
function hasAllWords(words: readonly string[], row: { name: string; alt_names: string }): boolean {
  if (words.length === 1) return true; // the range scan matched the first word already
  let have = rowWords.get(row);
  if (have === undefined) {
    have = searchWords(`${row.name} ${row.alt_names}`);
    rowWords.set(row, have);
  }
  const all = have;
  return words.every((w) => all.some((h) => h.startsWith(w)));
}

/** How much plainer a food found through a synonym ranks (in plainness.ts penalty points). */
const SYNONYM_PREFERENCE = 2;

/** The vocabulary per database and state of the food tables (built once, on first need). */
const spellingByDb = new WeakMap<object, { stamp: string; index: Promise<SpellingIndex> }>();

export class FoodService {
  constructor(private readonly repo: FoodRepository) {}

  /**
   * Type-ahead search: a food whose code or barcode is the text comes first, then FTS prefix
   * matches ranked by rankCandidates (main name starts with the first word, generic before
   * branded, ready-to-eat forms first, shorter names first), merged with the matches of the
   * product's synonyms (synonyms.ts). When nothing matches, words that start no word of any
   * food name are read as the nearest common word of the tables (spelling.ts) and searched again.
   */
  async search(query: FoodSearchQuery): Promise<Food[]> {
    const ids: number[] = [];
    const text = query.q.trim();
    if (/^[\w.-]{2,20}$/.test(text) && /\d/.test(text)) {
      ids.push(...(await this.repo.findIdsByCode(text, query.source)));
    }
    const words = searchWords(text);
    if (words.length > 0) {
      let ranked = await this.rankedWithSynonyms(words, query);
      if (ranked.length === 0 && ids.length === 0) {
        const fixed = (await this.spelling()).correctWords(words);
        if (fixed.corrections.length > 0)
          ranked = await this.rankedWithSynonyms(fixed.words, query);
      }
      for (const c of ranked) ids.push(c.id);
    }
    const top = [...new Set(ids)].slice(0, query.limit);
    const foods = await this.repo.getFoods(top);
    return top.map((id) => foods.get(id)).filter((f): f is Food => f !== undefined);
  }

  /**
   * Words with unknown words replaced by the nearest common word of the food tables, and what
   * was replaced (empty when every word is known).
   */
  async correctWords(
    words: readonly string[],
  ): Promise<{ words: string[]; corrections: Correction[] }> {
    return (await this.spelling()).correctWords(words);
  }

  private async spelling(): Promise<SpellingIndex> {
    const key = this.repo.cacheKey();
    const stamp = await this.repo.tablesStamp();
    let hit = spellingByDb.get(key);
    if (!hit || hit.stamp !== stamp) {
      hit = { stamp, index: this.repo.spellingTerms().then((t) => new SpellingIndex(t)) };
      spellingByDb.set(key, hit);
    }
    return hit.index;
  }

  /** The words' candidates and each synonym rewrite's, merged by their own rank keys. */
  private async rankedWithSynonyms(
    words: readonly string[],
    query: FoodSearchQuery,
  ): Promise<RankCandidate[]> {
    const lists = [words, ...synonymQueries(words)];
    if (lists.length === 1) return this.ranked(words, query);
    const best = new Map<number, { c: RankCandidate; key: number[] }>();
    for (const [i, ws] of lists.entries()) {
      for (const c of await this.ranked(ws, query)) {
        const key = rankKey(ws, c);
        // A synonym says what the words mean: its foods come first among equally named ones.
        if (i > 0) key[2] = (key[2] as number) - SYNONYM_PREFERENCE;
        const had = best.get(c.id);
        if (!had || compareKeys(key, had.key) < 0) best.set(c.id, { c, key });
      }
    }
    return [...best.values()].sort((a, b) => compareKeys(a.key, b.key)).map((x) => x.c);
  }

  /** FTS candidates of the words, ranked (generic first; branded only when needed). */
  private async ranked(words: readonly string[], query: FoodSearchQuery): Promise<RankCandidate[]> {
    const candidates: RankCandidate[] = [];
    let ranked: RankCandidate[] = [];
    for (const kind of ['generic', 'branded'] as const) {
      const limit = CANDIDATES[kind];
      const ftsLimit = kind === 'branded' ? Math.max(BRANDED_FTS_CANDIDATES, query.limit) : limit;
      const fetch = () =>
        this.repo.wordCandidates({
          words,
          kind,
          limit: ftsLimit,
          source: query.source,
          group: query.group,
        });
      // Main names starting with the first word (index range scan), kept when every other
      // word is there too; then any FTS match.
      const starts = await this.repo.nameStartCandidates({
        prefix: words[0] as string,
        kind,
        limit,
        source: query.source,
        group: query.group,
      });
      const first = starts.filter((c) => hasAllWords(words, c));
      // When the range scan ended below its limit, every main name starting with the first
      // word is in hand; if enough of them are first-tier to fill the page, FTS matches (lower
      // tiers only) cannot reach it, so the FTS query is skipped.
      const pageFull =
        starts.length < limit &&
        first.filter((c) => tierOfWords(words, c) === 0).length >= query.limit;
      const rest = first.length >= limit || pageFull ? [] : await fetch();
      const seen = new Set<number>();
      for (const c of [...first, ...rest]) {
        if (seen.has(c.id)) continue;
        seen.add(c.id);
        candidates.push({
          id: c.id,
          name: c.name,
          kind: c.kind,
          ftsOrder: candidates.length,
          altNames: c.alt_names,
        });
      }
      // Branded foods rank below generic ones of the same tier: once generic foods fill the
      // page with main-name matches, no branded food can make it.
      ranked = rankByWords(words, candidates);
      if (kind === 'generic') {
        const topTier = ranked.slice(0, query.limit).every((c) => tierOfWords(words, c) === 0);
        if (ranked.length >= query.limit && topTier) break;
      }
    }
    return ranked;
  }
}
