// Benchmark registry: no expected values, so no source to name (figures only).
import { importBench } from './import.js';
import { phosphorusBench } from './phosphorus.js';
import { searchBench } from './search.js';
import { plansBench } from './plans.js';
import { webBench } from './web.js';
import { loadBench } from './load.js';
import { handoutsBench } from './handouts.js';
import { diaryBench } from './diary.js';
import { startupBench } from './startup.js';
import { searchListBench } from './search-list.js';
import { balanceBench } from './balance.js';

/** One benchmark section; each area adds its own file and registers it here. */
export interface BenchSection {
  name: string;
  title: string;
  run(): Promise<void>;
}

export const sections: BenchSection[] = [];
sections.push(plansBench);
sections.push(webBench);
sections.push(phosphorusBench);
sections.push(loadBench);
sections.push(importBench);
sections.push(handoutsBench);
sections.push(diaryBench);
sections.push(searchBench);
sections.push(startupBench);
sections.push(searchListBench);
sections.push(balanceBench);
