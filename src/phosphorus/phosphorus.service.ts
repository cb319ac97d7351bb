import { AdditiveScanRepository } from '../additives/additives.repository.js';
import type { IngredientAnalysis } from '../additives/ingredient-parser.js';
import { readStoredScan } from '../additives/scan.js';
import type { Db } from '../db/database.js';
import type { Food } from '../foods/food.js';
import { SettingsService } from '../settings/settings.service.js';
import { profileFood, type PhosphorusProfile } from './profile.js';

/**
 * Profiles for foods read from the database: uses the clinic's absorption fractions from
 * settings and each food's stored additive scan when it is current (else analyses the statement).
 */
export class PhosphorusService {
  private readonly scans: AdditiveScanRepository;
  private readonly settings: SettingsService;

  constructor(db: Pick<Db, 'kysely'>) {
    this.scans = new AdditiveScanRepository(db.kysely);
    this.settings = new SettingsService(db);
  }

  async profiles(foods: readonly Food[]): Promise<Map<number, PhosphorusProfile>> {
    const fractions = await this.settings.get('absorption');
    const withStatement = foods.filter((f) => f.ingredients !== null).map((f) => f.id);
    const stored = new Map<number, IngredientAnalysis>();
    if (withStatement.length > 0) {
      for (const row of await this.scans.getScans(withStatement)) {
        const scan = readStoredScan(row.additive_scan, row.additive_scan_version);
        if (scan) stored.set(row.id, scan);
      }
    }
    const out = new Map<number, PhosphorusProfile>();
    for (const f of foods)
      out.set(f.id, profileFood(f, fractions, { additiveScan: stored.get(f.id) ?? null }));
    return out;
  }

  async profile(food: Food): Promise<PhosphorusProfile> {
    return (await this.profiles([food])).get(food.id) as PhosphorusProfile;
  }
}
