/**
 * The project's list of everyday food-search queries (test/fixtures/search/everyday-queries.tsv,
 * invented demo data labelled with USDA SR28 NDB numbers) and a scorer: a query counts when one
 * of its expected foods is in the first 3 hits. Shared by the benchmark and the test.
 */
import { readFileSync } from 'node:fs';
import type { Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FoodService } from '../../src/foods/foods.service.js';

export interface EverydayQuery {
  query: string;
  expected: string[];
  what: string;
}

export function everydayQueries(): EverydayQuery[] {
  const file = new URL('../fixtures/search/everyday-queries.tsv', import.meta.url);
  return readFileSync(file, 'utf8')
    .split('\n')
    .filter((l) => l.trim() && !l.startsWith('#'))
    .map((l) => {
      const [query, ndbs, what] = l.split('\t');
      return { query: query as string, expected: (ndbs as string).split(','), what: what ?? '' };
    });
}

export interface QueryScore {
  total: number;
  inTop3: number;
  misses: { query: string; expected: string; top3: string[] }[];
}

/** Searches each query (limit 12, as the type-ahead shows) and counts expected foods in the top 3. */
export async function scoreEverydayQueries(
  db: Db,
  queries = everydayQueries(),
): Promise<QueryScore> {
  const service = new FoodService(new FoodRepository(db.kysely));
  let inTop3 = 0;
  const misses: QueryScore['misses'] = [];
  for (const q of queries) {
    const hits = await service.search({ q: q.query, limit: 12 });
    const top3 = hits.slice(0, 3);
    if (top3.some((f) => q.expected.includes(f.code))) inTop3++;
    else
      misses.push({
        query: q.query,
        expected: q.what,
        top3: top3.map((f) => `${f.code} ${f.name}`),
      });
  }
  return { total: queries.length, inTop3, misses };
}
