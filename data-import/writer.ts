import type Database from 'better-sqlite3';
import type { Db } from '../src/db/database.js';

/** Provenance of one release of one table. */
export interface SourceMeta {
  format: string;
  name: string;
  release: string;
  licence: string;
  url: string | null;
  importedAt: string;
}

export interface NutrientDefInput {
  code: string;
  name: string;
  unit: string;
  /** INFOODS-style tag (SR28 Tagname) where known: 'P', 'PROCNT', 'ENERC_KCAL', ... */
  tag: string | null;
  sortOrder: number | null;
}

export interface FoodInput {
  code: string;
  name: string;
  altNames: string[];
  group: string | null;
  kind: 'generic' | 'branded';
  brandOwner?: string | null;
  gtin?: string | null;
  ingredients?: string | null;
  ingredientsLang?: string | null;
  servingG?: number | null;
  servingText?: string | null;
  additiveScan?: string | null;
  additiveScanVersion?: string | null;
}

/**
 * The denormalised per-100 g columns and the nutrient tags that fill them, best first, with
 * each tag's unit converted to the column's unit. Energy: kcal as given, else a kJ value / 4.184
 * (thermochemical calorie; FAO 2003 "Food energy: methods of analysis and conversion factors").
 */
const CORE_COLUMNS: Array<{ column: string; unit: string; tags: string[] }> = [
  { column: 'phosphorus_mg', unit: 'mg', tags: ['P'] },
  { column: 'protein_g', unit: 'g', tags: ['PROCNT'] },
  {
    column: 'energy_kcal',
    unit: 'kcal',
    tags: ['ENERC_KCAL', 'ENERC_KCAL_ATWATER_SPECIFIC', 'ENERC_KCAL_ATWATER_GENERAL', 'ENERC_KJ'],
  },
  { column: 'potassium_mg', unit: 'mg', tags: ['K'] },
  { column: 'sodium_mg', unit: 'mg', tags: ['NA'] },
  { column: 'calcium_mg', unit: 'mg', tags: ['CA'] },
  { column: 'water_g', unit: 'g', tags: ['WATER'] },
  { column: 'phytate_mg', unit: 'mg', tags: ['PHYTAC'] },
];

const MASS_IN_G: Record<string, number> = { g: 1, mg: 1e-3, µg: 1e-6, ug: 1e-6, ng: 1e-9 };

/** Factor that turns a value in `from` into `to`, or null when they do not convert. */
export function unitFactor(from: string, to: string): number | null {
  const f = from.trim();
  if (f.toLowerCase() === to.toLowerCase()) return 1;
  const a = MASS_IN_G[f.toLowerCase()] ?? MASS_IN_G[f];
  const b = MASS_IN_G[to];
  if (a !== undefined && b !== undefined) return a / b;
  if (f.toLowerCase() === 'kj' && to === 'kcal') return 1 / 4.184;
  return null;
}

/**
 * Writes one release of one table inside one transaction (better-sqlite3 prepared statements:
 * the fast path). Re-importing the same format and release updates foods in place, keeping their
 * ids (plans and diaries refer to them), replaces their values and portions, and removes foods
 * the new file no longer has. Nothing is visible to other connections until `commit()`; a
 * `rollback()` (or a killed process) leaves the database exactly as it was.
 */
export class SourceWriter {
  readonly sourceId: number;
  readonly replaced: boolean;
  private readonly insValue: Database.Statement;
  /** Called for a value whose food already has that nutrient in this import (row skipped). */
  onDuplicateValue: (file: string, line: number) => void = () => undefined;
  private readonly insPortion: Database.Statement;
  private readonly insFood: Database.Statement;
  private readonly updFood: Database.Statement;
  /** On a re-import: the food ids of the earlier release by code, and which were seen again. */
  private readonly previous = new Map<string, number>();
  private readonly seenAgain = new Set<number>();
  private readonly upsertDef: Database.Statement;
  private open = true;
  values = 0;
  portions = 0;
  foods = 0;

  private constructor(
    private readonly sqlite: Database.Database,
    meta: SourceMeta,
  ) {
    const s = sqlite;
    const prev = s
      .prepare('select id from food_source where format = ? and release = ?')
      .get(meta.format, meta.release) as { id: number } | undefined;
    this.replaced = prev !== undefined;
    if (prev) {
      this.sourceId = prev.id;
      s.prepare(
        'update food_source set name = ?, licence = ?, url = ?, imported_at = ? where id = ?',
      ).run(meta.name, meta.licence, meta.url, meta.importedAt, prev.id);
      const inSource = 'select id from food where source_id = ?';
      s.prepare(`delete from food_fts where rowid in (${inSource})`).run(prev.id);
      s.prepare(`delete from nutrient_value where food_id in (${inSource})`).run(prev.id);
      s.prepare(`delete from portion where food_id in (${inSource})`).run(prev.id);
      s.prepare(`delete from food_local_name where food_id in (${inSource})`).run(prev.id);
    } else {
      const r = s
        .prepare(
          `insert into food_source (format, name, release, licence, url, imported_at)
           values (?, ?, ?, ?, ?, ?)`,
        )
        .run(meta.format, meta.name, meta.release, meta.licence, meta.url, meta.importedAt);
      this.sourceId = Number(r.lastInsertRowid);
    }
    if (prev) {
      const rows = s.prepare('select code, id from food where source_id = ?').raw().all(prev.id);
      for (const [code, id] of rows as Array<[string, number]>) this.previous.set(code, id);
    }
    // A plain insert (about 6x faster than an upsert with RETURNING here); a re-import updates
    // the earlier row by id so plans and diaries keep pointing at the same food.
    this.insFood = s.prepare(
      `insert into food (source_id, code, name, alt_names, food_group, kind, brand_owner, gtin,
         ingredients, ingredients_lang, serving_g, serving_text, additive_scan, additive_scan_version)
       values (@sourceId, @code, @name, @altNames, @group, @kind, @brandOwner, @gtin,
         @ingredients, @ingredientsLang, @servingG, @servingText, @additiveScan, @additiveScanVersion)`,
    );
    this.updFood = s.prepare(
      `update food set name = @name, alt_names = @altNames, food_group = @group, kind = @kind,
         brand_owner = @brandOwner, gtin = @gtin, ingredients = @ingredients,
         ingredients_lang = @ingredientsLang, serving_g = @servingG, serving_text = @servingText,
         additive_scan = @additiveScan, additive_scan_version = @additiveScanVersion
       where id = @id`,
    );
    this.upsertDef = s.prepare(
      `insert into nutrient_def (source_id, code, name, unit, tag, sort_order)
       values (?, ?, ?, ?, ?, ?)
       on conflict (source_id, code) do update set name = excluded.name, unit = excluded.unit,
         tag = excluded.tag, sort_order = excluded.sort_order
       returning id`,
    );
    this.insValue = s.prepare(
      `insert into nutrient_value (food_id, nutrient_def_id, value_per_100g, derivation_code, source_code)
       values (?, ?, ?, ?, ?)`,
    );
    this.insPortion = s.prepare(
      'insert into portion (food_id, seq, amount, description, grams) values (?, ?, ?, ?, ?)',
    );
  }

  /** Starts the one transaction of this import (waits up to the busy timeout for a writer). */
  static begin(db: Db, meta: SourceMeta): SourceWriter {
    db.sqlite.exec('begin immediate');
    try {
      return new SourceWriter(db.sqlite, meta);
    } catch (err) {
      db.sqlite.exec('rollback');
      throw err;
    }
  }

  defineNutrient(d: NutrientDefInput): number {
    const r = this.upsertDef.get(this.sourceId, d.code, d.name, d.unit, d.tag, d.sortOrder) as {
      id: number;
    };
    return r.id;
  }

  /** Adds a food; returns its id, or null when this import already had the same code. */
  addFood(f: FoodInput): number | null {
    const row = {
      sourceId: this.sourceId,
      code: f.code,
      name: f.name,
      altNames: JSON.stringify(f.altNames),
      group: f.group,
      kind: f.kind,
      brandOwner: f.brandOwner ?? null,
      gtin: f.gtin ?? null,
      ingredients: f.ingredients ?? null,
      ingredientsLang: f.ingredientsLang ?? null,
      servingG: f.servingG ?? null,
      servingText: f.servingText ?? null,
      additiveScan: f.additiveScan ?? null,
      additiveScanVersion: f.additiveScanVersion ?? null,
    };
    const earlier = this.previous.get(f.code);
    if (earlier !== undefined) {
      if (this.seenAgain.has(earlier)) return null;
      this.seenAgain.add(earlier);
      this.updFood.run({ ...row, id: earlier });
      this.foods++;
      return earlier;
    }
    try {
      const r = this.insFood.run(row);
      this.foods++;
      return Number(r.lastInsertRowid);
    } catch (err) {
      // The unique (source, code) key: this import already had the code.
      if ((err as { code?: string }).code === 'SQLITE_CONSTRAINT_UNIQUE') return null;
      throw err;
    }
  }

  /** Adds one value per 100 g; a duplicate (food, nutrient) goes to `onDuplicateValue`. */
  addValue(
    foodId: number,
    defId: number,
    valuePer100g: number,
    derivationCode: string | null,
    sourceCode: string | null,
    file: string,
    line: number,
  ): void {
    // One prepared single-row statement: measured here faster than 50- or 500-row statements
    // (bound arrays cost more than they save).
    try {
      this.insValue.run(foodId, defId, valuePer100g, derivationCode, sourceCode);
      this.values++;
    } catch (err) {
      if ((err as { code?: string }).code !== 'SQLITE_CONSTRAINT_PRIMARYKEY') throw err;
      this.onDuplicateValue(file, line);
    }
  }

  addPortion(foodId: number, seq: number, amount: number, description: string, grams: number) {
    this.insPortion.run(foodId, seq, amount, description, grams);
    this.portions++;
  }

  private insLocalName: Database.Statement | null = null;

  /** The food's own name in another language as the table gives it (language: BCP-47). */
  addLocalName(foodId: number, language: string, name: string): void {
    this.insLocalName ??= this.sqlite.prepare(
      'insert or replace into food_local_name (food_id, language, name) values (?, ?, ?)',
    );
    this.insLocalName.run(foodId, language, name);
  }

  /** A prepared statement inside the same transaction, for format-specific updates. */
  prepare(sqlText: string): Database.Statement {
    return this.sqlite.prepare(sqlText);
  }

  /**
   * Finishes: removes foods the new release no longer has, fills the per-100 g columns from the
   * stored values, indexes names for search, records counts, and commits.
   */
  commit(skipped: number): { foods: number; values: number; portions: number } {
    const s = this.sqlite;
    const id = this.sourceId;
    if (this.replaced) {
      const gone = [...this.previous.values()].filter((x) => !this.seenAgain.has(x));
      const del = s.prepare('delete from food where id = ?');
      for (const x of gone) del.run(x);
    }
    this.fillCoreColumns();
    s.prepare(
      `insert into food_fts (rowid, name, alt_names, kind)
       select id, name, (select group_concat(value, ' | ') from json_each(food.alt_names)), kind
       from food where source_id = ?`,
    ).run(id);
    // Every value and portion of this source was written by this import (the earlier ones were
    // removed at the start), so the counters are exact.
    const { foods, values, portions } = this;
    s.prepare(
      `update food_source set food_count = ?, nutrient_value_count = ?, portion_count = ?,
         skipped_count = ? where id = ?`,
    ).run(foods, values, portions, skipped, id);
    s.exec('commit');
    this.open = false;
    return { foods, values, portions };
  }

  rollback(): void {
    if (!this.open) return;
    this.open = false;
    if (this.sqlite.inTransaction) this.sqlite.exec('rollback');
  }

  private fillCoreColumns(): void {
    const defs = this.sqlite
      .prepare('select id, unit, tag from nutrient_def where source_id = ? and tag is not null')
      .all(this.sourceId) as Array<{ id: number; unit: string; tag: string }>;
    const sets: string[] = [];
    const params: number[] = [];
    for (const col of CORE_COLUMNS) {
      const parts: string[] = [];
      for (const tag of col.tags) {
        for (const d of defs.filter((x) => x.tag === tag)) {
          const factor = unitFactor(d.unit, col.unit);
          if (factor === null) continue;
          parts.push(
            '(select value_per_100g * ? from nutrient_value where food_id = food.id and nutrient_def_id = ?)',
          );
          params.push(factor, d.id);
        }
      }
      sets.push(`${col.column} = ${parts.length ? `coalesce(${parts.join(', ')})` : 'null'}`);
      if (parts.length === 1) sets[sets.length - 1] = `${col.column} = ${parts[0]}`;
    }
    this.sqlite
      .prepare(`update food set ${sets.join(', ')} where source_id = ?`)
      .run(...params, this.sourceId);
  }
}
