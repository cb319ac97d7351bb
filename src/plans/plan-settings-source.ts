import type { Db } from '../db/database.js';
import { SettingsService } from '../settings/settings.service.js';
import type { ClinicSettings } from './plan-settings.js';
import type { PlanSettingsSource } from './plans.service.js';

/** The settings plans read, from the one settings service; plus the demo's clinic seeding. */
export function settingsSource(db: Pick<Db, 'kysely'>): PlanSettingsSource & {
  seedClinic(clinic: ClinicSettings): Promise<void>;
} {
  const settings = new SettingsService(db);
  return {
    absorption: () => settings.get('absorption'),
    thresholds: () => settings.get('thresholds'),
    async seedClinic(clinic) {
      const view = await settings.view('clinic');
      if (view.isDefault) await settings.set('clinic', clinic);
    },
  };
}
