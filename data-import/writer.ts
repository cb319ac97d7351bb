import type Database from 'better-sqlite3';
import type { Db } from '../src/db/database.js';
import { createStaging, type StagingFile } from './staging.js';

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
  /** A serving given as a volume (ml), kept as volume: no grams without a density. */
  servingMl?: number | null;
  servingText?: string | null;
  /** SR28 NDB number, where the table gives one (links the same food across releases). */
  ndbNumber?: string | null;
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

/** The s_food columns a format may set after adding a food (FDC's branded_food.csv). */
export type FoodUpdate = Partial<
  Pick<
    FoodInput,
    | 'brandOwner'
    | 'gtin'
    | 'ingredients'
    | 'ingredientsLang'
    | 'servingG'
    | 'servingMl'
    | 'servingText'
    | 'group'
    | 'altNames'
    | 'additiveScan'
    | 'additiveScanVersion'
    | 'ndbNumber'
  >
>;

const UPDATE_COLUMNS: Record<keyof FoodUpdate, string> = {
  brandOwner: 'brand_owner',
  gtin: 'gtin',
  ingredients: 'ingredients',
  ingredientsLang: 'ingredients_lang',
  servingG: 'serving_g',
  servingMl: 'serving_ml',
  servingText: 'serving_text',
  group: 'food_group',
  altNames: 'alt_names',
  additiveScan: 'additive_scan',
  additiveScanVersion: 'additive_scan_version',
  ndbNumber: 'ndb_number',
};

/** The food columns copied from staging on publish (besides id, source_id and code). */
const FOOD_COPY = [
  'name',
  'alt_names',
  'food_group',
  'kind',
  'brand_owner',
  'gtin',
  'ingredients',
  'ingredients_lang',
  'serving_g',
  'serving_ml',
  'serving_text',
  'additive_scan',
  'additive_scan_version',
  'ndb_number',
  ...CORE_COLUMNS.map((c) => c.column),
];

/** Staging writes between commits of the staging file (bounds its page cache; no source). */
const STAGE_BATCH = 100_000;

export interface PublishCounts {
  sourceId: number;
  foods: number;
  values: number;
  portions: number;
  /** Milliseconds the clinic database's write lock was held. */
  lockMs: number;
}

/**
 * Writes one release of one table. Everything an import reads goes first into a private
 * staging file (`staging.ts`); the clinic's database is only written by `publish()`, in one
 * transaction that copies the staged release in with set-based SQL. Re-importing the same
 * format and release updates foods in place, keeping their ids (plans and diaries refer to
 * them), matched by code in SQL (no per-food memory); foods the new file no longer has are
 * removed. A failure before or during publish (or a killed process) leaves the database
 * exactly as it was.
 */
export class SourceWriter {
  private readonly staging: StagingFile;
  private readonly s: Database.Database;
  private readonly insValue: Database.Statement;
  private readonly insPortion: Database.Statement;
  private readonly insFood: Database.Statement;
  private readonly insFoodWithId: Database.Statement;
  private readonly hasFoodStmt: Database.Statement;
  private readonly upsertDef: Database.Statement;
  private readonly updates = new Map<string, Database.Statement>();
  private pending = 0;
  /** Called for a value whose food already has that nutrient in this import (row skipped). */
  onDuplicateValue: (file: string, line: number) => void = () => undefined;
  values = 0;
  portions = 0;
  foods = 0;

  private constructor(
    private readonly db: Db,
    private readonly meta: SourceMeta,
    stagingDirPath: string,
  ) {
    this.staging = createStaging(stagingDirPath);
    const s = (this.s = this.staging.sqlite);
    const cols = `code, name, alt_names, food_group, kind, brand_owner, gtin, ingredients,
      ingredients_lang, serving_g, serving_ml, serving_text, additive_scan, additive_scan_version, ndb_number`;
    const vals = `@code, @name, @altNames, @group, @kind, @brandOwner, @gtin, @ingredients,
      @ingredientsLang, @servingG, @servingMl, @servingText, @additiveScan, @additiveScanVersion, @ndbNumber`;
    this.insFood = s.prepare(`insert into s_food (${cols}) values (${vals})`);
    this.insFoodWithId = s.prepare(`insert into s_food (id, ${cols}) values (@id, ${vals})`);
    this.hasFoodStmt = s.prepare('select 1 from s_food where id = ?').pluck();
    this.upsertDef = s.prepare(
      `insert into s_def (code, name, unit, tag, sort_order) values (?, ?, ?, ?, ?)
       on conflict (code) do update set name = excluded.name, unit = excluded.unit,
         tag = excluded.tag, sort_order = excluded.sort_order
       returning id`,
    );
    this.insValue = s.prepare(
      'insert into s_value (food_id, def_id, value, derivation_code, source_code) values (?, ?, ?, ?, ?)',
    );
    this.insPortion = s.prepare(
      'insert into s_portion (food_id, seq, amount, description, grams) values (?, ?, ?, ?, ?)',
    );
    s.exec('begin');
  }

  /** Opens a staging file for one import (in `dir`: beside the database, same disk). */
  static open(db: Db, meta: SourceMeta, dir: string): SourceWriter {
    return new SourceWriter(db, meta, dir);
  }

  get stagingPath(): string {
    return this.staging.path;
  }

  private wrote(): void {
    if (++this.pending < STAGE_BATCH) return;
    this.pending = 0;
    this.s.exec('commit');
    this.s.exec('begin');
  }

  defineNutrient(d: NutrientDefInput): number {
    return this.upsertDef.pluck().get(d.code, d.name, d.unit, d.tag, d.sortOrder) as number;
  }

  /**
   * Adds a food; returns its staging id, or null when this import already had the same code.
   * `id` fixes the staging id (a table's own integer key, so later files find the food by it
   * with `hasFood` instead of a map in memory).
   */
  addFood(f: FoodInput, id?: number): number | null {
    const row = {
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
      servingMl: f.servingMl ?? null,
      servingText: f.servingText ?? null,
      additiveScan: f.additiveScan ?? null,
      additiveScanVersion: f.additiveScanVersion ?? null,
      ndbNumber: f.ndbNumber ?? null,
    };
    try {
      const r = id === undefined ? this.insFood.run(row) : this.insFoodWithId.run({ ...row, id });
      this.foods++;
      this.wrote();
      return Number(r.lastInsertRowid);
    } catch (err) {
      // The unique code (or the given id): this import already had the food.
      const code = (err as { code?: string }).code;
      if (code === 'SQLITE_CONSTRAINT_UNIQUE' || code === 'SQLITE_CONSTRAINT_PRIMARYKEY')
        return null;
      throw err;
    }
  }

  /** True when this import has a food with this staging id. */
  hasFood(id: number): boolean {
    return this.hasFoodStmt.get(id) !== undefined;
  }

  /** Sets label fields of a staged food (columns named in `fields` only). */
  updateFood(id: number, fields: FoodUpdate): void {
    const keys = (Object.keys(fields) as Array<keyof FoodUpdate>).sort();
    const sig = keys.join(',');
    let stmt = this.updates.get(sig);
    if (!stmt) {
      stmt = this.s.prepare(
        `update s_food set ${keys.map((k) => `${UPDATE_COLUMNS[k]} = @${k}`).join(', ')} where id = @id`,
      );
      this.updates.set(sig, stmt);
    }
    const params: Record<string, unknown> = { id };
    for (const k of keys) {
      const v = fields[k];
      params[k] = k === 'altNames' ? JSON.stringify(v) : (v ?? null);
    }
    stmt.run(params);
    this.wrote();
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
    try {
      this.insValue.run(foodId, defId, valuePer100g, derivationCode, sourceCode);
      this.values++;
      this.wrote();
    } catch (err) {
      if ((err as { code?: string }).code !== 'SQLITE_CONSTRAINT_PRIMARYKEY') throw err;
      this.onDuplicateValue(file, line);
    }
  }

  addPortion(foodId: number, seq: number, amount: number, description: string, grams: number) {
    this.insPortion.run(foodId, seq, amount, description, grams);
    this.portions++;
    this.wrote();
  }

  /**
   * Makes the staged release visible. Outside the database's write lock: the per-100 g columns
   * are computed in staging, and the earlier release's ids are matched by code. Inside one
   * short transaction: the earlier release's rows are replaced by set-based copies.
   */
  publish(skipped: number): PublishCounts {
    this.fillCoreColumns();
    this.s.exec('commit');
    this.s.exec('create index s_food_main on s_food (main_id)');
    this.staging.sqlite.close();
    const m = this.db.sqlite;
    m.prepare('attach database ? as stage').run(this.staging.path);
    try {
      m.pragma('stage.journal_mode = OFF');
      const prev = this.previousSource();
      const snapshot = prev === null ? null : this.matchPrevious(prev);
      const t0 = performance.now();
      m.exec('begin immediate');
      try {
        const counts = this.copyIn(prev, snapshot, skipped);
        m.exec('commit');
        return { ...counts, lockMs: performance.now() - t0 };
      } catch (err) {
        if (m.inTransaction) m.exec('rollback');
        throw err;
      }
    } finally {
      if (!m.inTransaction) m.exec('detach database stage');
    }
  }

  /** Removes the staging file (after publish, or instead of it). */
  discard(): void {
    const m = this.db.sqlite;
    if (m.open && !m.inTransaction) {
      const attached = m.prepare('pragma database_list').all() as Array<{ name: string }>;
      if (attached.some((d) => d.name === 'stage')) m.exec('detach database stage');
    }
    this.staging.remove();
  }

  private previousSource(): number | null {
    const r = this.db.sqlite
      .prepare('select id from food_source where format = ? and release = ?')
      .pluck()
      .get(this.meta.format, this.meta.release) as number | undefined;
    return r ?? null;
  }

  /** Staged foods get the earlier release's id of the same code; the rest a rank (new_seq). */
  private matchPrevious(prev: number): string {
    const m = this.db.sqlite;
    m.prepare(
      `update stage.s_food set main_id = f.id from main.food as f
       where f.source_id = ? and f.code = s_food.code`,
    ).run(prev);
    return this.foodsSnapshot(prev);
  }

  private foodsSnapshot(prev: number): string {
    return JSON.stringify(
      this.db.sqlite
        .prepare('select count(*), coalesce(max(id), 0) from food where source_id = ?')
        .raw()
        .get(prev),
    );
  }

  private copyIn(prev: number | null, snapshot: string | null, skipped: number) {
    const m = this.db.sqlite;
    const meta = this.meta;
    let sourceId: number;
    if (prev !== null) {
      sourceId = prev;
      // Foods of this release changed between matching and the lock: match again.
      if (this.foodsSnapshot(prev) !== snapshot) this.matchPrevious(prev);
      m.prepare(
        'update food_source set name = ?, licence = ?, url = ?, imported_at = ? where id = ?',
      ).run(meta.name, meta.licence, meta.url, meta.importedAt, prev);
      const inSource = 'select id from food where source_id = ?';
      m.prepare(`delete from food_fts where rowid in (${inSource})`).run(prev);
      m.prepare(`delete from nutrient_value where food_id in (${inSource})`).run(prev);
      m.prepare(`delete from portion where food_id in (${inSource})`).run(prev);
      m.prepare(
        `delete from food where source_id = ?
         and not exists (select 1 from stage.s_food s where s.main_id = food.id)`,
      ).run(prev);
      m.prepare(
        `update food set ${FOOD_COPY.map((c) => `${c} = s.${c}`).join(', ')}
         from stage.s_food as s where s.main_id = food.id`,
      ).run();
    } else {
      sourceId = Number(
        m
          .prepare(
            `insert into food_source (format, name, release, licence, url, imported_at)
             values (?, ?, ?, ?, ?, ?)`,
          )
          .run(meta.format, meta.name, meta.release, meta.licence, meta.url, meta.importedAt)
          .lastInsertRowid,
      );
    }
    // New foods take ids above every id the table has used (AUTOINCREMENT's rule).
    const base = m
      .prepare(
        `select max(coalesce((select seq from sqlite_sequence where name = 'food'), 0),
                    coalesce((select max(id) from food), 0))`,
      )
      .pluck()
      .get() as number;
    m.prepare(
      `insert into food (id, source_id, code, ${FOOD_COPY.join(', ')})
       select ? + new_seq, ?, code, ${FOOD_COPY.join(', ')}
       from (select *, row_number() over (order by id) as new_seq from stage.s_food
             where main_id is null)
       order by new_seq`,
    ).run(base, sourceId);
    // Staged id -> database id, for the values, portions and the search index.
    m.exec(`create temp table if not exists phl_food_map (sid integer primary key, id integer not null);
            delete from phl_food_map;
            create temp table if not exists phl_def_map (sid integer primary key, id integer not null);
            delete from phl_def_map;`);
    m.prepare(
      `insert into phl_food_map (sid, id)
       select id, coalesce(main_id, ? + row_number() over (partition by main_id is null order by id))
       from stage.s_food order by id`,
    ).run(base);
    m.prepare(
      `insert into nutrient_def (source_id, code, name, unit, tag, sort_order)
       select ?, code, name, unit, tag, sort_order from stage.s_def where true
       on conflict (source_id, code) do update set name = excluded.name, unit = excluded.unit,
         tag = excluded.tag, sort_order = excluded.sort_order`,
    ).run(sourceId);
    m.prepare(
      `insert into phl_def_map (sid, id) select s.id, d.id from stage.s_def s
       join nutrient_def d on d.source_id = ? and d.code = s.code`,
    ).run(sourceId);
    const values = m
      .prepare(
        `insert into nutrient_value (food_id, nutrient_def_id, value_per_100g, derivation_code, source_code)
         select f.id, d.id, v.value, v.derivation_code, v.source_code
         from stage.s_value v join phl_food_map f on f.sid = v.food_id
         join phl_def_map d on d.sid = v.def_id`,
      )
      .run().changes;
    const portions = m
      .prepare(
        `insert into portion (food_id, seq, amount, description, grams)
         select f.id, p.seq, p.amount, p.description, p.grams
         from stage.s_portion p join phl_food_map f on f.sid = p.food_id`,
      )
      .run().changes;
    m.prepare(
      `insert into food_fts (rowid, name, alt_names, kind)
       select f.id, s.name, (select group_concat(value, ' | ') from json_each(s.alt_names)), s.kind
       from stage.s_food s join phl_food_map f on f.sid = s.id`,
    ).run();
    const foods = this.foods;
    m.prepare(
      `update food_source set food_count = ?, nutrient_value_count = ?, portion_count = ?,
         skipped_count = ? where id = ?`,
    ).run(foods, values, portions, skipped, sourceId);
    m.exec('drop table phl_food_map; drop table phl_def_map;');
    return { sourceId, foods, values, portions };
  }

  /** The per-100 g columns of every staged food, from its staged values (outside the lock). */
  private fillCoreColumns(): void {
    const defs = this.s
      .prepare('select id, unit, tag from s_def where tag is not null')
      .all() as Array<{ id: number; unit: string; tag: string }>;
    const sets: string[] = [];
    const params: number[] = [];
    for (const col of CORE_COLUMNS) {
      const parts: string[] = [];
      for (const tag of col.tags) {
        for (const d of defs.filter((x) => x.tag === tag)) {
          const factor = unitFactor(d.unit, col.unit);
          if (factor === null) continue;
          parts.push('(select value * ? from s_value where food_id = s_food.id and def_id = ?)');
          params.push(factor, d.id);
        }
      }
      if (parts.length === 0) sets.push(`${col.column} = null`);
      else if (parts.length === 1) sets.push(`${col.column} = ${parts[0]}`);
      else sets.push(`${col.column} = coalesce(${parts.join(', ')})`);
    }
    this.s.prepare(`update s_food set ${sets.join(', ')}`).run(...params);
  }
}
