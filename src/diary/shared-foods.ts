/**
 * What diary audits keep between audits, per database connection and per state of the food
 * tables: search results, swaps, loaded foods and the name indexes. See docs/diary-audits.md
 * on why the name index gives exactly SQLite's candidates.
 */
import { sql } from 'kysely';
import type { Db } from '../db/database.js';
import type { Food, FoodKind } from '../foods/food.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { FoodNameIndex, type NameRow } from '../foods/name-index.js';
import type { DiarySwap } from './findings.js';

/**
 * Search results shared by every audit while the food tables stay the same (a diary names the
 * same few hundred foods again and again); dropped whole when a table is imported or removed.
 */
export interface SharedCache {
  stamp: string;
  results: Map<string, Promise<Food[]>>;
  /** Swaps by food id and settings (they depend on the tables and the absorption settings). */
  swaps: Map<string, Promise<DiarySwap | null>>;
  /** Foods by id, as search hits and swap candidates load them. */
  foods: Map<number, Food>;
  /** Spelling corrections of diary words, by the words (FoodService.correctWords). */
  spelling: Map<string, Promise<{ words: string[]; corrections: { from: string; to: string }[] }>>;
  /** Each kind's names in memory, once built (null when too many or not buildable). */
  names: Map<FoodKind, NameSlot>;
}

interface NameSlot {
  /** Set when the build has finished: the index, or null (the SQL queries answer). */
  index: FoodNameIndex | null | undefined;
  building: Promise<FoodNameIndex | null>;
}
const sharedSearches = new WeakMap<object, SharedCache>();
const MAX_SHARED = 5000;
/** Foods kept for audits (SR28 has 8,789; a bound for larger tables, not a tuned size). */
export const MAX_SHARED_FOODS = 20_000;
/**
 * Foods of one kind held as a name index (a bound on memory, no source: SR28's 8,789 foods take
 * 7.4 MB of heap, measured, so about 40 MB at the bound; a million branded foods stay with SQL).
 */
const MAX_INDEXED_FOODS = 50_000;

/** Resolves in a later event-loop turn: long preparation lets requests in between its steps. */
export const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * The food repository as audits see it: foods come from the shared cache when an earlier search
 * or swap loaded them under the same tables, so the scorer's per-food work is done once; the
 * search's candidate queries are answered from the name index when there is one (it gives the
 * same rows in the same order as SQLite, see foods/name-index.ts).
 */
export class SharedFoodRepository extends FoodRepository {
  /**
   * `buildInBackground`: a missing name index is built in the background when a search finds
   * none (a long-running server); a one-shot process (the CLI) searches with SQL instead, as
   * building costs more than one diary's searches.
   */
  constructor(
    db: Db,
    private readonly shared: SharedCache,
    private readonly buildInBackground: boolean,
  ) {
    super(db.kysely);
  }

  /** The name index of one kind under the current tables, built now if need be. */
  async names(kind: FoodKind): Promise<FoodNameIndex | null> {
    return this.slot(kind).building;
  }

  /** The index when it is built; otherwise null (and, if allowed, starts building it). */
  private readyNames(kind: FoodKind): FoodNameIndex | null {
    const slot = this.shared.names.get(kind) ?? (this.buildInBackground ? this.slot(kind) : null);
    return slot?.index ?? null;
  }

  private slot(kind: FoodKind): NameSlot {
    let slot = this.shared.names.get(kind);
    if (!slot) {
      const made: NameSlot = {
        index: undefined,
        // A later turn: the search that asked goes on with SQL meanwhile. Should the tables
        // change before it runs, the next audit's stamp differs and this cache is dropped whole.
        building: nextTurn()
          .then(() => super.loadNameIndexSource(kind, MAX_INDEXED_FOODS))
          .then(
            (source) => (source ? new FoodNameIndex(source) : null),
            () => null, // e.g. no temporary tables on this connection: SQL still answers
          )
          .then((index) => (made.index = index)),
      };
      slot = made;
      this.shared.names.set(kind, slot);
    }
    return slot;
  }

  override async nameStartCandidates(
    opts: Parameters<FoodRepository['nameStartCandidates']>[0],
  ): Promise<NameRow[]> {
    if (!opts.source && !opts.group) {
      const index = this.readyNames(opts.kind);
      if (index) return index.nameStart(opts.prefix, opts.limit);
    }
    return super.nameStartCandidates(opts);
  }

  override async wordCandidates(
    opts: Parameters<FoodRepository['wordCandidates']>[0],
  ): Promise<NameRow[]> {
    if (!opts.source && !opts.group) {
      const found = this.readyNames(opts.kind)?.wordCandidates(opts.words, opts.limit);
      if (found) return found;
    }
    return super.wordCandidates(opts);
  }

  override async getFoods(ids: readonly number[]): Promise<Map<number, Food>> {
    const { foods } = this.shared;
    const missing = ids.filter((id) => !foods.has(id));
    if (missing.length > 0) {
      if (foods.size + missing.length > MAX_SHARED_FOODS) foods.clear();
      for (const [id, f] of await super.getFoods(missing)) foods.set(id, f);
    }
    const out = new Map<number, Food>();
    for (const id of ids) {
      const f = foods.get(id);
      if (f) out.set(id, f);
    }
    return out;
  }
}

/** The shared cache of the tables as they are now (dropped whole when they have changed). */
export async function sharedFoods(db: Db): Promise<SharedCache> {
  const s = await sql<{
    stamp: string;
  }>`select coalesce(max(id), 0) || ':' || count(*) || ':' || coalesce(sum(food_count), 0) as stamp from food_source`.execute(
    db.kysely,
  );
  const stamp = s.rows[0]?.stamp ?? '';
  let shared = sharedSearches.get(db.sqlite);
  if (!shared || shared.stamp !== stamp) {
    shared = {
      stamp,
      results: new Map(),
      swaps: new Map(),
      foods: new Map(),
      names: new Map(),
      spelling: new Map(),
    };
    sharedSearches.set(db.sqlite, shared);
  } else if (shared.results.size > MAX_SHARED) {
    // Bounded: the remembered searches and swaps start again; foods and names stay.
    shared.results = new Map();
    shared.swaps = new Map();
    shared.spelling = new Map();
  }
  return shared;
}
