import { readFileSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import { projectPath } from '../paths.js';

/** The shipped starter glossary (drafted names, never reviewed): templates/glossary/starter.csv. */
export const STARTER_GLOSSARY_FILE = projectPath('templates', 'glossary', 'starter.csv');

export interface StarterRow {
  foodSource: string;
  foodCode: string;
  language: string;
  name: string;
}

/** Drafted names by food (source format and code) and language. */
export class StarterGlossary {
  private readonly byKey = new Map<string, string>();

  constructor(readonly rows: readonly StarterRow[]) {
    for (const r of rows)
      this.byKey.set(StarterGlossary.key(r.foodSource, r.foodCode, r.language), r.name);
  }

  static key(source: string, code: string, language: string): string {
    return `${source}|${code}|${language}`;
  }

  name(source: string, code: string, language: string): string | null {
    return this.byKey.get(StarterGlossary.key(source, code, language)) ?? null;
  }
}

/** Parses the starter CSV (header: food_source, food_code, language, name, ...). Pure. */
export function parseStarterCsv(text: string): StarterRow[] {
  const records = parse(text, { columns: true, skip_empty_lines: true, comment: '#' }) as Array<
    Record<string, string>
  >;
  return records.map((r) => ({
    foodSource: (r.food_source ?? '').trim(),
    foodCode: (r.food_code ?? '').trim(),
    language: (r.language ?? '').trim(),
    name: (r.name ?? '').trim(),
  }));
}

let loaded: StarterGlossary | null = null;

/** The starter glossary, read once per process. */
export function starterGlossary(): StarterGlossary {
  loaded ??= new StarterGlossary(parseStarterCsv(readFileSync(STARTER_GLOSSARY_FILE, 'utf8')));
  return loaded;
}
