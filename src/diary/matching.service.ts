import type { Food } from '../foods/food.js';
import {
  MIN_MATCH_COVERAGE,
  matchConfidence,
  memoryKey,
  prepareQuery,
  scoreFood,
  searchTexts,
  sortScored,
  spellingVariants,
  stem,
  type PreparedQuery,
  type ScoredFood,
} from './matcher.js';

/** The food-table access the matcher needs (FoodService + FoodRepository satisfy it). */
export interface FoodFinder {
  search(q: { q: string; limit: number }): Promise<Food[]>;
  /** Unknown words read as the nearest common word of the tables (FoodService.correctWords). */
  correctWords?(
    words: readonly string[],
  ): Promise<{ words: string[]; corrections: { from: string; to: string }[] }>;
  findIdsByCode(code: string): Promise<number[]>;
  getFoods(ids: readonly number[]): Promise<Map<number, Food>>;
}

/** The clinic's remembered matches: diary phrase key -> food id. */
export interface MatchMemory {
  lookup(keys: readonly string[]): Promise<Map<string, number>>;
}

export type MatchMethod = 'barcode' | 'remembered' | 'text' | 'none';

export interface Candidate {
  foodId: number;
  name: string;
  confidence: number;
}

export interface EntryMatch {
  food: Food | null;
  method: MatchMethod;
  confidence: number;
  /** Runner-up foods, best first (for the dietitian to pick from). */
  candidates: Candidate[];
  /** Why the match is what it is, when that needs saying (barcode not found, weak match). */
  notes: string[];
}

const SEARCH_LIMIT = 40;
/** Confidence kept per word read with another spelling (the product's own factor, no source). */
const SPELLING_CONFIDENCE = 0.85;
const RUNNERS_UP = 4;

/**
 * Matches diary entries to foods: barcode first, then the clinic's remembered choice for the same
 * words, then the food search scored by the diary scorer. Results are cached per phrase, so a
 * diary that repeats a food costs one search.
 */
export class DiaryMatcher {
  private readonly cache = new Map<string, Promise<EntryMatch>>();

  constructor(
    private readonly foods: FoodFinder,
    private readonly memory: MatchMemory | null = null,
  ) {}

  async match(entry: { foodText: string; barcode: string | null }): Promise<EntryMatch> {
    const key = `${entry.barcode ?? ''}|${memoryKey(entry.foodText)}`;
    let hit = this.cache.get(key);
    if (!hit) {
      hit = this.matchUncached(entry);
      this.cache.set(key, hit);
    }
    return hit;
  }

  /**
   * Replaces (in place) the query's words that start no word of any food name with the nearest
   * common word of the tables; returns what it replaced.
   */
  private async correctSpelling(q: PreparedQuery): Promise<{ from: string; to: string }[]> {
    if (!this.foods.correctWords || q.words.length === 0) return [];
    const fixed = await this.foods.correctWords(q.words);
    if (fixed.corrections.length === 0) return [];
    const map = new Map(fixed.corrections.map((c) => [c.from, stem(c.to)]));
    q.words = [...new Set(q.words.map((w) => map.get(w) ?? w))];
    q.headWords = [...new Set(q.headWords.map((w) => map.get(w) ?? w))];
    return fixed.corrections;
  }

  private async matchUncached(entry: {
    foodText: string;
    barcode: string | null;
  }): Promise<EntryMatch> {
    const notes: string[] = [];
    if (entry.barcode) {
      const ids = await this.foods.findIdsByCode(entry.barcode);
      const found = await this.foods.getFoods(ids.slice(0, 1));
      const food = ids[0] === undefined ? undefined : found.get(ids[0]);
      if (food) return { food, method: 'barcode', confidence: 1, candidates: [], notes };
      notes.push(`barcode ${entry.barcode} is not in the food tables; matched by name`);
    }
    const key = memoryKey(entry.foodText);
    if (this.memory && key) {
      const remembered = (await this.memory.lookup([key])).get(key);
      if (remembered !== undefined) {
        const food = (await this.foods.getFoods([remembered])).get(remembered);
        if (food) {
          notes.push('matched as the clinic confirmed before for the same words');
          return { food, method: 'remembered', confidence: 1, candidates: [], notes };
        }
      }
    }
    const q = prepareQuery(entry.foodText);
    const corrected = await this.correctSpelling(q);
    if (corrected.length > 0) {
      notes.push(
        `spelling read as ${corrected.map((c) => `'${c.from}' -> '${c.to}'`).join(', ')}: check the food`,
      );
    }
    if (q.words.length === 0) {
      notes.push('no food words to search for');
      return { food: null, method: 'none', confidence: 0, candidates: [], notes };
    }
    // Each food found is scored once, however many search texts find it (the order is total:
    // score, name length, id, so sorting the growing list gives what ranking them all would).
    const scored = new Map<number, ScoredFood<Food>>();
    let best: ScoredFood<Food>[] = [];
    for (const text of searchTexts(q)) {
      for (const t of [text, ...spellingVariants(text)]) {
        const found = await this.foods.search({ q: t, limit: SEARCH_LIMIT });
        for (const f of found) {
          if (!scored.has(f.id)) scored.set(f.id, scoreFood(q, f) as ScoredFood<Food>);
        }
      }
      best = sortScored([...scored.values()]);
      // Stop once every query word is covered by the best food.
      if (best[0] && best[0].coverage >= 1) break;
    }
    const top = best[0];
    const candidates = best.slice(top ? 1 : 0, RUNNERS_UP + 1).map((s, i, arr) => ({
      foodId: s.food.id,
      name: s.food.name,
      confidence: matchConfidence(s, arr[i + 1]),
    }));
    if (!top || top.coverage < MIN_MATCH_COVERAGE) {
      notes.push(
        top
          ? `no food name covers enough of '${entry.foodText.slice(0, 80)}'`
          : `no food found for '${entry.foodText.slice(0, 80)}'`,
      );
      const all = best.slice(0, RUNNERS_UP).map((s, i, arr) => ({
        foodId: s.food.id,
        name: s.food.name,
        confidence: matchConfidence(s, arr[i + 1]),
      }));
      return { food: null, method: 'none', confidence: 0, candidates: all, notes };
    }
    // A word read with another spelling is a guess: the confidence says so.
    const confidence =
      Math.round(matchConfidence(top, best[1]) * SPELLING_CONFIDENCE ** corrected.length * 100) /
      100;
    if (q.dropped.length > 0) {
      notes.push(
        `only the first food was matched; '${q.dropped.join(' ').slice(0, 60)}' is not counted: enter it as its own line`,
      );
    }
    if (confidence < 0.6) notes.push('weak match: check the food');
    return { food: top.food, method: 'text', confidence, candidates, notes };
  }
}
