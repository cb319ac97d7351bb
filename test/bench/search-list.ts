/**
 * Search quality: the project's 50 everyday queries (test/fixtures/search/everyday-queries.tsv)
 * on the full USDA SR28 release, imported by the real importer; a query counts when an expected
 * food is in the first 3 hits. Goal: 45 of 50. Prints the misses and the time per query.
 */
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { openMemoryDb } from '../../src/db/database.js';
import { scoreEverydayQueries } from '../foods/everyday-queries.js';
import { hasSr28, SR28_DIR, SR28_MISSING } from '../helpers/shared.js';
import type { BenchSection } from './sections.js';
import { fmt } from './stats.js';

export const searchListBench: BenchSection = {
  name: 'search-list',
  title: 'food search: 50 everyday queries, expected food in the top 3 (full USDA SR28)',
  async run() {
    if (!hasSr28) {
      console.log(`   ${SR28_MISSING}`);
      return;
    }
    const db = await openMemoryDb();
    await usdaSr28.run(db, SR28_DIR);
    await scoreEverydayQueries(db); // warm: the spelling vocabulary is built on first need
    const t = performance.now();
    const r = await scoreEverydayQueries(db);
    const ms = performance.now() - t;
    console.log(
      `   ${r.inTop3} of ${r.total} queries find an expected food in the top 3 ` +
        `(goal 45: ${r.inTop3 >= 45 ? 'met' : 'NOT met'}); ${fmt(ms / r.total, 2)} ms per query`,
    );
    for (const m of r.misses)
      console.log(`   miss: '${m.query}' (expected ${m.expected}); top 3: ${m.top3.join(' | ')}`);
    await db.close();
  },
};
