import type { Generated } from 'kysely';

export interface FoodSourceTable {
  id: Generated<number>;
  format: string;
  name: string;
  release: string;
  licence: string;
  url: string | null;
  imported_at: string;
  food_count: Generated<number>;
  nutrient_value_count: Generated<number>;
  portion_count: Generated<number>;
  skipped_count: Generated<number>;
}

export interface FoodTable {
  id: Generated<number>;
  source_id: number;
  code: string;
  name: string;
  alt_names: Generated<string>;
  food_group: string | null;
  kind: 'generic' | 'branded';
  brand_owner: string | null;
  gtin: string | null;
  ingredients: string | null;
  ingredients_lang: string | null;
  serving_g: number | null;
  serving_text: string | null;
  phosphorus_mg: number | null;
  protein_g: number | null;
  energy_kcal: number | null;
  potassium_mg: number | null;
  sodium_mg: number | null;
  calcium_mg: number | null;
  water_g: number | null;
  phytate_mg: number | null;
  additive_scan: string | null;
  additive_scan_version: string | null;
  /** SR28 NDB number (usda-sr28 code; FDC sr_legacy_food / foundation_food), for linking releases. */
  ndb_number: Generated<string | null>;
  /** A label serving given as a volume (ml); no grams without a density. */
  serving_ml: Generated<number | null>;
}

export interface NutrientDefTable {
  id: Generated<number>;
  source_id: number;
  code: string;
  name: string;
  unit: string;
  tag: string | null;
  sort_order: number | null;
}

export interface NutrientValueTable {
  food_id: number;
  nutrient_def_id: number;
  value_per_100g: number;
  derivation_code: string | null;
  source_code: string | null;
}

export interface PortionTable {
  id: Generated<number>;
  food_id: number;
  seq: number;
  amount: number;
  description: string;
  grams: number;
}

export interface FoodFtsTable {
  rowid: number;
  name: string;
  alt_names: string;
  kind: 'generic' | 'branded';
}

export interface SettingTable {
  key: string;
  value_json: string;
  updated_at: string;
}

export interface FoodTables {
  food_source: FoodSourceTable;
  food: FoodTable;
  nutrient_def: NutrientDefTable;
  nutrient_value: NutrientValueTable;
  portion: PortionTable;
  food_fts: FoodFtsTable;
  setting: SettingTable;
}
