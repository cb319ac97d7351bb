import { sql, type Kysely, type Selectable } from 'kysely';
import type { DB } from '../db/schema.js';
import type { FoodTable } from '../db/food.tables.js';
import type { Food, FoodKind, Portion } from './food.js';
import type { NameIndexSource, NameRow } from './name-index.js';
import { ftsTierQueries, isAscii } from './text.js';

type FoodRow = Selectable<FoodTable> & { source_format: string; source_release: string };

const foodColumns = [
  'food.id',
  'food.source_id',
  'food.code',
  'food.name',
  'food.alt_names',
  'food.food_group',
  'food.kind',
  'food.brand_owner',
  'food.gtin',
  'food.ingredients',
  'food.ingredients_lang',
  'food.serving_g',
  'food.serving_text',
  'food.phosphorus_mg',
  'food.protein_g',
  'food.energy_kcal',
  'food.potassium_mg',
  'food.sodium_mg',
  'food.calcium_mg',
  'food.water_g',
  'food.phytate_mg',
  'food.additive_scan',
  'food.additive_scan_version',
  'food_source.format as source_format',
  'food_source.release as source_release',
] as const;

/** The columns of a search candidate (`NameRow`). */
const nameRowColumns = [
  'food.id',
  'food.name',
  'food.alt_names',
  'food.kind',
  'food.source_id',
] as const;

function parseAltNames(json: string): string[] {
  try {
    const v: unknown = JSON.parse(json);
    return Array.isArray(v) ? v.filter((x): x is string => typeof x === 'string') : [];
  } catch {
    return [];
  }
}

/** The one row-to-domain mapper for foods. */
export function rowToFood(row: FoodRow, portions: Portion[]): Food {
  return {
    id: row.id,
    sourceId: row.source_id,
    source: row.source_format,
    sourceRelease: row.source_release,
    code: row.code,
    name: row.name,
    altNames: parseAltNames(row.alt_names),
    group: row.food_group,
    kind: row.kind as FoodKind,
    brandOwner: row.brand_owner,
    gtin: row.gtin,
    ingredients: row.ingredients,
    ingredientsLanguage: row.ingredients_lang,
    servingG: row.serving_g,
    servingText: row.serving_text,
    per100g: {
      phosphorusMg: row.phosphorus_mg,
      proteinG: row.protein_g,
      energyKcal: row.energy_kcal,
      potassiumMg: row.potassium_mg,
      sodiumMg: row.sodium_mg,
      calciumMg: row.calcium_mg,
      waterG: row.water_g,
      phytateMg: row.phytate_mg,
    },
    portions,
  };
}

export class FoodRepository {
  constructor(private readonly db: Kysely<DB>) {}

  /** Foods with their portions, by id; missing ids are simply absent from the map. */
  async getFoods(ids: readonly number[]): Promise<Map<number, Food>> {
    const out = new Map<number, Food>();
    const unique = [...new Set(ids)];
    // The ids go in as one JSON array: one SQL text (a kept statement) for any number of ids.
    for (let i = 0; i < unique.length; i += 5000) {
      const idsJson = JSON.stringify(unique.slice(i, i + 5000));
      const rows = await this.db
        .selectFrom('food')
        .innerJoin('food_source', 'food_source.id', 'food.source_id')
        .select(foodColumns)
        .where(sql<boolean>`food.id in (select value from json_each(${idsJson}))`)
        .execute();
      const portionRows = await this.db
        .selectFrom('portion')
        .select(['id', 'food_id', 'description', 'amount', 'grams'])
        .where(sql<boolean>`food_id in (select value from json_each(${idsJson}))`)
        .orderBy('food_id')
        .orderBy('seq')
        .execute();
      const byFood = new Map<number, Portion[]>();
      for (const p of portionRows) {
        const list = byFood.get(p.food_id) ?? [];
        list.push({ id: p.id, description: p.description, amount: p.amount, grams: p.grams });
        byFood.set(p.food_id, list);
      }
      for (const r of rows) out.set(r.id, rowToFood(r as FoodRow, byFood.get(r.id) ?? []));
    }
    return out;
  }

  async getFood(id: number): Promise<Food | undefined> {
    return (await this.getFoods([id])).get(id);
  }

  /** Every nutrient the source table gave for one food, with units and derivation codes. */
  async getAllNutrients(foodId: number) {
    return this.db
      .selectFrom('nutrient_value')
      .innerJoin('nutrient_def', 'nutrient_def.id', 'nutrient_value.nutrient_def_id')
      .select([
        'nutrient_def.code',
        'nutrient_def.name',
        'nutrient_def.unit',
        'nutrient_def.tag',
        'nutrient_value.value_per_100g',
        'nutrient_value.derivation_code',
        'nutrient_value.source_code',
      ])
      .where('nutrient_value.food_id', '=', foodId)
      .orderBy('nutrient_def.sort_order')
      .orderBy('nutrient_def.code')
      .execute();
  }

  async getProvenance(sourceId: number) {
    return this.db
      .selectFrom('food_source')
      .select(['format', 'name', 'release', 'licence', 'url', 'imported_at'])
      .where('id', '=', sourceId)
      .executeTakeFirst();
  }

  async getAdditiveScan(foodId: number) {
    return this.db
      .selectFrom('food')
      .select(['additive_scan', 'additive_scan_version'])
      .where('id', '=', foodId)
      .executeTakeFirst();
  }

  /** Food ids whose code in their table, or whose barcode, equals the text. */
  async findIdsByCode(code: string, source?: string): Promise<number[]> {
    const variants = new Set([code]);
    if (/^\d+$/.test(code)) {
      // GTIN-8/12/13/14 are the same barcode left-padded with zeros.
      const bare = code.replace(/^0+/, '');
      for (const len of [8, 12, 13, 14])
        if (bare.length <= len) variants.add(bare.padStart(len, '0'));
      if (code.length < 5) variants.add(code.padStart(5, '0')); // SR28 NDB numbers are 5 digits
    }
    const list = [...variants];
    let q = this.db
      .selectFrom('food')
      .innerJoin('food_source', 'food_source.id', 'food.source_id')
      .select('food.id')
      .where((eb) => eb.or([eb('food.code', 'in', list), eb('food.gtin', 'in', list)]))
      .limit(20);
    if (source) q = q.where('food_source.format', '=', source);
    return (await q.execute()).map((r) => r.id);
  }

  /**
   * FTS candidates of one kind: every word is the prefix of a word of the name or of an alternate
   * name, in rowid order without bm25 (ranking every match would cost time proportional to the
   * matches: a million foods for "c"); `limit` bounds the work.
   */
  async wordCandidates(opts: {
    words: readonly string[];
    kind: FoodKind;
    limit: number;
    source?: string | undefined;
    group?: string | undefined;
  }): Promise<NameRow[]> {
    const match = `kind : ${opts.kind} AND (${ftsTierQueries(opts.words).any})`;
    let q = this.db
      .selectFrom('food_fts')
      .innerJoin('food', 'food.id', 'food_fts.rowid')
      .select(nameRowColumns)
      .where(sql<boolean>`food_fts match ${match}`)
      .orderBy(sql`food_fts.rowid`)
      .limit(opts.limit);
    if (opts.group) q = q.where('food.food_group', '=', opts.group);
    if (opts.source) {
      q = q.where('food.source_id', 'in', (eb) =>
        eb
          .selectFrom('food_source')
          .select('id')
          .where('format', '=', opts.source as string),
      );
    }
    return q.execute();
  }

  /**
   * Foods of one kind whose lower-cased main name starts with `prefix` (a range scan on the
   * (kind, lower(name)) index, in its order), for the first ranking tier.
   */
  async nameStartCandidates(opts: {
    prefix: string;
    kind: FoodKind;
    limit: number;
    source?: string | undefined;
    group?: string | undefined;
  }): Promise<NameRow[]> {
    // U+10FFFF sorts after every character (BINARY collation compares UTF-8 bytes).
    const upper = `${opts.prefix}\u{10FFFF}`;
    let q = this.db
      .selectFrom('food')
      .select(nameRowColumns)
      .where('food.kind', '=', opts.kind)
      .where(sql<boolean>`lower(food.name) >= ${opts.prefix}`)
      .where(sql<boolean>`lower(food.name) < ${upper}`)
      .orderBy(sql`lower(food.name)`)
      .orderBy('food.id')
      .limit(opts.limit);
    if (opts.group) q = q.where('food.food_group', '=', opts.group);
    if (opts.source) {
      q = q.where('food.source_id', 'in', (eb) =>
        eb
          .selectFrom('food_source')
          .select('id')
          .where('format', '=', opts.source as string),
      );
    }
    return q.execute();
  }

  /**
   * What `FoodNameIndex` is built from: every food of the kind with SQLite's own `lower(name)`
   * in index order, and every FTS document of the kind with its tokens. Plain-ASCII text is
   * split here (FTS5's unicode61 tokenizer keeps exactly the runs of ASCII letters and digits,
   * lower-cased); any other text is tokenized by FTS5 itself, in a temporary table with the same
   * tokenizer, so the tokens are SQLite's and not a re-implementation of them. Null when the kind
   * has more than `max` foods.
   */
  async loadNameIndexSource(kind: FoodKind, max = Infinity): Promise<NameIndexSource | null> {
    if (Number.isFinite(max)) {
      // Counted on the (kind, lower(name)) index, stopping one past the bound.
      const over = await sql<{
        n: number;
      }>`select count(*) as n from (select 1 from food where kind = ${kind} limit ${max + 1})`.execute(
        this.db,
      );
      if ((over.rows[0]?.n ?? 0) > max) return null;
    }
    const byName = (
      await this.db
        .selectFrom('food')
        .select([...nameRowColumns, sql<string>`lower(food.name)`.as('name_key')])
        .where('food.kind', '=', kind)
        .orderBy(sql`lower(food.name)`)
        .orderBy('food.id')
        .execute()
    ).map(({ name_key, ...row }) => ({ row, key: name_key }));
    const rowById = new Map<number, NameRow>(byName.map((r) => [r.row.id, r.row]));
    const docRows = await this.db
      .selectFrom('food_fts')
      .innerJoin('food', 'food.id', 'food_fts.rowid')
      .select([
        ...nameRowColumns,
        sql<string>`coalesce(food_fts.name, '') || ' ' || coalesce(food_fts.alt_names, '')`.as(
          'indexed',
        ),
      ])
      .where(sql<boolean>`food_fts match ${`kind : ${kind}`}`)
      .orderBy(sql`food_fts.rowid`)
      .execute();
    const other: { id: number; text: string }[] = [];
    const docs = docRows.map(({ indexed, ...r }) => {
      const row = rowById.get(r.id) ?? r;
      if (isAscii(indexed))
        return { row, tokens: [...new Set(indexed.toLowerCase().match(/[a-z0-9]+/g))] };
      other.push({ id: r.id, text: indexed });
      return { row, tokens: [] as string[] };
    });
    if (other.length > 0) {
      const tokens = await this.ftsTokens(other);
      for (const d of docs) {
        const t = tokens.get(d.row.id);
        if (t) d.tokens = t;
      }
    }
    return { byName, docs };
  }

  /** FTS5's own tokens of each text (unicode61, remove_diacritics 2, as food_fts), distinct. */
  private async ftsTokens(texts: readonly { id: number; text: string }[]) {
    return this.db.connection().execute(async (conn) => {
      // One connection throughout (temporary tables are per connection); leftovers of a build
      // that died half-way are dropped first.
      await sql`drop table if exists temp.name_tokens_terms`.execute(conn);
      await sql`drop table if exists temp.name_tokens`.execute(conn);
      await sql`create virtual table temp.name_tokens using fts5(t, tokenize = 'unicode61 remove_diacritics 2')`.execute(
        conn,
      );
      try {
        await sql`create virtual table temp.name_tokens_terms using fts5vocab(temp, name_tokens, 'instance')`.execute(
          conn,
        );
        await sql`insert into temp.name_tokens (rowid, t) select value ->> '$[0]', value ->> '$[1]' from json_each(${JSON.stringify(texts.map((t) => [t.id, t.text]))})`.execute(
          conn,
        );
        const rows = await sql<{
          term: string;
          doc: number;
        }>`select term, doc from temp.name_tokens_terms`.execute(conn);
        const out = new Map<number, string[]>();
        for (const r of rows.rows) {
          const list = out.get(r.doc) ?? [];
          if (!list.includes(r.term)) list.push(r.term);
          out.set(r.doc, list);
        }
        return out;
      } finally {
        await sql`drop table if exists temp.name_tokens_terms`.execute(conn);
        await sql`drop table if exists temp.name_tokens`.execute(conn);
      }
    });
  }

  /** The object caches of this database are kept under (one per Kysely instance). */
  cacheKey(): object {
    return this.db;
  }

  /** Changes whenever a food table is imported, replaced or removed. */
  async tablesStamp(): Promise<string> {
    const s = await sql<{
      stamp: string;
    }>`select coalesce(max(id), 0) || ':' || count(*) || ':' || coalesce(sum(food_count), 0) as stamp from food_source`.execute(
      this.db,
    );
    return s.rows[0]?.stamp ?? '';
  }

  /**
   * The FTS index's own terms of food names and alternate names with how many foods carry each
   * (fts5vocab over food_fts), for spelling tolerance.
   */
  async spellingTerms(): Promise<{ term: string; docs: number }[]> {
    return this.db.connection().execute(async (conn) => {
      await sql`create virtual table if not exists temp.food_terms using fts5vocab(main, food_fts, 'col')`.execute(
        conn,
      );
      const rows = await sql<{
        term: string;
        docs: number;
      }>`select term, sum(doc) as docs from temp.food_terms where col in ('name', 'alt_names') group by term`.execute(
        conn,
      );
      return rows.rows;
    });
  }

  async listSources() {
    return this.db
      .selectFrom('food_source')
      .selectAll()
      .orderBy('format')
      .orderBy('release')
      .execute();
  }
}
