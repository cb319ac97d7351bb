import type { Food, FoodSearchQuery } from './food.js';
import type { FoodRepository } from './foods.repository.js';
import { rankCandidates } from './search.js';
import { ftsPrefixQuery, searchWords } from './text.js';

/** How many FTS candidates of each kind the ranking looks at (bounded cost on large sets). */
const GENERIC_CANDIDATES = 2000;
const BRANDED_CANDIDATES = 300;

export class FoodService {
  constructor(private readonly repo: FoodRepository) {}

  /** Type-ahead search: code/barcode matches first, then ranked FTS prefix matches. */
  async search(query: FoodSearchQuery): Promise<Food[]> {
    const ids: number[] = [];
    const text = query.q.trim();
    if (/^[\w.-]{2,20}$/.test(text) && /\d/.test(text)) {
      ids.push(...(await this.repo.findIdsByCode(text, query.source)));
    }
    const words = searchWords(text);
    if (words.length > 0) {
      const fts = ftsPrefixQuery(words);
      const generic = await this.repo.ftsCandidates({
        ftsQuery: fts,
        kind: 'generic',
        limit: GENERIC_CANDIDATES,
        source: query.source,
        group: query.group,
      });
      const rankedGeneric = rankCandidates(
        text,
        generic.map((c, i) => ({ ...c, ftsOrder: i })),
      );
      for (const c of rankedGeneric) ids.push(c.id);
      if (rankedGeneric.length < query.limit) {
        const branded = await this.repo.ftsCandidates({
          ftsQuery: fts,
          kind: 'branded',
          limit: BRANDED_CANDIDATES,
          source: query.source,
          group: query.group,
        });
        const rankedBranded = rankCandidates(
          text,
          branded.map((c, i) => ({ ...c, ftsOrder: i })),
        );
        for (const c of rankedBranded) ids.push(c.id);
      }
    }
    const top = [...new Set(ids)].slice(0, query.limit);
    const foods = await this.repo.getFoods(top);
    return top.map((id) => foods.get(id)).filter((f): f is Food => f !== undefined);
  }
}
