import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEFAULT_ABSORPTION_FRACTIONS } from '../../src/phosphorus/absorption.js';
import { SETTINGS } from '../../src/settings/settings.js';
import { SettingsService } from '../../src/settings/settings.service.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestContext();
});
afterEach(async () => {
  await ctx.close();
});

// Invented clinic values for the override (not from any clinic).
const clinicFractions = {
  ...DEFAULT_ABSORPTION_FRACTIONS,
  additive: { low: 0.7, typical: 0.85, high: 0.95 },
};

describe('SettingsService over the setting table', () => {
  it('reads the cited default when nothing is stored', async () => {
    const s = new SettingsService(ctx.db, ctx.clock);
    expect(await s.get('absorption')).toEqual(DEFAULT_ABSORPTION_FRACTIONS);
    const v = await s.view('absorption');
    expect(v.isDefault).toBe(true);
    expect(v.source).toMatch(/EFSA/);
    expect(SETTINGS.absorption.source).toMatch(/Kalantar-Zadeh/);
  });

  it('stores a valid value with the time, and resets to the default', async () => {
    const s = new SettingsService(ctx.db, ctx.clock);
    const saved = await s.set('absorption', clinicFractions);
    expect(saved).toMatchObject({ isDefault: false, updatedAt: '2026-03-05T09:30:00.000Z' });
    expect(await s.get('absorption')).toEqual(clinicFractions);
    await s.reset('absorption');
    expect(await s.get('absorption')).toEqual(DEFAULT_ABSORPTION_FRACTIONS);
  });

  it('refuses an invalid value with every issue and keeps the stored one', async () => {
    const s = new SettingsService(ctx.db, ctx.clock);
    await s.set('absorption', clinicFractions);
    const bad = { ...clinicFractions, phytate: { low: 0.3, typical: 0.2, high: 1.2 } };
    await expect(s.set('absorption', bad)).rejects.toMatchObject({
      code: 'PHL_SETTINGS_INVALID',
      statusCode: 400,
    });
    expect(await s.get('absorption')).toEqual(clinicFractions);
  });

  it('falls back to the default when a stored row no longer validates', async () => {
    ctx.db.sqlite
      .prepare(
        "insert into setting (key, value_json, updated_at) values ('absorption', '{\"broken\":1}', '2026-01-01T00:00:00Z')",
      )
      .run();
    const v = await new SettingsService(ctx.db, ctx.clock).view('absorption');
    expect(v.isDefault).toBe(true);
    expect(v.value).toEqual(DEFAULT_ABSORPTION_FRACTIONS);
  });
});

describe('GET/PUT/DELETE /api/settings/:key (changed by an admin)', () => {
  it('round-trips a value', async () => {
    const { inject } = await ctx.signIn('admin');
    const put = await inject({
      method: 'PUT',
      url: '/api/settings/absorption',
      payload: clinicFractions,
    });
    expect(put.statusCode).toBe(200);
    const get = await ctx.inject({ method: 'GET', url: '/api/settings/absorption' });
    expect(get.json()).toMatchObject({
      key: 'absorption',
      value: clinicFractions,
      isDefault: false,
    });
    const del = await inject({ method: 'DELETE', url: '/api/settings/absorption' });
    expect(del.json()).toMatchObject({ isDefault: true, value: DEFAULT_ABSORPTION_FRACTIONS });
  });

  it('answers 400 with the issues for an invalid value, and 404 for an unknown key', async () => {
    const { inject } = await ctx.signIn('admin');
    const bad = await inject({
      method: 'PUT',
      url: '/api/settings/absorption',
      payload: { ...clinicFractions, animalOrganic: { low: 0.6, typical: 0.5, high: 0.7 } },
    });
    expect(bad.statusCode).toBe(400);
    expect(bad.json().error.code).toBe('PHL_SETTINGS_INVALID');
    expect(bad.json().error.details[0].path).toBe('animalOrganic');
    const unknown = await ctx.inject({ method: 'GET', url: '/api/settings/no-such-key' });
    expect(unknown.statusCode).toBe(404);
    expect(unknown.json().error.code).toBe('PHL_SETTINGS_UNKNOWN_KEY');
  });
});
