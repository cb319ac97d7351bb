/**
 * The generic foods' names held in memory, answering the two candidate queries of the food search
 * exactly as SQLite does (same rows, same order), without a query per search. Pure: it is built
 * from rows the repository read (`FoodRepository.loadNameIndexSource`) and touches no database.
 *
 * - `nameStart`: the range scan on the (kind, lower(name)) index: main names whose SQLite
 *   `lower()` (ASCII-only) lies in [prefix, prefix || U+10FFFF), in index order (that key compared
 *   as UTF-8 bytes, i.e. by code point, then id).
 * - `wordCandidates`: the FTS5 query `kind : generic AND ({name alt_names} : ("w1"* "w2"* ...))`
 *   in rowid order: every query word is the prefix of a token of the name or alternate names.
 *   The tokens are those FTS5's tokenizer gives (the loader reads them from SQLite for any text
 *   that is not plain ASCII), so a word matches here exactly when it matches there.
 */
import type { FoodKind } from './food.js';

/** The columns the search reads for a candidate (as `FoodRepository` selects them). */
export interface NameRow {
  id: number;
  name: string;
  alt_names: string;
  kind: FoodKind;
  source_id: number;
}

export interface NameIndexSource {
  /** Foods of the kind with their SQLite `lower(name)`, in (lower(name), id) order. */
  byName: readonly { row: NameRow; key: string }[];
  /** FTS documents of the kind with their distinct tokens, in rowid order. */
  docs: readonly { row: NameRow; tokens: readonly string[] }[];
}

/** Words the index answers for: one FTS token each (the search's ASCII words). */
const PLAIN_WORD = /^[a-z0-9]+$/;

/** Compares as SQLite's BINARY collation does for valid UTF-8: by code point. */
export function compareCodePoints(a: string, b: string): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) {
    const x = a.charCodeAt(i);
    const y = b.charCodeAt(i);
    if (x === y) continue;
    // UTF-16 order differs from code point order only between a surrogate (U+10000 and above)
    // and U+E000-U+FFFF: lift surrogates above the BMP before comparing.
    const sx = x >= 0xd800 && x <= 0xdfff ? x + 0x10000 : x;
    const sy = y >= 0xd800 && y <= 0xdfff ? y + 0x10000 : y;
    return sx - sy;
  }
  return a.length - b.length;
}

export class FoodNameIndex {
  private readonly keys: string[];
  private readonly rows: NameRow[];
  private readonly docRows: NameRow[];
  private readonly docTokens: (readonly string[])[];
  /** Distinct tokens, sorted; `postings[i]` lists the documents (positions, ascending) of `terms[i]`. */
  private readonly terms: string[];
  private readonly postings: Int32Array[];

  constructor(source: NameIndexSource) {
    this.keys = source.byName.map((r) => r.key);
    this.rows = source.byName.map((r) => r.row);
    this.docRows = source.docs.map((d) => d.row);
    this.docTokens = source.docs.map((d) => d.tokens);
    const lists = new Map<string, number[]>();
    source.docs.forEach((d, i) => {
      for (const t of d.tokens) {
        const list = lists.get(t);
        if (list) list.push(i);
        else lists.set(t, [i]);
      }
    });
    this.terms = [...lists.keys()].sort();
    this.postings = this.terms.map((t) => Int32Array.from(lists.get(t) as number[]));
  }

  get size(): number {
    return this.rows.length;
  }

  /** The ids of the indexed foods, in name order. */
  ids(): number[] {
    return this.rows.map((r) => r.id);
  }

  /** Main names starting with `prefix` (see the module comment), at most `limit`. */
  nameStart(prefix: string, limit: number): NameRow[] {
    const upper = `${prefix}\u{10FFFF}`;
    const out: NameRow[] = [];
    for (let i = this.lowerBound(prefix); i < this.keys.length && out.length < limit; i++) {
      if (compareCodePoints(this.keys[i] as string, upper) >= 0) break;
      out.push(this.rows[i] as NameRow);
    }
    return out;
  }

  /**
   * Documents with every word as a token prefix, in rowid order, at most `limit`; null when a
   * word is not one plain token (the caller asks SQLite instead).
   */
  wordCandidates(words: readonly string[], limit: number): NameRow[] | null {
    if (words.length === 0 || !words.every((w) => PLAIN_WORD.test(w))) return null;
    // Walk the documents of the rarest word; check the others on each document's own tokens.
    let best: { from: number; to: number; count: number } | null = null;
    for (const w of words) {
      const range = this.termRange(w);
      if (best === null || range.count < best.count) best = range;
    }
    if (best === null || best.count === 0 || limit <= 0) return [];
    const docs = this.docsOf(best.from, best.to);
    const out: NameRow[] = [];
    for (const d of docs) {
      const tokens = this.docTokens[d] as readonly string[];
      if (words.every((w) => tokens.some((t) => t.startsWith(w)))) {
        out.push(this.docRows[d] as NameRow);
        if (out.length >= limit) break;
      }
    }
    return out;
  }

  private lowerBound(key: string): number {
    let lo = 0;
    let hi = this.keys.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (compareCodePoints(this.keys[mid] as string, key) < 0) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }

  /** The terms starting with `w` (contiguous in sorted order) and how many postings they hold. */
  private termRange(w: string): { from: number; to: number; count: number } {
    let lo = 0;
    let hi = this.terms.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((this.terms[mid] as string) < w) lo = mid + 1;
      else hi = mid;
    }
    let to = lo;
    let count = 0;
    while (to < this.terms.length && (this.terms[to] as string).startsWith(w)) {
      count += (this.postings[to] as Int32Array).length;
      to++;
    }
    return { from: lo, to, count };
  }

  /** The documents of terms [from, to), ascending, each once. */
  private docsOf(from: number, to: number): Int32Array {
    if (to - from === 1) return this.postings[from] as Int32Array;
    let n = 0;
    for (let i = from; i < to; i++) n += (this.postings[i] as Int32Array).length;
    const all = new Int32Array(n);
    n = 0;
    for (let i = from; i < to; i++) {
      all.set(this.postings[i] as Int32Array, n);
      n += (this.postings[i] as Int32Array).length;
    }
    all.sort();
    let k = 0;
    for (let i = 0; i < all.length; i++)
      if (i === 0 || all[i] !== all[k - 1]) all[k++] = all[i] as number;
    return all.subarray(0, k);
  }
}
