/**
 * Test-only reader for named foods of the USDA SR28 ASCII release in ../shared (public domain).
 * Tests use it to get real values without running the full importer; expected values in tests
 * still name their NDB numbers. Callers must skip when `hasSr28` is false.
 */
import { readFileSync } from 'node:fs';
import type { Db } from '../../src/db/database.js';
import type { Food, NutrientsPer100g } from '../../src/foods/food.js';
import { testFood } from './food.js';
import { SR28_DIR } from './shared.js';

function readRows(file: string): string[][] {
  const text = readFileSync(`${SR28_DIR}/${file}`, 'latin1');
  return text
    .split('\r\n')
    .filter((l) => l.length > 0)
    .map((l) => l.split('^').map((f) => f.replace(/^~|~$/g, '')));
}

// SR28 Nutr_No -> core nutrient (USDA SR28 documentation, NUTR_DEF).
const CORE: Record<string, keyof NutrientsPer100g> = {
  '305': 'phosphorusMg',
  '203': 'proteinG',
  '208': 'energyKcal',
  '306': 'potassiumMg',
  '307': 'sodiumMg',
  '301': 'calciumMg',
  '255': 'waterG',
};

let cache: Map<string, Food> | undefined;

/** Every SR28 food as a domain Food, keyed by NDB number (ids are the NDB number as a number). */
export function loadAllSr28Foods(): Map<string, Food> {
  if (cache) return cache;
  const groups = new Map(readRows('FD_GROUP.txt').map((r) => [r[0] as string, r[1] as string]));
  const foods = new Map<string, Food>();
  for (const r of readRows('FOOD_DES.txt')) {
    const ndb = r[0] as string;
    foods.set(
      ndb,
      testFood({
        id: Number(ndb),
        source: 'usda-sr28',
        sourceRelease: 'SR28',
        code: ndb,
        name: r[2] as string,
        altNames: r[4] ? [r[4]] : [],
        group: groups.get(r[1] as string) ?? null,
        brandOwner: r[5] || null,
      }),
    );
  }
  for (const r of readRows('NUT_DATA.txt')) {
    const key = CORE[r[1] as string];
    if (!key) continue;
    const food = foods.get(r[0] as string);
    if (food) food.per100g[key] = Number(r[2]);
  }
  let portionId = 1;
  for (const r of readRows('WEIGHT.txt')) {
    const food = foods.get(r[0] as string);
    if (food) {
      food.portions.push({
        id: portionId++,
        amount: Number(r[2]),
        description: r[3] as string,
        grams: Number(r[4]),
      });
    }
  }
  cache = foods;
  return foods;
}

/** Named SR28 foods by NDB number; throws if one is missing (a typo in a test). */
export function sr28Foods(...ndbNumbers: string[]): Food[] {
  const all = loadAllSr28Foods();
  return ndbNumbers.map((n) => {
    const f = all.get(n);
    if (!f) throw new Error(`NDB ${n} is not in USDA SR28`);
    return structuredClone(f);
  });
}

/**
 * Writes foods into a migrated test database (one source per call) and returns them with their
 * new database ids and portion ids. For tests that need foods in the database without the
 * full importer.
 */
export function insertFoods(
  db: Db,
  foods: readonly Food[],
  source = { format: 'usda-sr28', name: 'USDA SR28 (test subset)', release: 'SR28-test' },
): Food[] {
  const s = db.sqlite;
  const out: Food[] = [];
  s.transaction(() => {
    const src = s
      .prepare(
        `insert into food_source (format, name, release, licence, imported_at, food_count)
         values (?, ?, ?, 'public domain', '2026-03-05T09:30:00Z', ?)`,
      )
      .run(source.format, source.name, source.release, foods.length);
    const sourceId = Number(src.lastInsertRowid);
    const insFood = s.prepare(
      `insert into food (source_id, code, name, alt_names, food_group, kind, brand_owner, gtin,
        ingredients, ingredients_lang, serving_g, serving_text, phosphorus_mg, protein_g,
        energy_kcal, potassium_mg, sodium_mg, calcium_mg, water_g, phytate_mg)
       values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    const insFts = s.prepare(
      'insert into food_fts (rowid, name, alt_names, kind) values (?, ?, ?, ?)',
    );
    const insPortion = s.prepare(
      'insert into portion (food_id, seq, amount, description, grams) values (?, ?, ?, ?, ?)',
    );
    for (const f of foods) {
      const p = f.per100g;
      const id = Number(
        insFood.run(
          sourceId,
          f.code,
          f.name,
          JSON.stringify(f.altNames),
          f.group,
          f.kind,
          f.brandOwner,
          f.gtin,
          f.ingredients,
          f.ingredientsLanguage,
          f.servingG,
          f.servingText,
          p.phosphorusMg,
          p.proteinG,
          p.energyKcal,
          p.potassiumMg,
          p.sodiumMg,
          p.calciumMg,
          p.waterG,
          p.phytateMg,
        ).lastInsertRowid,
      );
      insFts.run(id, f.name, f.altNames.join(' '), f.kind);
      const portions = f.portions.map((pt, i) => ({
        ...pt,
        id: Number(insPortion.run(id, i + 1, pt.amount, pt.description, pt.grams).lastInsertRowid),
      }));
      out.push({
        ...f,
        id,
        sourceId,
        source: source.format,
        sourceRelease: source.release,
        portions,
      });
    }
  })();
  return out;
}
