import type { Kysely } from 'kysely';
import type { Clock } from '../clock.js';
import type { DB } from '../db/schema.js';
import { AppError, NotFoundError } from '../errors.js';
import type { Food } from '../foods/food.js';
import {
  baseLanguage,
  glossaryToCsv,
  parseGlossaryCsv,
  type FoodNameSources,
  type GlossaryEntry,
  type GlossaryEntryInput,
} from './glossary.js';
import { GlossaryRepository } from './glossary.repository.js';
import { starterGlossary, type StarterGlossary } from './starter.js';

/** The clinic glossary: names kept across patients, CSV in and out, names for handouts. */
export class GlossaryService {
  private readonly repo: GlossaryRepository;

  constructor(
    db: Kysely<DB>,
    private readonly clock: Clock,
    /** The handout languages there are (the catalogues). */
    private readonly languages: readonly string[],
    private readonly starter: StarterGlossary = starterGlossary(),
  ) {
    this.repo = new GlossaryRepository(db);
  }

  private checkLanguage(language: string): string {
    const hit = this.languages.find((l) => l.toLowerCase() === language.toLowerCase());
    if (!hit) {
      throw new AppError(
        'PHL_GLOSSARY_LANGUAGE_UNKNOWN',
        400,
        `'${language}' is not a handout language (${this.languages.join(', ')})`,
        { language, available: [...this.languages] },
      );
    }
    return hit;
  }

  /** The clinic's entries, and for the foods asked about the starter's drafted names too. */
  async list(opts: { language?: string | undefined; foods?: readonly Food[] } = {}) {
    const language = opts.language ? this.checkLanguage(opts.language) : undefined;
    const foodIds = opts.foods?.map((f) => f.id);
    const rows = await this.repo.list({ language, ...(foodIds ? { foodIds } : {}) });
    const out: GlossaryEntry[] = rows.map((r) => ({ ...r, origin: 'clinic' }));
    if (opts.foods) {
      const have = new Set(rows.map((r) => `${r.foodId}|${r.language}`));
      for (const food of opts.foods) {
        for (const lang of language ? [language] : this.languages) {
          const name = this.starter.name(food.source, food.code, lang);
          if (!name || have.has(`${food.id}|${lang}`)) continue;
          out.push({
            foodId: food.id,
            foodSource: food.source,
            foodCode: food.code,
            tableName: food.name,
            language: lang,
            name,
            status: 'drafted',
            origin: 'starter',
          });
        }
      }
    }
    return out;
  }

  async set(foodId: number, language: string, input: GlossaryEntryInput, by: number | null) {
    const lang = this.checkLanguage(language);
    const known = await this.repo.findFoodById(foodId);
    if (!known) throw new NotFoundError('food', foodId);
    await this.repo.upsert(
      { foodId, language: lang, ...input },
      by,
      this.clock.now().toISOString(),
    );
    return { foodId, language: lang, name: input.name, status: input.status };
  }

  async remove(foodId: number, language: string): Promise<void> {
    const lang = this.checkLanguage(language);
    if (!(await this.repo.remove(foodId, lang))) {
      throw new NotFoundError('glossary entry', `${foodId}/${lang}`);
    }
  }

  async exportCsv(language?: string): Promise<string> {
    return glossaryToCsv(await this.list({ language }));
  }

  /**
   * Imports a glossary CSV whole or not at all: every line is checked (format, language,
   * food found by source and code) before anything is written.
   */
  async importCsv(text: string, by: number | null): Promise<{ imported: number }> {
    const parsed = parseGlossaryCsv(text, this.languages);
    if (!parsed.ok) throw glossaryImportError(parsed.issues);
    const ids = await this.repo.findFoods(parsed.value);
    const missing = parsed.value.filter((r) => !ids.has(`${r.foodSource}|${r.foodCode}`));
    if (missing.length > 0) {
      throw glossaryImportError(
        missing.map((r) => ({
          line: r.line,
          message: `no food ${r.foodCode} in a ${r.foodSource} table here (import that table first)`,
        })),
      );
    }
    const entries = parsed.value.map((r) => ({
      foodId: ids.get(`${r.foodSource}|${r.foodCode}`) as number,
      language: r.language,
      name: r.name,
      status: r.status,
    }));
    await this.repo.upsertMany(entries, by, this.clock.now().toISOString());
    return { imported: entries.length };
  }

  /** Everything known of the foods' names in one language, for a handout. */
  async nameSources(
    foods: readonly Food[],
    language: string,
  ): Promise<Map<number, FoodNameSources>> {
    const ids = foods.map((f) => f.id);
    const lang = this.languages.find((l) => l.toLowerCase() === language.toLowerCase()) ?? language;
    const [clinic, local] = await Promise.all([
      this.repo.list({ language: lang, foodIds: ids }),
      this.repo.localNames(ids, [...new Set([lang, baseLanguage(lang)])]),
    ]);
    const out = new Map<number, FoodNameSources>();
    for (const food of foods) {
      const c = clinic.find((r) => r.foodId === food.id);
      const own =
        local.find((r) => r.foodId === food.id && r.language === lang) ??
        local.find((r) => r.foodId === food.id);
      out.set(food.id, {
        foodName: food.name,
        clinic: c ? { name: c.name, status: c.status } : null,
        tableLanguage: own?.name ?? null,
        starter: this.starter.name(food.source, food.code, lang),
      });
    }
    return out;
  }
}

function glossaryImportError(issues: readonly { line: number; message: string }[]): AppError {
  const shown = issues.slice(0, 20).map((i) => `line ${i.line}: ${i.message}`);
  return new AppError(
    'PHL_GLOSSARY_CSV_INVALID',
    400,
    `the food-name file was not imported (nothing changed): ${shown.join('; ')}${issues.length > 20 ? `; and ${issues.length - 20} more` : ''}`,
    { issues: issues.slice(0, 200) },
  );
}
