import type Database from 'better-sqlite3';
import type { Db } from '../src/db/database.js';
import { ImportCodes, structural } from './issues.js';
import { createStaging, pidAlive, type StagingFile } from './staging.js';

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

/**
 * New foods per publishing transaction: their values, portions and search rows (~12 values a
 * food: ~25,000 rows, tens of ms here), so the server's writes wait at most that long.
 * Common practice, no source.
 */
const PUBLISH_SLICE_FOODS = 2_000;
/** Pause between publishing slices, in ms (see writeNewFoodRows). */
const SLICE_GAP_MS = 50;

/** Ids an import has taken for publishing (a row of import_reservation). */
interface Reservation {
  id: number;
  /** New foods get foodBase + 1 ... foodBase + newFoods. */
  foodBase: number;
  newFoods: number;
  sourceId: number;
  prev: number | null;
}

/**
 * Removes what an import wrote before its last publishing step (rows under its reserved ids,
 * which no food row has) and the reservation itself. Used when the publish fails, and at the
 * start of the next import for an import that died.
 */
export function removeReservation(db: Db, id: number): void {
  const m = db.sqlite;
  const r = m.prepare('select * from import_reservation where id = ?').get(id) as
    | {
        food_id_from: number;
        food_id_to: number;
        source_id: number;
        new_source: number;
        def_id_floor: number;
      }
    | undefined;
  if (!r) return;
  m.exec('begin immediate');
  try {
    const orphan = 'between ? and ? and not exists (select 1 from food where food.id = ';
    m.prepare(`delete from nutrient_value where food_id ${orphan}nutrient_value.food_id)`).run(
      r.food_id_from,
      r.food_id_to,
    );
    m.prepare(`delete from portion where food_id ${orphan}portion.food_id)`).run(
      r.food_id_from,
      r.food_id_to,
    );
    m.prepare(`delete from food_fts where rowid ${orphan}food_fts.rowid)`).run(
      r.food_id_from,
      r.food_id_to,
    );
    m.prepare(`delete from food_local_name where food_id ${orphan}food_local_name.food_id)`).run(
      r.food_id_from,
      r.food_id_to,
    );
    // Nutrients this import added and no value uses.
    m.prepare(
      `delete from nutrient_def where source_id = ? and id > ?
       and not exists (select 1 from nutrient_value v where v.nutrient_def_id = nutrient_def.id)`,
    ).run(r.source_id, r.def_id_floor);
    m.prepare('delete from import_reservation where id = ?').run(id);
    m.exec('commit');
  } catch (err) {
    if (m.inTransaction) m.exec('rollback');
    throw err;
  }
}

/** Removes the leftovers of imports that died while publishing (see `removeReservation`). */
export function removeDeadReservations(db: Db): void {
  const rows = db.sqlite.prepare('select id, pid from import_reservation').all() as Array<{
    id: number;
    pid: number;
  }>;
  for (const r of rows) if (!pidAlive(r.pid)) removeReservation(db, r.id);
}

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
  private readonly insLocalName: Database.Statement;
  private readonly insFood: Database.Statement;
  private readonly insFoodWithId: Database.Statement;
  private readonly hasFoodStmt: Database.Statement;
  private readonly upsertDef: Database.Statement;
  private readonly updates = new Map<string, Database.Statement>();
  private pending = 0;
  /** Rows copied into the database by publish(). */
  private readonly published = { values: 0, portions: 0 };
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
    this.insLocalName = s.prepare(
      'insert or replace into s_local_name (food_id, language, name) values (?, ?, ?)',
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

  /** The food's own name in another language as the table gives it (language: BCP-47). */
  addLocalName(foodId: number, language: string, name: string): void {
    this.insLocalName.run(foodId, language, name);
    this.wrote();
  }

  /**
   * Makes the staged release visible. Outside the database's write lock: the per-100 g columns
   * are computed in staging and the earlier release's ids matched by code. Then, in short
   * transactions, the values, portions and search rows of the new foods are written under food
   * ids reserved for them (no food row has those ids yet, so no query sees them; this
   * connection skips the foreign-key check for them). Last, one transaction adds the food rows
   * (the release becomes visible) and replaces the earlier release's rows.
   */
  async publish(skipped: number, onStep?: () => Promise<void>): Promise<PublishCounts> {
    await this.fillCoreColumns(onStep);
    this.s.exec('commit');
    this.s.exec('create index s_food_main on s_food (main_id)');
    this.staging.sqlite.close();
    const m = this.db.sqlite;
    m.prepare('attach database ? as stage').run(this.staging.path);
    let plan: Reservation | null = null;
    try {
      m.pragma('stage.journal_mode = OFF');
      const prev = this.previousSource();
      const snapshot = prev === null ? null : this.matchPrevious(prev);
      plan = this.reserve(prev);
      this.buildMaps(plan);
      await this.writeNewFoodRows(plan, onStep);
      const t0 = performance.now();
      m.exec('begin immediate');
      try {
        const counts = this.finish(plan, snapshot, skipped);
        m.exec('commit');
        return { ...counts, lockMs: performance.now() - t0 };
      } catch (err) {
        if (m.inTransaction) m.exec('rollback');
        throw err;
      }
    } catch (err) {
      if (plan) removeReservation(this.db, plan.id);
      throw err;
    } finally {
      if (!m.inTransaction) {
        m.exec('drop table if exists temp.phl_food_map; drop table if exists temp.phl_def_map;');
        m.exec('detach database stage');
      }
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

  /** Staged foods get the earlier release's id of the same code (main_id). */
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

  /**
   * Takes food ids for the new foods (and a source id for a new release) in one short
   * transaction, by moving AUTOINCREMENT's counter past them: no other writer can take them.
   */
  private reserve(prev: number | null): Reservation {
    const m = this.db.sqlite;
    const newFoods = m
      .prepare('select count(*) from stage.s_food where main_id is null')
      .pluck()
      .get() as number;
    const bump = (table: string, by: number): number => {
      const base = m
        .prepare(
          `select max(coalesce((select seq from sqlite_sequence where name = ?), 0),
                      coalesce((select max(id) from ${table}), 0))`,
        )
        .pluck()
        .get(table) as number;
      m.prepare('delete from sqlite_sequence where name = ?').run(table);
      m.prepare('insert into sqlite_sequence (name, seq) values (?, ?)').run(table, base + by);
      return base;
    };
    // A new release's nutrients name its reserved source id, whose row comes last.
    const fk = m.pragma('foreign_keys', { simple: true }) as number;
    m.pragma('foreign_keys = OFF');
    m.exec('begin immediate');
    try {
      const foodBase = bump('food', newFoods);
      const sourceId = prev ?? bump('food_source', 1) + 1;
      const defFloor = m
        .prepare('select coalesce(max(id), 0) from nutrient_def')
        .pluck()
        .get() as number;
      const id = Number(
        m
          .prepare(
            `insert into import_reservation
               (food_id_from, food_id_to, source_id, new_source, def_id_floor, pid, created_at)
             values (?, ?, ?, ?, ?, ?, ?)`,
          )
          .run(
            foodBase + 1,
            foodBase + newFoods,
            sourceId,
            prev === null ? 1 : 0,
            defFloor,
            process.pid,
            this.meta.importedAt,
          ).lastInsertRowid,
      );
      // New nutrients: added now (a new release's under its reserved source id: not visible).
      m.prepare(
        `insert into nutrient_def (source_id, code, name, unit, tag, sort_order)
         select ?, code, name, unit, tag, sort_order from stage.s_def where true
         on conflict (source_id, code) do nothing`,
      ).run(sourceId);
      m.exec('commit');
      return { id, foodBase, newFoods, sourceId, prev };
    } catch (err) {
      if (m.inTransaction) m.exec('rollback');
      throw err;
    } finally {
      m.pragma(`foreign_keys = ${fk ? 'ON' : 'OFF'}`);
    }
  }

  /** Staged id -> database id for foods and nutrients (temporary tables of this connection). */
  private buildMaps(plan: Reservation): void {
    const m = this.db.sqlite;
    m.exec(`drop table if exists temp.phl_food_map; drop table if exists temp.phl_def_map;
      create temp table phl_food_map (sid integer primary key, id integer not null, new integer not null);
      create temp table phl_def_map (sid integer primary key, id integer not null);`);
    m.prepare(
      `insert into phl_food_map (sid, id, new)
       select id, coalesce(main_id, ? + row_number() over (partition by main_id is null order by id)),
              main_id is null
       from stage.s_food order by id`,
    ).run(plan.foodBase);
    m.prepare(
      `insert into phl_def_map (sid, id) select s.id, d.id from stage.s_def s
       join nutrient_def d on d.source_id = ? and d.code = s.code`,
    ).run(plan.sourceId);
  }

  /** The new foods' values, portions and search rows, a slice of foods per transaction. */
  private async writeNewFoodRows(plan: Reservation, onStep?: () => Promise<void>) {
    const m = this.db.sqlite;
    const fk = m.pragma('foreign_keys', { simple: true }) as number;
    const range = m
      .prepare('select min(sid), max(sid) from phl_food_map where new = 1')
      .raw()
      .get() as [number | null, number | null];
    if (range[0] === null || range[1] === null) return;
    const steps = [
      this.valuesSql('and f.new = 1 and f.sid between ? and ?'),
      this.portionsSql('and f.new = 1 and f.sid between ? and ?'),
      this.ftsSql('and f.new = 1 and f.sid between ? and ?'),
      this.localNamesSql('and f.new = 1 and f.sid between ? and ?'),
    ].map((q) => m.prepare(q));
    for (let lo = range[0]; lo <= range[1]; lo += PUBLISH_SLICE_FOODS) {
      const hi = lo + PUBLISH_SLICE_FOODS - 1;
      // The food rows come in the last transaction: until then these rows point at ids no food
      // has, which the foreign-key check would refuse (switched off for this step only).
      m.pragma('foreign_keys = OFF');
      m.exec('begin immediate');
      try {
        const [v, p] = steps.map((st) => st.run(lo, hi).changes);
        this.published.values += v ?? 0;
        this.published.portions += p ?? 0;
        m.exec('commit');
      } catch (err) {
        if (m.inTransaction) m.exec('rollback');
        throw err;
      } finally {
        m.pragma(`foreign_keys = ${fk ? 'ON' : 'OFF'}`);
      }
      // Between slices the lock stays free for a while: a writer waiting in SQLite's default
      // busy handler retries every 1-50 ms in its first ~300 ms (sqliteDefaultBusyCallback), so
      // a gap of 50 ms lets it in instead of starving it behind back-to-back slices.
      await (onStep ? onStep() : new Promise<void>((r) => setTimeout(r, SLICE_GAP_MS)));
    }
  }

  private valuesSql(where: string): string {
    return `insert into nutrient_value (food_id, nutrient_def_id, value_per_100g, derivation_code, source_code)
      select f.id, d.id, v.value, v.derivation_code, v.source_code
      from phl_food_map f join stage.s_value v on v.food_id = f.sid
      join phl_def_map d on d.sid = v.def_id where true ${where}`;
  }
  private portionsSql(where: string): string {
    return `insert into portion (food_id, seq, amount, description, grams)
      select f.id, p.seq, p.amount, p.description, p.grams
      from phl_food_map f join stage.s_portion p on p.food_id = f.sid where true ${where}`;
  }
  private localNamesSql(where: string): string {
    return `insert or replace into food_local_name (food_id, language, name)
      select f.id, l.language, l.name
      from phl_food_map f join stage.s_local_name l on l.food_id = f.sid where true ${where}`;
  }
  private ftsSql(where: string): string {
    return `insert into food_fts (rowid, name, alt_names, kind)
      select f.id, s.name, (select group_concat(value, ' | ') from json_each(s.alt_names)), s.kind
      from phl_food_map f join stage.s_food s on s.id = f.sid where true ${where}`;
  }

  /** The last transaction: food rows in, the earlier release's rows replaced, counts. */
  private finish(plan: Reservation, snapshot: string | null, skipped: number) {
    const m = this.db.sqlite;
    const meta = this.meta;
    const prev = plan.prev;
    if (prev !== null) {
      if (this.foodsSnapshot(prev) !== snapshot) {
        throw structural(
          '(database)',
          null,
          ImportCodes.busy,
          `another import of ${this.meta.format} ${this.meta.release} finished while this one was publishing: run this one again; the database was not changed by it`,
        );
      }
      m.prepare(
        'update food_source set name = ?, licence = ?, url = ?, imported_at = ? where id = ?',
      ).run(meta.name, meta.licence, meta.url, meta.importedAt, prev);
      const inSource = 'select id from food where source_id = ?';
      m.prepare(`delete from food_fts where rowid in (${inSource})`).run(prev);
      m.prepare(`delete from nutrient_value where food_id in (${inSource})`).run(prev);
      m.prepare(`delete from portion where food_id in (${inSource})`).run(prev);
      m.prepare(`delete from food_local_name where food_id in (${inSource})`).run(prev);
      m.prepare(
        `delete from food where source_id = ?
         and not exists (select 1 from stage.s_food s where s.main_id = food.id)`,
      ).run(prev);
      m.prepare(
        `update food set ${FOOD_COPY.map((c) => `${c} = s.${c}`).join(', ')}
         from stage.s_food as s where s.main_id = food.id`,
      ).run();
      this.published.values += m.prepare(this.valuesSql('and f.new = 0')).run().changes;
      this.published.portions += m.prepare(this.portionsSql('and f.new = 0')).run().changes;
      m.prepare(this.ftsSql('and f.new = 0')).run();
      m.prepare(this.localNamesSql('and f.new = 0')).run();
    } else {
      m.prepare(
        `insert into food_source (id, format, name, release, licence, url, imported_at)
         values (?, ?, ?, ?, ?, ?, ?)`,
      ).run(
        plan.sourceId,
        meta.format,
        meta.name,
        meta.release,
        meta.licence,
        meta.url,
        meta.importedAt,
      );
    }
    m.prepare(
      `update nutrient_def set name = s.name, unit = s.unit, tag = s.tag, sort_order = s.sort_order
       from stage.s_def as s where nutrient_def.source_id = ? and nutrient_def.code = s.code`,
    ).run(plan.sourceId);
    m.prepare(
      `insert into food (id, source_id, code, ${FOOD_COPY.join(', ')})
       select f.id, ?, s.code, ${FOOD_COPY.map((c) => `s.${c}`).join(', ')}
       from phl_food_map f join stage.s_food s on s.id = f.sid where f.new = 1 order by f.id`,
    ).run(plan.sourceId);
    // Every value and portion of this source was written by this import (the earlier ones were
    // removed), so the counters are exact.
    const { values, portions } = this.published;
    const foods = this.foods;
    m.prepare(
      `update food_source set food_count = ?, nutrient_value_count = ?, portion_count = ?,
         skipped_count = ? where id = ?`,
    ).run(foods, values, portions, skipped, plan.sourceId);
    m.prepare('delete from import_reservation where id = ?').run(plan.id);
    return { sourceId: plan.sourceId, foods, values, portions };
  }

  /** The per-100 g columns of every staged food, from its staged values (outside the lock). */
  private async fillCoreColumns(onStep?: () => Promise<void>): Promise<void> {
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
    const update = this.s.prepare(`update s_food set ${sets.join(', ')} where id between ? and ?`);
    const [lo, hi] = this.s.prepare('select min(id), max(id) from s_food').raw().get() as [
      number | null,
      number | null,
    ];
    if (lo === null || hi === null) return;
    // In slices, yielding between them: a server importing an upload keeps answering.
    const slice = Math.max(PUBLISH_SLICE_FOODS * 10, Math.ceil((hi - lo + 1) / 1000));
    for (let a = lo; a <= hi; a += slice) {
      update.run(...params, a, a + slice - 1);
      await (onStep ? onStep() : new Promise<void>((r) => setImmediate(r)));
    }
  }
}
