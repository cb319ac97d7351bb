import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { PatientRepository } from '../patients/patients.repository.js';
import { PatientService } from '../patients/patients.service.js';
import type { PatientInput } from '../patients/patient.js';
import type { PlanInput } from './plan.js';
import { settingsSource } from './plan-settings-source.js';
import { PlanService } from './plans.service.js';

/** Everything below is invented demo data, marked as such wherever it is shown. */
export const DEMO_CLINIC = {
  name: 'Demo Renal Nutrition Clinic (invented demo data)',
  contact: 'demo-clinic@example.invalid',
  dietitianName: 'Demo Dietitian (invented)',
};

/** IFCT 2017 food codes the demo plan uses (Longvah T et al., Indian Food Composition Tables 2017, NIN). */
export const DEMO_FOOD_CODES = [
  'A019', // Wheat flour, atta
  'A015', // Rice, raw, milled
  'A011', // Rice flakes
  'B010', // Green gram, dal
  'B013', // Lentil dal
  'L002', // Milk, whole, Cow
  'L003', // Paneer
  'M004', // Egg, poultry, whole, boiled
  'N003', // Chicken, poultry, breast, skinless
  'D036', // Cauliflower
  'D075', // Tomato, ripe, hybrid
  'F006', // Potato, brown skin, big
  'G017', // Onion, big
  'C033', // Spinach
  'E012', // Banana, ripe, robusta
  'E001', // Apple, big
  'T005', // Groundnut oil
] as const;
type DemoCode = (typeof DEMO_FOOD_CODES)[number];

/** Invented demo patient: hemodialysis, no diabetes, a binder prescription to pair with meals. */
export function demoPatient(today: Date): PatientInput {
  const daysAgo = (n: number) =>
    new Date(today.getTime() - n * 86_400_000).toISOString().slice(0, 10);
  return {
    label: 'DEMO-01 (invented demo patient)',
    name: null,
    language: 'en',
    weightKg: 62,
    ckdStage: '5',
    dialysis: 'hemodialysis',
    diabetes: false,
    labs: [
      { analyte: 'phosphate', value: 1.94, unit: 'mmol/L', date: daysAgo(3) },
      { analyte: 'calcium', value: 9.1, unit: 'mg/dL', date: daysAgo(3) },
    ],
    binder: {
      ingredient: 'calcium-acetate',
      unitStrengthMg: 667,
      schedule: 'per-day',
      units: 6,
      otherMedicines: ['levothyroxine'],
    },
    targetOverrides: {},
    identifier: null,
  };
}

type Item = [DemoCode, number, string?];
const occ = (name: string, time: string, items: Item[], kind?: 'meal' | 'snack') => ({
  name,
  time,
  ...(kind ? { kind } : {}),
  items: items.map(([code, grams, label]) => ({ code, grams, label: label ?? null })),
});

/** The demo plan with food codes (ids are looked up in the imported table). */
export const DEMO_PLAN = {
  name: 'Three-day starter plan (invented demo data)',
  note: 'Demo data: invented to show the whole loop.',
  days: [
    {
      label: 'Day 1',
      occasions: [
        occ('Breakfast', '08:00', [
          ['A019', 90, 'chapati (3)'],
          ['M004', 50, 'boiled egg'],
          ['L002', 150, 'milk'],
          ['E012', 100, 'banana'],
        ]),
        occ('Lunch', '13:00', [
          ['A015', 120, 'rice'],
          ['B010', 30, 'moong dal'],
          ['D036', 100, 'cauliflower sabzi'],
          ['T005', 15, 'oil'],
        ]),
        occ('Snack', '16:30', [['E001', 120, 'apple']]),
        occ('Dinner', '20:00', [
          ['A019', 90, 'chapati (3)'],
          ['N003', 100, 'chicken curry'],
          ['D075', 50, 'tomato'],
          ['G017', 40, 'onion'],
          ['T005', 15, 'oil'],
        ]),
      ],
    },
    {
      label: 'Day 2',
      occasions: [
        occ('Breakfast', '08:00', [
          ['A011', 60, 'poha'],
          ['G017', 20, 'onion'],
          ['T005', 10, 'oil'],
          ['L002', 150, 'milk in tea'],
        ]),
        occ('Lunch', '13:00', [
          ['A015', 120, 'rice'],
          ['B013', 40, 'masoor dal'],
          ['C033', 80, 'palak'],
          ['T005', 15, 'oil'],
        ]),
        occ('Snack', '17:00', [['M004', 100, 'boiled eggs (2)']]),
        occ('Dinner', '20:00', [
          ['A019', 90, 'chapati (3)'],
          ['L003', 40, 'paneer'],
          ['F006', 100, 'aloo sabzi'],
          ['D075', 50, 'tomato'],
          ['T005', 15, 'oil'],
        ]),
      ],
    },
    {
      label: 'Day 3',
      occasions: [
        occ('Breakfast', '08:00', [
          ['A019', 90, 'paratha'],
          ['T005', 10, 'oil'],
          ['L002', 150, 'milk'],
        ]),
        occ('Lunch', '13:00', [
          ['A015', 120, 'rice'],
          ['L003', 60, 'paneer curry'],
          ['D075', 50, 'tomato'],
          ['G017', 30, 'onion'],
          ['T005', 15, 'oil'],
        ]),
        occ('Snack', '16:30', [['E012', 100, 'banana']]),
        occ('Dinner', '20:00', [
          ['A019', 90, 'chapati (3)'],
          ['B010', 40, 'moong dal'],
          ['M004', 50, 'boiled egg'],
          ['D036', 100, 'cauliflower'],
          ['T005', 15, 'oil'],
        ]),
      ],
    },
  ],
};

export interface DemoSeedContext {
  db: Db;
  clock: Clock;
  config: { seedDemo: boolean };
  io: { stdout: NodeJS.WritableStream };
}

/**
 * First-start step: seeds the invented demo clinic, patient and three-day plan when demo data
 * is wanted, no patient exists yet, and the IFCT 2017 table is imported. Says why when it cannot.
 */
export async function seedDemoData(
  ctx: DemoSeedContext,
): Promise<'seeded' | 'skipped' | 'no-table'> {
  if (!ctx.config.seedDemo) return 'skipped';
  if ((await new PatientRepository(ctx.db.kysely).count()) > 0) return 'skipped';
  const rows = await ctx.db.kysely
    .selectFrom('food')
    .innerJoin('food_source', 'food_source.id', 'food.source_id')
    .select(['food.id', 'food.code'])
    .where('food_source.format', '=', 'ifct2017')
    .where('food.code', 'in', [...DEMO_FOOD_CODES])
    .execute();
  const ids = new Map(rows.map((r) => [r.code, r.id]));
  const missing = DEMO_FOOD_CODES.filter((c) => !ids.has(c));
  if (missing.length > 0) {
    ctx.io.stdout.write(
      `demo data not seeded: the IFCT 2017 table is not imported (missing food codes ${missing.join(', ')})\n`,
    );
    return 'no-table';
  }
  const input: PlanInput = {
    name: DEMO_PLAN.name,
    note: DEMO_PLAN.note,
    days: DEMO_PLAN.days.map((d) => ({
      label: d.label,
      occasions: d.occasions.map((o) => ({
        name: o.name,
        time: o.time,
        items: o.items.map((it) => ({
          foodId: ids.get(it.code) as number,
          grams: it.grams,
          label: it.label,
        })),
      })),
    })),
  };
  const settings = settingsSource(ctx.db);
  await settings.seedClinic(DEMO_CLINIC); // only fills a clinic that has not been set
  const patients = new PatientService(ctx.db.kysely, ctx.clock);
  const patient = await patients.create(demoPatient(ctx.clock.now()), { isDemo: true });
  try {
    const plans = new PlanService(
      ctx.db.kysely,
      ctx.clock,
      new FoodRepository(ctx.db.kysely),
      settings,
    );
    await plans.create(patient.id, input, { isDemo: true });
  } catch (err) {
    // Leave nothing half-seeded: the plan rolled back in its transaction; remove the patient.
    await ctx.db.kysely.deleteFrom('lab_result').where('patient_id', '=', patient.id).execute();
    await ctx.db.kysely.deleteFrom('binder_change').where('patient_id', '=', patient.id).execute();
    await ctx.db.kysely.deleteFrom('patient').where('id', '=', patient.id).execute();
    throw err;
  }
  ctx.io.stdout.write(
    'demo data seeded: one invented demo patient with a three-day plan (start with --no-demo to skip)\n',
  );
  return 'seeded';
}
