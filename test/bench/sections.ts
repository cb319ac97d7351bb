import { plansBench } from './plans.js';

/** One benchmark section; each area adds its own file and registers it here. */
export interface BenchSection {
  name: string;
  title: string;
  run(): Promise<void>;
}

export const sections: BenchSection[] = [];
sections.push(plansBench);
