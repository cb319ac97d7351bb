/**
 * The labelled diary lines (invented demo data, labelled with USDA SR28 NDB numbers) and a
 * runner that measures top-1 accuracy of the diary matcher against a database holding SR28.
 * Shared by the accuracy test and the benchmark.
 */
import { readFileSync } from 'node:fs';
import type { Db } from '../../src/db/database.js';
import { DiaryMatcher } from '../../src/diary/matching.service.js';
import { splitQuantity } from '../../src/diary/quantity.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FoodService } from '../../src/foods/foods.service.js';

export interface LabelledLine {
  text: string;
  ndb: string;
}

export function labelledLines(): LabelledLine[] {
  const file = new URL('../fixtures/diary/labelled-lines.tsv', import.meta.url);
  return readFileSync(file, 'utf8')
    .split('\n')
    .filter((l) => l && !l.startsWith('#'))
    .map((l) => {
      const [text, ndb] = l.split('\t');
      return { text: text as string, ndb: ndb as string };
    });
}

export interface AccuracyResult {
  total: number;
  correct: number;
  accuracy: number;
  misses: { text: string; expected: string; got: string | null; gotName: string | null }[];
}

/** A matcher over the database's foods (FoodService search and code lookup). */
export function matcherFor(db: Db): DiaryMatcher {
  const repo = new FoodRepository(db.kysely);
  const service = new FoodService(repo);
  return new DiaryMatcher({
    search: (q) => service.search(q),
    findIdsByCode: (code) => repo.findIdsByCode(code),
    getFoods: (ids) => repo.getFoods(ids),
    correctWords: (words) => service.correctWords(words),
  });
}

export async function measureAccuracy(db: Db, lines = labelledLines()): Promise<AccuracyResult> {
  const matcher = matcherFor(db);
  const misses: AccuracyResult['misses'] = [];
  let correct = 0;
  for (const l of lines) {
    const { foodText } = splitQuantity(l.text);
    const m = await matcher.match({ foodText, barcode: null });
    if (m.food?.code === l.ndb) correct++;
    else
      misses.push({
        text: l.text,
        expected: l.ndb,
        got: m.food?.code ?? null,
        gotName: m.food?.name ?? null,
      });
  }
  return { total: lines.length, correct, accuracy: correct / lines.length, misses };
}
