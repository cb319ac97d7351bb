import { describe, expect, it } from 'vitest';
import { openMemoryDb } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { FoodService } from '../../src/foods/foods.service.js';
import { hasSr28, SR28_MISSING } from './shared.js';
import { insertFoods, sr28Foods } from './sr28.js';

describe('test SR28 reader and food search over it (source: USDA SR28 files in ../shared)', () => {
  it.skipIf(!hasSr28)(
    `reads named foods with real values (${hasSr28 ? 'SR28 found' : SR28_MISSING})`,
    () => {
      const [cheddar] = sr28Foods('01009');
      // USDA SR28 NDB 01009 Cheese, cheddar: P 455 mg, protein 22.87 g per 100 g
      expect(cheddar?.name).toBe('Cheese, cheddar');
      expect(cheddar?.per100g.phosphorusMg).toBe(455);
      expect(cheddar?.per100g.proteinG).toBe(22.87);
      expect(cheddar?.group).toBe('Dairy and Egg Products');
      expect(cheddar?.portions.length).toBeGreaterThan(0);
    },
  );

  it.skipIf(!hasSr28)('finds inserted foods by name prefix and by NDB code', async () => {
    const db = await openMemoryDb();
    // USDA SR28 NDB 01009 Cheese, cheddar; 14400 Carbonated beverage, cola; 01123 Egg, whole, raw, fresh
    insertFoods(db, sr28Foods('01009', '14400', '01123'));
    const service = new FoodService(new FoodRepository(db.kysely));
    const byName = await service.search({ q: 'chedd', limit: 5 });
    expect(byName[0]?.name).toBe('Cheese, cheddar');
    const byCode = await service.search({ q: '14400', limit: 5 });
    expect(byCode[0]?.code).toBe('14400');
    await db.close();
  });
});
