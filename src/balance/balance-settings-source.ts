import type { Db } from '../db/database.js';
import { settingsSource } from '../plans/plan-settings-source.js';
import { SettingsService } from '../settings/settings.service.js';
import type { BalanceSettingsSource } from './balance.service.js';

/** The settings balancing reads: the plan settings and the clinic's `balancing` key. */
export function balanceSettingsSource(db: Pick<Db, 'kysely'>): BalanceSettingsSource {
  const settings = new SettingsService(db);
  const plans = settingsSource(db);
  return {
    absorption: plans.absorption,
    thresholds: plans.thresholds,
    balancing: () => settings.get('balancing'),
  };
}
