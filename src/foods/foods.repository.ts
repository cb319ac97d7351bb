import { sql, type Kysely, type Selectable } from 'kysely';
import type { DB } from '../db/schema.js';
import type { FoodTable } from '../db/food.tables.js';
import type { Food, FoodKind, Portion } from './food.js';

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
   * FTS candidates of one kind, in index (rowid) order without bm25: ranking every match would
   * cost time proportional to the matches (a million foods for "c"); `limit` bounds the work.
   * `match` is an FTS5 expression over name/alt_names built from quoted words.
   */
  async ftsCandidates(opts: {
    match: string;
    kind: FoodKind;
    limit: number;
    source?: string | undefined;
    group?: string | undefined;
  }) {
    const match = `kind : ${opts.kind} AND (${opts.match})`;
    let q = this.db
      .selectFrom('food_fts')
      .innerJoin('food', 'food.id', 'food_fts.rowid')
      .select(['food.id', 'food.name', 'food.alt_names', 'food.kind', 'food.source_id'])
      .where(sql<boolean>`food_fts match ${match}`)
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
   * (kind, lower(name)) index), for the first ranking tier.
   */
  async nameStartCandidates(opts: {
    prefix: string;
    kind: FoodKind;
    limit: number;
    source?: string | undefined;
    group?: string | undefined;
  }) {
    // U+10FFFF sorts after every character (BINARY collation compares UTF-8 bytes).
    const upper = `${opts.prefix}\u{10FFFF}`;
    let q = this.db
      .selectFrom('food')
      .select(['food.id', 'food.name', 'food.alt_names', 'food.kind', 'food.source_id'])
      .where('food.kind', '=', opts.kind)
      .where(sql<boolean>`lower(food.name) >= ${opts.prefix}`)
      .where(sql<boolean>`lower(food.name) < ${upper}`)
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

  async listSources() {
    return this.db
      .selectFrom('food_source')
      .selectAll()
      .orderBy('format')
      .orderBy('release')
      .execute();
  }
}
