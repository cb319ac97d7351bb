import { afterEach, describe, expect, it } from 'vitest';
import { TEST_SCRYPT_PARAMS } from '../../src/auth/password.js';
import { AuditService, auditCsvLine, recordAudit } from '../../src/audit/audit.service.js';
import { fixedClock } from '../../src/clock.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { buildApp, type App } from '../../src/server/app.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed time

describe('audit log (45 CFR 164.312(b) audit controls): append-only table', () => {
  let db: Db;
  afterEach(async () => db.close());

  it('refuses UPDATE and DELETE through SQLite triggers', async () => {
    db = await openMemoryDb();
    await recordAudit(
      db,
      { userId: null, action: 'patient.read', entity: 'patient', patientId: 7 },
      clock,
    );
    expect(() => db.sqlite.prepare('DELETE FROM audit_event').run()).toThrow(/append-only/);
    expect(() => db.sqlite.prepare("UPDATE audit_event SET action = 'x'").run()).toThrow(
      /append-only/,
    );
    expect(() => db.sqlite.prepare("UPDATE audit_event SET at = '2000-01-01'").run()).toThrow(
      /append-only/,
    );
    // the one change allowed: an erased patient's id replaced by an opaque reference
    const r = await new AuditService(db).anonymisePatient(7);
    expect(r.events).toBe(1);
    expect(r.ref).toMatch(/^erased-[0-9a-f]{16}$/);
    const row = db.sqlite.prepare('SELECT patient_id, patient_ref, action FROM audit_event').get();
    expect(row).toEqual({ patient_id: null, patient_ref: r.ref, action: 'patient.read' });
    // and it cannot be changed again or pointed at another patient
    expect(() => db.sqlite.prepare("UPDATE audit_event SET patient_ref = 'other'").run()).toThrow();
    expect(() => db.sqlite.prepare("UPDATE audit_event SET patient_id = '8'").run()).toThrow();
  });

  it('escapes CSV cells that would start a spreadsheet formula (OWASP CSV injection)', () => {
    const line = auditCsvLine({
      id: 1,
      at: '2026-03-05T09:30:00.000Z',
      userId: 1,
      username: 'dana',
      action: '=HYPERLINK("x")',
      entity: 'plan',
      entityId: '3',
      patientId: null,
      patientRef: null,
      outcome: 'ok',
      statusCode: 200,
      details: null,
    });
    expect(line).toBe(
      `"1","2026-03-05T09:30:00.000Z","1","dana","'=HYPERLINK(""x"")","plan","3","","","ok","200",""\r\n`,
    );
  });
});

describe('route-level audit (config.audit) and request.audit', () => {
  let app: App;
  let db: Db;
  afterEach(async () => {
    await app.close();
    await db.close();
  });

  async function build() {
    db = await openMemoryDb();
    app = await buildApp({ db, clock, auth: { scryptParams: TEST_SCRYPT_PARAMS } });
    app.get(
      '/api/probe/patients/:id',
      { config: { audit: { action: 'patient.read', entity: 'patient' } } },
      async (req) => ({ id: Number((req.params as { id: string }).id) }),
    );
    app.post(
      '/api/probe/plans',
      { config: { audit: { action: 'plan.create', entity: 'plan', idParam: false } } },
      async (req, reply) => {
        req.auditInfo = { patientId: 12, entityId: 99 };
        return reply.status(201).send({ id: 99 });
      },
    );
    app.get(
      '/api/probe/plans/:id',
      {
        config: {
          audit: { action: 'plan.read', entity: 'plan', patientOf: () => 'p-from-lookup' },
        },
      },
      async () => ({ ok: true }),
    );
    app.get('/api/probe/manual', async (req) => {
      await req.audit('handout.render', { entity: 'handout', patientId: 5, entityId: 'h1' });
      return { ok: true };
    });
    await app.ready();
    const user = await app.auth.createUser('dana', 'dietitian', 'a long enough secret');
    const s = await app.auth.openSession(user);
    return (o: { method?: 'GET' | 'POST'; url: string }) =>
      app.inject({
        ...o,
        cookies: { phl_session: s.token },
        headers: { 'x-csrf-token': s.session.csrfToken },
      });
  }

  function events() {
    return db.sqlite
      .prepare(
        'SELECT username, action, entity, entity_id, patient_id, outcome, status_code FROM audit_event ORDER BY id',
      )
      .all();
  }

  it('records who read or wrote which patient, with the outcome', async () => {
    const inject = await build();
    expect((await inject({ url: '/api/probe/patients/7' })).statusCode).toBe(200);
    expect((await inject({ method: 'POST', url: '/api/probe/plans' })).statusCode).toBe(201);
    expect((await inject({ url: '/api/probe/plans/3' })).statusCode).toBe(200);
    expect((await inject({ url: '/api/probe/manual' })).statusCode).toBe(200);
    expect(events()).toEqual([
      {
        username: 'dana',
        action: 'patient.read',
        entity: 'patient',
        entity_id: '7',
        patient_id: '7',
        outcome: 'ok',
        status_code: 200,
      },
      {
        username: 'dana',
        action: 'plan.create',
        entity: 'plan',
        entity_id: '99',
        patient_id: '12',
        outcome: 'ok',
        status_code: 201,
      },
      {
        username: 'dana',
        action: 'plan.read',
        entity: 'plan',
        entity_id: '3',
        patient_id: 'p-from-lookup',
        outcome: 'ok',
        status_code: 200,
      },
      {
        username: 'dana',
        action: 'handout.render',
        entity: 'handout',
        entity_id: 'h1',
        patient_id: '5',
        outcome: 'ok',
        status_code: null,
      },
    ]);
  });

  it('fails the request instead of sending patient data it could not record', async () => {
    const inject = await build();
    db.sqlite.exec(
      "CREATE TRIGGER audit_broken BEFORE INSERT ON audit_event BEGIN SELECT RAISE(ABORT, 'disk trouble'); END",
    );
    const res = await inject({ url: '/api/probe/patients/7' });
    expect(res.statusCode).toBe(500);
    expect(res.body).not.toContain('"id":7');
    expect(res.json()).toEqual({
      error: {
        code: 'PHL_AUDIT_FAILED',
        message: 'the access could not be recorded in the audit log, so nothing was sent',
      },
    });
    expect(res.body).not.toMatch(/SQLITE|disk trouble/);
  });

  it('records nothing for anonymous requests refused with 401 (no user to name)', async () => {
    await build();
    expect((await app.inject({ url: '/api/probe/patients/7' })).statusCode).toBe(401);
    expect(events()).toEqual([]);
  });
});

describe('admin view and export of the audit log', () => {
  let ctx: TestContext;
  afterEach(async () => ctx.close());

  it('lists newest first with filters, pages, exports CSV and JSON lines, and audits itself', async () => {
    ctx = await createTestContext({ as: 'admin' });
    for (let i = 1; i <= 5; i++) {
      await recordAudit(
        ctx.db,
        {
          userId: ctx.user!.id,
          action: 'patient.read',
          entity: 'patient',
          patientId: i % 2 ? 'p1' : 'p2',
        },
        ctx.clock,
      );
    }
    const page1 = await ctx.inject('/api/admin/audit?limit=2&action=patient.read');
    expect(page1.statusCode).toBe(200);
    const b1 = page1.json();
    expect(b1.events.map((e: { id: number }) => e.id)).toEqual([5, 4]);
    const page2 = (
      await ctx.inject(`/api/admin/audit?limit=2&action=patient.read&before=${b1.nextBefore}`)
    ).json();
    expect(page2.events.map((e: { id: number }) => e.id)).toEqual([3, 2]);
    const p2 = (await ctx.inject('/api/admin/audit?patientId=p2')).json();
    expect(p2.events).toHaveLength(2); // events 2 and 4

    const csv = await ctx.inject('/api/admin/audit/export?format=csv&action=patient.read');
    expect(csv.statusCode).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toBe(
      'attachment; filename="phosledger-audit-2026-03-05.csv"',
    );
    const lines = csv.body.trim().split('\r\n');
    expect(lines[0]).toBe(
      '"id","at","userId","username","action","entity","entityId","patientId","patientRef","outcome","statusCode","details"',
    );
    expect(lines).toHaveLength(6); // header + 5 events
    const jsonl = await ctx.inject('/api/admin/audit/export?format=jsonl&patientId=p1');
    expect(
      jsonl.body
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l).id),
    ).toEqual([1, 3, 5]);

    const self = ctx.db.sqlite
      .prepare("SELECT action FROM audit_event WHERE entity = 'audit' ORDER BY id")
      .all();
    expect(self).toEqual([
      { action: 'audit.view' },
      { action: 'audit.view' },
      { action: 'audit.view' },
      { action: 'audit.export' },
      { action: 'audit.export' },
    ]);
  });

  it('is refused to dietitians', async () => {
    ctx = await createTestContext();
    expect((await ctx.inject('/api/admin/audit')).statusCode).toBe(403);
    expect((await ctx.inject('/api/admin/audit/export')).statusCode).toBe(403);
  });
});
