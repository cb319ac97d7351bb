/**
 * Balancing from the outside: `phosledger plan balance` on the embedded default table (IFCT
 * 2017, bundled) with the invented demo plan, and POST /api/plans/:id/balance over USDA SR28
 * foods (validation, accept as a new version, audit log, OpenAPI). The SR28 part skips with its
 * reason when the release is missing, and fails when CI is set.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ifct2017 } from '../../data-import/ifct2017.js';
import { runCli } from '../../src/cli/main.js';
import { fixedClock } from '../../src/clock.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import type { Food } from '../../src/foods/food.js';
import { seedDemoData } from '../../src/plans/demo-seed.js';
import { balanceResultSchema } from '../../src/balance/balance.schema.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28 } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

function sink() {
  const s = new PassThrough();
  let text = '';
  s.on('data', (c: Buffer) => (text += c.toString('utf8')));
  return { stream: s, text: () => text };
}

describe('phosledger plan balance on the embedded IFCT 2017 table (invented demo plan)', () => {
  let dir: string;
  const cli = async (args: string[]) => {
    const out = sink();
    const err = sink();
    const code = await runCli([...args, '--db', join(dir, 'db.sqlite')], {
      stdout: out.stream,
      stderr: err.stream,
      stdin: new PassThrough(),
      env: {},
    });
    return { code, out: out.text(), err: err.text() };
  };
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'phosledger-balance-'));
    const db = openDb(join(dir, 'db.sqlite'));
    await migrateToLatest(db);
    const imported = await ifct2017.run(db, undefined, { clock });
    expect(imported.ok).toBe(true);
    await seedDemoData({
      db,
      clock,
      config: { seedDemo: true },
      io: { stdout: new PassThrough() },
    });
    await db.close();
  }, 120_000);
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('balances day 1 and prints the JSON contract', async () => {
    const r = await cli(['plan', 'balance', '1', '--day', '1', '--json']);
    expect(r.code, r.err).toBe(0);
    const json = JSON.parse(r.out);
    expect(() => balanceResultSchema.parse(json)).not.toThrow();
    expect(Object.keys(json)).toEqual(
      expect.arrayContaining([
        'status',
        'before',
        'after',
        'changes',
        'binding',
        'relaxed',
        'proposal',
      ]),
    );
    expect(['optimal', 'relaxed', 'unchanged']).toContain(json.status);
    for (const k of [
      'phosphorusMg',
      'absorbablePhosphorusMg',
      'proteinG',
      'energyKcal',
      'sodiumMg',
      'potassiumMg',
      'calciumMg',
    ])
      expect(json.after).toHaveProperty(k);
    // The demo patient's day 1 meets its limits as it stands, so the proposal carries no more
    // absorbable phosphorus than the day does now.
    expect(json.after.absorbablePhosphorusMg.typical).toBeLessThanOrEqual(
      json.before.absorbablePhosphorusMg.typical,
    );
    for (const c of json.changes) {
      expect(c).toEqual(
        expect.objectContaining({
          day: 1,
          occasion: expect.any(String),
          foodId: expect.any(Number),
        }),
      );
    }
    expect(json.proposal.days).toHaveLength(3);
    expect(json.saved).toBeNull();
  });

  it('prints the explanation as text and saves a new version with --accept', async () => {
    const text = await cli(['plan', 'balance', '1', '--day', '2']);
    expect(text.code, text.err).toBe(0);
    expect(text.out).toContain('day 2 (Day 2)');
    expect(text.out).toContain('A suggestion for the dietitian to review');
    expect(text.out).toContain('not saved');
    const acc = await cli(['plan', 'balance', '1', '--day', '2', '--accept', '--json']);
    expect(acc.code, acc.err).toBe(0);
    expect(JSON.parse(acc.out).saved).toEqual({ version: 2 });
    const show = await cli(['plan', 'show', '1', '--json']);
    const shown = JSON.parse(show.out);
    expect(shown.version).toBe(2);
    expect(shown.note).toMatch(/^Balanced day 2 by the optimiser/);
  });

  it('refuses a day the plan does not have, naming it', async () => {
    const r = await cli(['plan', 'balance', '1', '--day', '9']);
    expect(r.code).toBe(1);
    expect(r.err).toContain('day 9 does not exist: the plan has 3 days (PHL_BALANCE_DAY)');
  });
});

const runSr28 = hasSr28;

describe.skipIf(!runSr28)('POST /api/plans/:id/balance (USDA SR28 foods)', () => {
  let ctx: TestContext;
  let planId: number;
  let f: Record<string, Food>;
  // USDA SR28 NDB numbers
  const NDB = {
    bread: '18069', // Bread, white, commercially prepared
    milk: '01077', // Milk, whole, 3.25% milkfat
    chicken: '05064', // Chicken, broilers or fryers, breast, meat only, cooked, roasted
    rice: '20045', // Rice, white, long-grain, regular, enriched, cooked
    cheddar: '01009', // Cheese, cheddar
    apple: '09003', // Apples, raw, with skin
    eggWhite: '01124', // Egg, white, raw, fresh
    oil: '04053', // Oil, olive, salad or cooking
  };
  beforeAll(async () => {
    ctx = await createTestContext();
    const keys = Object.keys(NDB) as (keyof typeof NDB)[];
    const foods = insertFoods(ctx.db, sr28Foods(...keys.map((k) => NDB[k])));
    f = Object.fromEntries(keys.map((k, i) => [k, foods[i] as Food]));
    // Invented demo patient: 70 kg on hemodialysis -> protein 70-84 g/day (KDOQI 2020 1.0-1.2 g/kg)
    const patient = await ctx.inject({
      method: 'POST',
      url: '/api/patients',
      payload: {
        label: 'TEST-19 (invented)',
        weightKg: 70,
        ckdStage: '5',
        dialysis: 'hemodialysis',
        diabetes: false,
        binder: {
          ingredient: 'calcium-acetate',
          unitStrengthMg: 667,
          schedule: 'per-day',
          units: 6,
        },
      },
    });
    expect(patient.statusCode, patient.body).toBe(201);
    const g = (food: Food, grams: number) => ({ foodId: food.id, grams });
    const plan = await ctx.inject({
      method: 'POST',
      url: `/api/patients/${patient.json().id}/plans`,
      payload: {
        name: 'Balance test (invented demo plan)',
        days: [
          {
            label: 'Monday',
            occasions: [
              { name: 'Breakfast', items: [g(f.bread!, 120), g(f.milk!, 250)] },
              {
                name: 'Lunch',
                items: [g(f.chicken!, 120), g(f.rice!, 300), g(f.cheddar!, 40), g(f.oil!, 20)],
              },
              { name: 'Snack', items: [g(f.apple!, 150)] },
            ],
          },
        ],
      },
    });
    expect(plan.statusCode, plan.body).toBe(201);
    planId = plan.json().id;
  });
  afterAll(async () => ctx?.close());

  it('answers the contract, never below the protein target, and keeps the binder', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: `/api/plans/${planId}/balance`,
      payload: { day: 1, candidates: [{ foodId: f.eggWhite!.id, occasion: 'breakfast' }] },
    });
    expect(res.statusCode, res.body).toBe(200);
    const r = balanceResultSchema.parse(res.json());
    expect(r.status, JSON.stringify(r.relaxed)).not.toBe('relaxed');
    // KDOQI 2020 hemodialysis 1.0-1.2 g/kg x 70 kg: at least 70 g protein
    expect(r.after.proteinG).toBeGreaterThanOrEqual(70);
    expect(r.after.proteinG).toBeLessThanOrEqual(84);
    expect(r.changes.length).toBeGreaterThan(0);
    expect(r.caution).toMatch(/never changes the phosphate binder prescription/);
    const summary = await ctx.inject({ url: `/api/plans/${planId}/summary` });
    expect(summary.json().binders.prescription).toMatchObject({
      units: 6,
      ingredient: 'calcium-acetate',
    });
  });

  it('saves the proposal as a new version with accept, and audits it', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: `/api/plans/${planId}/balance`,
      payload: { day: 1, robust: true, accept: true },
    });
    expect(res.statusCode, res.body).toBe(200);
    expect(res.json().objective).toBe('high');
    expect(res.json().saved).toEqual({ version: 2 });
    const plan = await ctx.inject({ url: `/api/plans/${planId}` });
    expect(plan.json()).toMatchObject({ version: 2, latestVersion: 2 });
    expect(plan.json().note).toContain('high-end');
    const events = ctx.db.sqlite
      .prepare(
        "select entity, entity_id, patient_id, outcome from audit_event where action = 'plan.balance'",
      )
      .all() as { entity: string; entity_id: string; patient_id: string; outcome: string }[];
    expect(events.length).toBeGreaterThanOrEqual(1);
    // who and which plan and patient, never the plan's contents
    expect(events.at(-1)).toMatchObject({
      entity: 'plan',
      entity_id: String(planId),
      patient_id: '1',
    });
  });

  it('refuses bad requests with the field and reason, saving nothing', async () => {
    const bad = await ctx.inject({
      method: 'POST',
      url: `/api/plans/${planId}/balance`,
      payload: { day: 'one' },
    });
    expect(bad.statusCode).toBe(400);
    expect(bad.body).toContain('day');
    const noDay = await ctx.inject({
      method: 'POST',
      url: `/api/plans/${planId}/balance`,
      payload: { day: 4 },
    });
    expect(noDay.statusCode).toBe(400);
    expect(noDay.json().error.code).toBe('PHL_BALANCE_DAY');
    const noOcc = await ctx.inject({
      method: 'POST',
      url: `/api/plans/${planId}/balance`,
      payload: { candidates: [{ foodId: f.apple!.id, occasion: 'Supper' }], accept: true },
    });
    expect(noOcc.statusCode).toBe(400);
    expect(noOcc.json().error.code).toBe('PHL_BALANCE_CANDIDATE');
    const missing = await ctx.inject({
      method: 'POST',
      url: '/api/plans/999/balance',
      payload: {},
    });
    expect(missing.statusCode).toBe(404);
    const plan = await ctx.inject({ url: `/api/plans/${planId}` });
    expect(plan.json().latestVersion).toBe(2);
  });

  it('is in the OpenAPI document with its request and response schemas', async () => {
    const doc = (await ctx.inject({ url: '/api/docs/json' })).json();
    const op = doc.paths['/api/plans/{id}/balance']?.post;
    expect(op).toBeDefined();
    expect(JSON.stringify(op.requestBody)).toContain('swapCandidates');
    expect(JSON.stringify(op.responses['200'])).toContain('relaxed');
  });
});
