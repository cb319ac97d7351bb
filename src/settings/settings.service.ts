/**
 * Settings over the `setting` table. Each key is declared once in `settings.ts` with its zod
 * schema and cited default; a key never stored reads as its default.
 */
import type { Role } from '../auth/auth.js';
import type { Clock } from '../clock.js';
import { systemClock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError, BadRequestError } from '../errors.js';
import {
  SETTINGS,
  isSettingKey,
  type SettingDefinition,
  type SettingKey,
  type SettingValue,
  type SettingView,
} from './settings.js';
import { SettingsRepository } from './settings.repository.js';

export class UnknownSettingError extends AppError {
  constructor(key: string) {
    super('PHL_SETTINGS_UNKNOWN_KEY', 404, `no setting "${key}"`, { known: Object.keys(SETTINGS) });
  }
}

export type SettingIssue = { path: string; message: string };

/** Passed to `change` to go back to the default. */
export const RESET: unique symbol = Symbol('reset to default');

export class SettingsService {
  private readonly repo: SettingsRepository;

  constructor(
    db: Pick<Db, 'kysely'>,
    private readonly clock: Clock = systemClock,
  ) {
    this.repo = new SettingsRepository(db.kysely);
  }

  private def(key: string): SettingDefinition<unknown> {
    if (!isSettingKey(key)) throw new UnknownSettingError(key);
    return SETTINGS[key] as SettingDefinition<unknown>;
  }

  /** The value in force: the stored one, or the default when none is stored (or it no longer validates). */
  async get<K extends SettingKey>(key: K): Promise<SettingValue<K>> {
    return (await this.view(key)).value as SettingValue<K>;
  }

  /** The value with its default, source and whether it is the default. */
  async view(key: string): Promise<SettingView> {
    const def = this.def(key);
    const row = await this.repo.get(key);
    const base = {
      key,
      default: def.default,
      source: def.source,
      description: def.description,
      editableBy: def.editableBy,
    };
    if (row) {
      let parsed: unknown;
      try {
        parsed = JSON.parse(row.value_json);
      } catch {
        parsed = undefined;
      }
      const r = def.schema.safeParse(parsed);
      if (r.success) return { ...base, value: r.data, isDefault: false, updatedAt: row.updated_at };
    }
    return { ...base, value: def.default, isDefault: true, updatedAt: null };
  }

  /** Checks a value against the key's schema without saving it. */
  validate(
    key: string,
    value: unknown,
  ): { ok: true; value: unknown } | { ok: false; issues: SettingIssue[] } {
    const r = this.def(key).schema.safeParse(value);
    if (r.success) return { ok: true, value: r.data };
    return {
      ok: false,
      issues: r.error.issues.map((i) => ({
        path: i.path.map(String).join('.') || '(value)',
        message: i.message,
      })),
    };
  }

  /** Validates and stores a value; an invalid one is refused with every issue and nothing is saved. */
  async set<K extends SettingKey>(key: K, value: unknown): Promise<SettingView<SettingValue<K>>>;
  async set(key: string, value: unknown): Promise<SettingView>;
  async set(key: string, value: unknown): Promise<SettingView> {
    const checked = this.validate(key, value);
    if (!checked.ok) {
      throw new BadRequestError(
        'PHL_SETTINGS_INVALID',
        `setting "${key}" is invalid: ${checked.issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`,
        checked.issues,
      );
    }
    await this.repo.put(key, JSON.stringify(checked.value), this.clock.now().toISOString());
    return this.view(key);
  }

  /**
   * A change made by a signed-in user: refused (403) unless the setting's `editableBy` role is
   * theirs, and returned with the value in force before, for the audit log.
   */
  async change(
    role: Role,
    key: string,
    value: unknown | typeof RESET,
  ): Promise<{ before: SettingView; after: SettingView }> {
    const def = this.def(key);
    if (role !== 'admin' && def.editableBy !== role) {
      throw new AppError(
        'PHL_SETTINGS_FORBIDDEN',
        403,
        `setting "${key}" is changed by an ${def.editableBy} only`,
      );
    }
    const before = await this.view(key);
    const after = value === RESET ? await this.reset(key) : await this.set(key, value);
    return { before, after };
  }

  /** Removes the stored value so the default applies again. */
  async reset(key: string): Promise<SettingView> {
    this.def(key);
    await this.repo.remove(key);
    return this.view(key);
  }
}
