import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ifct2017 } from '../../data-import/ifct2017.js';
import { productsCsv } from '../../data-import/products-csv.js';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import type { FoodKind } from '../../src/foods/food.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { compareCodePoints, FoodNameIndex } from '../../src/foods/name-index.js';
import { searchWords } from '../../src/foods/text.js';
import { labelledLines } from '../diary/labelled-set.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, loadAllSr28Foods } from '../helpers/sr28.js';
import { testFood } from '../helpers/food.js';
import { FIXTURES } from '../import/helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

async function indexOf(repo: FoodRepository, kind: FoodKind): Promise<FoodNameIndex> {
  const source = await repo.loadNameIndexSource(kind);
  if (!source) throw new Error('no bound was given: the source is always built');
  return new FoodNameIndex(source);
}

/**
 * The index must give the rows SQLite gives, in SQLite's order: every case below asks both and
 * compares. The expected values are SQLite's own answers (FTS5 unicode61 tokenizer and the
 * (kind, lower(name)) index), not numbers written here.
 */
async function expectSameAsSql(
  repo: FoodRepository,
  index: FoodNameIndex,
  kind: FoodKind,
  queries: { prefixes: Iterable<string>; wordLists: Iterable<readonly string[]>; limits: number[] },
) {
  let compared = 0;
  for (const limit of queries.limits) {
    for (const prefix of queries.prefixes) {
      const sqlRows = await repo.nameStartCandidates({ prefix, kind, limit });
      expect(index.nameStart(prefix, limit), `name start '${prefix}' limit ${limit}`).toEqual(
        sqlRows,
      );
      compared++;
    }
    const distinct = new Map([...queries.wordLists].map((ws) => [ws.join(' '), ws]));
    for (const words of distinct.values()) {
      const mine = index.wordCandidates(words, limit);
      if (mine === null) continue; // not plain words: the search asks SQLite
      const sqlRows = await repo.wordCandidates({ words, kind, limit });
      expect(mine, `words ${JSON.stringify(words)} limit ${limit}`).toEqual(sqlRows);
      compared++;
    }
  }
  return compared;
}

describe('code point order (SQLite BINARY collation on UTF-8)', () => {
  it('agrees with comparing the UTF-8 bytes, astral characters included', () => {
    // sqlite.org/datatype3.html#collation: BINARY compares with memcmp(); UTF-8 byte order is
    // code point order (RFC 3629 section 1).
    const text = fc.string({ unit: fc.constantFrom('a', 'z', 'É', '\uE000', '\uFFFF', '😀', '𝄞') });
    fc.assert(
      fc.property(text, text, (a, b) => {
        const bytes = Math.sign(Buffer.compare(Buffer.from(a), Buffer.from(b)));
        expect(Math.sign(compareCodePoints(a, b))).toBe(bytes);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('food name index against SQLite (IFCT 2017 + invented tables)', () => {
  let db: Db;
  let repo: FoodRepository;
  beforeAll(async () => {
    db = await openMemoryDb();
    expect((await ifct2017.run(db, undefined, { clock })).ok).toBe(true);
    expect((await usdaSr28.run(db, join(FIXTURES, 'sr28-mini'), { clock })).ok).toBe(true);
    expect((await productsCsv.run(db, join(FIXTURES, 'products-mini.csv'), { clock })).ok).toBe(
      true,
    );
    // Invented names that exercise the tokenizer and the collation: accents, a combining mark,
    // an astral character, punctuation inside words, upper-case non-ASCII (SQLite's lower()
    // leaves it), and a name that is only a prefix of another.
    insertFoods(
      db,
      [
        'Crème fraîche, invented',
        'CRÈME brûlée (invented)',
        'Creme anglaise, invented',
        'Cafe\u0301 con leche, invented',
        'Éclair, invented demo',
        'éclair, lower-case invented',
        'Straße-Brot invented',
        'Tofu😀 snack invented',
        'O\u2019Brien potatoes, invented',
        "Kellogg's-style flakes, invented",
        'Rice',
        'Rice\uFFFF edge, invented',
        'Rice😀 edge, invented',
      ].map((name, i) =>
        testFood({ id: 900_000 + i, name, altNames: i % 2 ? ['Naïve alt name', 'ALT-2'] : [] }),
      ),
      { format: 'invented', name: 'invented names', release: 'demo' },
    );
    repo = new FoodRepository(db.kysely);
  });
  afterAll(async () => db.close());

  it('gives the same candidates in the same order for every kind, prefix and word list', async () => {
    for (const kind of ['generic', 'branded'] as const) {
      const index = await indexOf(repo, kind);
      // Every word of every main name cut at 1, 2, 3 and 6 letters; every word of the main and
      // alternate names cut at 3 letters, and paired with the next word.
      const rows = await db.kysely.selectFrom('food').select(['name', 'alt_names']).execute();
      const prefixes = new Set<string>(['', 'rice', 'rice\uffff', 'creme', 'crè', 'é', 'zzz']);
      const wordLists: string[][] = [['zzzz'], ['rice', 'zzzz'], ['creme', 'fra']];
      for (const r of rows) {
        for (const w of searchWords(r.name))
          for (const len of [1, 2, 3, 6]) prefixes.add(w.slice(0, len));
        const ws = searchWords(`${r.name} ${r.alt_names}`);
        ws.forEach((w, i) => {
          wordLists.push([w.slice(0, 3)]);
          const next = ws[i + 1];
          if (next) wordLists.push([w, next.slice(0, 2)], [next.slice(0, 4), w.slice(0, 1)]);
        });
      }
      const compared = await expectSameAsSql(repo, index, kind, {
        prefixes,
        wordLists,
        limits: [400, 3],
      });
      expect(compared).toBeGreaterThan(1000);
    }
  });

  it('leaves a query word that is not one plain token to SQLite', async () => {
    const index = await indexOf(repo, 'generic');
    expect(index.wordCandidates(['crème'], 10)).toBeNull();
    expect(index.wordCandidates(['rice-style'], 10)).toBeNull();
    expect(index.wordCandidates(['rice'], 10)?.length).toBeGreaterThan(0);
  });

  it('reads FTS5 tokens for text that is not plain ASCII (IFCT local names in Indic scripts)', async () => {
    const index = await indexOf(repo, 'generic');
    // The invented "Crème fraîche": FTS5 removes the diacritics (remove_diacritics 2).
    expect(index.wordCandidates(['creme', 'fraiche'], 10)?.map((r) => r.name)).toEqual([
      'Crème fraîche, invented',
    ]);
    // The combining acute in "Cafe\u0301" is dropped too: "cafe con" finds it.
    expect(index.wordCandidates(['cafe', 'con'], 10)?.map((r) => r.name)).toEqual([
      'Cafe\u0301 con leche, invented',
    ]);
  });
});

describe.skipIf(!hasSr28)('food name index against SQLite (full USDA SR28)', () => {
  let db: Db;
  let repo: FoodRepository;
  beforeAll(async () => {
    db = await openMemoryDb();
    insertFoods(db, [...loadAllSr28Foods().values()]);
    repo = new FoodRepository(db.kysely);
  });
  afterAll(async () => db?.close());

  it('gives the same candidates as SQLite for the labelled diary phrases and name prefixes', async () => {
    const index = await indexOf(repo, 'generic');
    // USDA SR28 FOOD_DES: 8,789 foods, all generic here.
    expect(index.size).toBe(8789);
    const prefixes = new Set<string>();
    const wordLists: string[][] = [];
    for (const { text } of labelledLines()) {
      const ws = searchWords(text);
      for (const w of ws) for (const len of [1, 2, 3, 5]) prefixes.add(w.slice(0, len));
      wordLists.push(ws, ...ws.map((w) => [w]));
      for (let i = 0; i + 1 < ws.length; i++)
        wordLists.push([ws[i] as string, ws[i + 1] as string]);
    }
    const compared = await expectSameAsSql(repo, index, 'generic', {
      prefixes,
      wordLists,
      limits: [400, 40],
    });
    expect(compared).toBeGreaterThan(2000);
  });
});

if (!hasSr28) console.log(SR28_MISSING);
