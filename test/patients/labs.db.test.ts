import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

// Hand-written from the shape of the FHIR R4 Observation examples (identifier, status, category,
// code.coding LOINC, subject, effectiveDateTime, issued, valueQuantity with UCUM): invented patient.
const BUNDLE_FILE = new URL('../fixtures/fhir/lab-results-bundle.json', import.meta.url);
const bundle = () => JSON.parse(readFileSync(BUNDLE_FILE, 'utf8')) as Record<string, unknown>;

/** Invented demo patient carrying the identifier the sample Bundle uses. */
const PATIENT = {
  label: 'DEMO-4471 (invented demo patient)',
  weightKg: 70,
  ckdStage: '5',
  dialysis: 'hemodialysis',
  diabetes: false,
  identifier: { system: 'https://clinic.example.org/mrn', value: 'DEMO-4471' },
};

function io() {
  const out = new PassThrough();
  const err = new PassThrough();
  let stdout = '';
  let stderr = '';
  out.on('data', (c) => (stdout += String(c)));
  err.on('data', (c) => (stderr += String(c)));
  return {
    io: { stdout: out, stderr: err, stdin: new PassThrough(), env: {} },
    text: () => ({ stdout, stderr }),
  };
}

describe('lab results over HTTP', () => {
  let ctx: TestContext;
  let id: number;
  beforeAll(async () => {
    ctx = await createTestContext();
    const res = await ctx.inject({ method: 'POST', url: '/api/patients', payload: PATIENT });
    expect(res.statusCode).toBe(201);
    id = res.json().id;
  });
  afterAll(async () => ctx.close());

  it('adds a typed result and lists it in the fixed shape, with the canonical value', async () => {
    const add = await ctx.inject({
      method: 'POST',
      url: `/api/patients/${id}/labs`,
      payload: { analyte: 'phosphate', value: 1.94, unit: 'mmol/L', date: '2026-01-12' },
    });
    expect(add.statusCode).toBe(201);
    // 1.94 mmol/L x 3.0974 (IUPAC P 30.974 g/mol / 10) = 6.00896 mg/dL
    expect(add.json()).toEqual({
      analyte: 'phosphate',
      value: 1.94,
      unit: 'mmol/L',
      canonicalValue: 6.00896,
      canonicalUnit: 'mg/dL',
      date: '2026-01-12',
      source: 'typed',
    });
    const list = await ctx.inject(`/api/patients/${id}/labs`);
    expect(list.json()).toHaveLength(1);
    expect(Object.keys(list.json()[0])).toEqual([
      'analyte',
      'value',
      'unit',
      'canonicalValue',
      'canonicalUnit',
      'date',
      'source',
    ]);
  });

  it('refuses an implausible value with where and why, storing nothing', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: `/api/patients/${id}/labs`,
      payload: { analyte: 'potassium', value: 51, unit: 'mmol/L', date: '2026-01-12' },
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.message).toMatch(/value.*potassium 51 mmol\/L .*outside 1-10 mmol\/L/);
    expect((await ctx.inject(`/api/patients/${id}/labs`)).json()).toHaveLength(1);
  });

  it('imports the sample Bundle: per-entry rejects, duplicates counted once, audited', async () => {
    const res = await ctx.inject({ method: 'POST', url: '/api/labs/import', payload: bundle() });
    expect(res.statusCode).toBe(200);
    const r = res.json();
    // entries 1-7 (seven analytes) and 12 are stored; 11 repeats entry 1 (same code, time, value)
    expect(r.imported).toBe(8);
    expect(r.duplicates).toBe(1);
    expect(r.rejected.map((x: { entry: number }) => x.entry)).toEqual([8, 9, 10, 13]);
    expect(r.rejected[0].reason).toMatch(
      /entry\[8\] \(Observation lab-8\) code.coding: no LOINC code .*2160-0/,
    );
    expect(r.rejected[1].reason).toMatch(
      /entry\[9\].*valueQuantity: unit 'mg' is not taken for phosphate/,
    );
    expect(r.rejected[2].reason).toMatch(
      /entry\[10\].*subject: no patient record carries the identifier https:\/\/clinic.example.org\/mrn\|NOBODY-0000/,
    );
    expect(r.rejected[3].reason).toMatch(/entry\[13\].*status: 'preliminary' is not imported/);

    const list = (await ctx.inject(`/api/patients/${id}/labs`)).json() as Array<
      Record<string, unknown>
    >;
    const on = (a: string, date: string) => list.find((x) => x.analyte === a && x.date === date);
    // Converted values (UCUM, IUPAC weights, stated PTH factor):
    // calcium 2.2 mmol/L x 4.0078 = 8.81716 mg/dL
    expect(on('calcium', '2026-02-10')?.canonicalValue).toBeCloseTo(8.81716, 4);
    // albumin 35 g/L = 3.5 g/dL
    expect(on('albumin', '2026-02-10')?.canonicalValue).toBeCloseTo(3.5, 6);
    // potassium 5.1 mEq/L = 5.1 mmol/L
    expect(on('potassium', '2026-02-10')).toMatchObject({ unit: 'meq/L', canonicalValue: 5.1 });
    // 25-OH D 50 nmol/L x 400.647 / 1000 = 20.03 ng/mL
    expect(on('vitamin-d-25oh', '2026-02-10')?.canonicalValue).toBeCloseTo(20.03, 2);
    expect(on('pth', '2026-02-10')).toMatchObject({ canonicalValue: 420, source: 'fhir' });

    // importing again stores nothing twice
    const again = (
      await ctx.inject({ method: 'POST', url: '/api/labs/import', payload: bundle() })
    ).json();
    expect(again).toMatchObject({ imported: 0, duplicates: 9 });

    const events = ctx.db.sqlite
      .prepare(
        "select action, patient_id, details_json from audit_event where action like 'labs.import%' order by id",
      )
      .all() as Array<{ action: string; patient_id: string | null; details_json: string | null }>;
    expect(events.map((e) => [e.action, e.patient_id])).toEqual([
      ['labs.import.patient', String(id)],
      ['labs.import', null],
      ['labs.import', null],
    ]);
    expect(JSON.parse(events[1]?.details_json ?? '{}')).toEqual({
      imported: 8,
      duplicates: 1,
      rejected: 4,
    });
  });

  it('answers the latest value per analyte in canonical units', async () => {
    const latest = (await ctx.inject(`/api/patients/${id}/labs/latest`)).json();
    // entry 12: 4.6 mg/dL on 2026-03-03 is the newest phosphate
    expect(latest.phosphate).toEqual({ value: 4.6, unit: 'mg/dL', date: '2026-03-03' });
    expect(latest.albumin).toMatchObject({ unit: 'g/dL', date: '2026-02-10' });
    expect(Object.keys(latest).sort()).toEqual([
      'albumin',
      'bicarbonate',
      'calcium',
      'phosphate',
      'potassium',
      'pth',
      'vitamin-d-25oh',
    ]);
  });

  it('results added as rows reach the targets: the calcium check reads the albumin-corrected value', async () => {
    const { id: p } = (
      await ctx.inject({
        method: 'POST',
        url: '/api/patients',
        payload: { ...PATIENT, label: 'DEMO-4472 (invented demo patient)', identifier: null },
      })
    ).json();
    for (const payload of [
      { analyte: 'calcium', value: 9.8, unit: 'mg/dL', date: '2026-11-30' },
      { analyte: 'albumin', value: 28, unit: 'g/L', date: '2026-11-29' },
    ]) {
      const r = await ctx.inject({ method: 'POST', url: `/api/patients/${p}/labs`, payload });
      expect(r.statusCode).toBe(201);
    }
    const patient = (await ctx.inject(`/api/patients/${p}`)).json();
    // Payne 1973: 9.8 + 0.8 x (4.0 - 2.8 g/dL) = 10.76 mg/dL, above 10.2 (KDOQI 2003 Guideline 5)
    expect(patient.targets.calciumMg.note).toMatch(/albumin-corrected calcium 10\.76 mg\/dL/);
  });

  it('draws the band the clinic set (setting labBands) in the trend data', async () => {
    const before = (await ctx.inject(`/api/patients/${id}/trends`)).json();
    const phosphate = before.analytes.find((a: { analyte: string }) => a.analyte === 'phosphate');
    // hemodialysis default: KDIGO 2017 toward the normal range 2.5-4.5 mg/dL
    expect(phosphate.band).toMatchObject({ min: 2.5, max: 4.5 });
    expect(phosphate.band.source).toMatch(/KDIGO 2017/);
    const current = (await ctx.inject('/api/settings/labBands')).json().value;
    // clinical settings are changed by an admin
    const admin = await ctx.signIn('admin');
    const put = await admin.inject({
      method: 'PUT',
      url: '/api/settings/labBands',
      payload: {
        ...current,
        phosphate: { ...current.phosphate, onDialysis: { min: 3.5, max: 5.5 } },
      },
    });
    expect(put.statusCode).toBe(200);
    const after = (await ctx.inject(`/api/patients/${id}/trends`)).json();
    expect(after.analytes.find((a: { analyte: string }) => a.analyte === 'phosphate').band).toEqual(
      {
        min: 3.5,
        max: 5.5,
        source: 'set by the clinic',
      },
    );
  });

  it('refuses what is not a Bundle as a whole, and keeps identifiers unique', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/labs/import',
      payload: { resourceType: 'Observation' },
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error).toMatchObject({ code: 'PHL_LAB_IMPORT_INVALID' });
    const twin = await ctx.inject({
      method: 'POST',
      url: '/api/patients',
      payload: { ...PATIENT, label: 'DEMO-twin (invented)' },
    });
    expect(twin.statusCode).toBe(409);
    expect(twin.json().error.code).toBe('PHL_PATIENT_IDENTIFIER_TAKEN');
  });

  it('leaves the database as it was when a write fails mid-import', async () => {
    const before = ctx.db.sqlite.prepare('select count(*) n from lab_result').get();
    ctx.db.sqlite.exec(
      "create trigger lab_fail before insert on lab_result when new.analyte = 'bicarbonate' begin select raise(abort, 'test failure'); end",
    );
    try {
      const b = bundle();
      // move every result to a new day so none is a duplicate
      for (const e of b.entry as Array<{ resource: Record<string, unknown> }>) {
        if (e.resource.resourceType === 'Observation')
          e.resource.effectiveDateTime = '2026-04-01T08:00:00Z';
      }
      const res = await ctx.inject({ method: 'POST', url: '/api/labs/import', payload: b });
      expect(res.statusCode).toBe(500);
    } finally {
      ctx.db.sqlite.exec('drop trigger lab_fail');
    }
    expect(ctx.db.sqlite.prepare('select count(*) n from lab_result').get()).toEqual(before);
  });
});

describe('results and binder history follow the patient (access and erasure, GDPR Art. 15, 17)', () => {
  it('exports the rows with the patient and erases them with the patient', async () => {
    const ctx = await createTestContext({ as: 'admin' });
    try {
      const created = await ctx.inject({
        method: 'POST',
        url: '/api/patients',
        payload: {
          ...PATIENT,
          binder: {
            ingredient: 'calcium-acetate',
            unitStrengthMg: 667,
            schedule: 'per-day',
            units: 6,
          },
          labs: [{ analyte: 'albumin', value: 35, unit: 'g/L', date: '2026-01-12' }],
        },
      });
      expect(created.statusCode).toBe(201);
      // results are added through their own route now, not through the record
      const patch = await ctx.inject({
        method: 'PATCH',
        url: '/api/patients/1',
        payload: { labs: [] },
      });
      expect(patch.statusCode).toBe(400);
      const exported = (await ctx.inject('/api/patients/1/export')).json();
      expect(exported.related.lab_result).toHaveLength(1);
      expect(exported.related.lab_result[0]).toMatchObject({
        analyte: 'albumin',
        canonical_value: 3.5,
      });
      expect(exported.related.binder_change).toHaveLength(1);
      const erased = await ctx.inject({
        method: 'POST',
        url: '/api/patients/1/erase',
        payload: { confirm: 'erase' },
      });
      expect(erased.statusCode).toBe(200);
      expect(erased.json().deleted).toMatchObject({ lab_result: 1, binder_change: 1, patient: 1 });
      expect(ctx.db.sqlite.prepare('select count(*) n from lab_result').get()).toEqual({ n: 0 });
    } finally {
      await ctx.close();
    }
  });
});

describe('phosledger labs (CLI contract)', () => {
  let dir: string;
  let dbFile: string;
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'phosledger-labs-'));
    dbFile = join(dir, 'test.db');
    const db = openDb(dbFile);
    await migrateToLatest(db);
    await db.close();
    writeFileSync(join(dir, 'patient.json'), JSON.stringify({ ...PATIENT, identifier: undefined }));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  const run = async (...args: string[]) => {
    const t = io();
    const code = await runCli([...args, '--db', dbFile], t.io);
    return { code, ...t.text() };
  };

  it('creates, sets the identifier, adds, imports and lists', async () => {
    expect((await run('patient', 'create', '--file', join(dir, 'patient.json'))).stdout).toBe(
      'patient 1 created\n',
    );
    const set = await run(
      'patient',
      'set-identifier',
      '1',
      '--system',
      'https://clinic.example.org/mrn',
      '--value',
      'DEMO-4471',
    );
    expect(set.stdout).toMatch(/identifier set: https:\/\/clinic.example.org\/mrn \| DEMO-4471/);
    const add = await run(
      'labs',
      'add',
      '1',
      '--analyte',
      'pth',
      '--value',
      '42',
      '--unit',
      'pmol/L',
      '--date',
      '2026-01-20',
    );
    // 42 pmol/L x 9.425 (PTH(1-84) 9425 g/mol: 1 pg/mL = 0.106 pmol/L) = 395.85 pg/mL
    expect(add).toMatchObject({
      code: 0,
      stdout: expect.stringContaining('= 395.85 pg/mL recorded'),
    });
    const bad = await run(
      'labs',
      'add',
      '1',
      '--analyte',
      'calcium',
      '--value',
      '9',
      '--unit',
      'mmol/L',
      '--date',
      '2026-01-20',
    );
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/outside 2-20 mg\/dL.*PHL_LAB_INVALID/);

    const imp = await run('labs', 'import', BUNDLE_FILE.pathname, '--json');
    expect(imp.code).toBe(0);
    const j = JSON.parse(imp.stdout);
    expect(Object.keys(j)).toEqual(['imported', 'duplicates', 'rejected']);
    expect(j).toMatchObject({ imported: 8, duplicates: 1 });
    expect(Object.keys(j.rejected[0])).toEqual(['entry', 'reason']);

    const list = await run('labs', 'list', '1', '--json');
    const rows = JSON.parse(list.stdout) as Array<Record<string, unknown>>;
    expect(rows).toHaveLength(9);
    expect(rows[0]).toMatchObject({ analyte: 'phosphate', date: '2026-03-03', source: 'file' });
    expect(rows.at(-1)).toEqual({
      analyte: 'pth',
      value: 42,
      unit: 'pmol/L',
      canonicalValue: 395.85,
      canonicalUnit: 'pg/mL',
      date: '2026-01-20',
      source: 'typed',
    });
  });
});
