import type { Kysely } from 'kysely';
import type { DB } from '../db/schema.js';

export interface SettingRow {
  key: string;
  value_json: string;
  updated_at: string;
}

/** All Kysely code for the `setting` table. */
export class SettingsRepository {
  constructor(private readonly db: Kysely<DB>) {}

  async get(key: string): Promise<SettingRow | undefined> {
    return this.db
      .selectFrom('setting')
      .select(['key', 'value_json', 'updated_at'])
      .where('key', '=', key)
      .executeTakeFirst();
  }

  async put(key: string, valueJson: string, updatedAt: string): Promise<void> {
    await this.db
      .insertInto('setting')
      .values({ key, value_json: valueJson, updated_at: updatedAt })
      .onConflict((oc) =>
        oc.column('key').doUpdateSet({ value_json: valueJson, updated_at: updatedAt }),
      )
      .execute();
  }

  async remove(key: string): Promise<void> {
    await this.db.deleteFrom('setting').where('key', '=', key).execute();
  }
}
