import { afterEach, describe, expect, it } from 'vitest';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

const t = (name: string) => `${name} (${hasSr28 ? 'USDA SR28 NDB 01123 egg' : SR28_MISSING})`;

// Invented demo patients.
const patient = (label: string) => ({
  label,
  language: 'en',
  weightKg: 70,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  labs: [],
});

describe('patient data rights: export (JSON) and erasure with anonymised audit references', () => {
  let ctx: TestContext;
  afterEach(async () => ctx.close());

  async function seed() {
    ctx = await createTestContext({ as: 'admin' });
    const [egg] = insertFoods(ctx.db, sr28Foods('01123'));
    const ids: number[] = [];
    for (const label of ['ERASE-ME (invented)', 'KEEP-ME (invented)']) {
      const p = await ctx.inject({ method: 'POST', url: '/api/patients', payload: patient(label) });
      expect(p.statusCode).toBe(201);
      const id = p.json().id as number;
      ids.push(id);
      const plan = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${id}/plans`,
        payload: {
          name: 'Consult 1',
          days: [
            {
              label: 'Monday',
              occasions: [{ name: 'Breakfast', items: [{ foodId: egg!.id, grams: 100 }] }],
            },
          ],
        },
      });
      expect(plan.statusCode).toBe(201);
      const planId = plan.json().planId ?? plan.json().id;
      // a second version, so immutable plan versions are exercised
      const again = await ctx.inject({
        method: 'PUT',
        url: `/api/plans/${planId}`,
        payload: {
          name: 'Consult 1',
          days: [
            {
              label: 'Monday',
              occasions: [{ name: 'Breakfast', items: [{ foodId: egg!.id, grams: 50 }] }],
            },
          ],
        },
      });
      expect(again.statusCode).toBeLessThan(300);
      expect((await ctx.inject(`/api/patients/${id}`)).statusCode).toBe(200);
      const diary = await ctx.inject({
        method: 'POST',
        url: '/api/diary-audits',
        payload: { text: '2026-03-04 breakfast: 2 eggs, 1 slice of bread', patientId: id },
      });
      expect(diary.statusCode, diary.body).toBe(201);
    }
    return { erase: ids[0]!, keep: ids[1]! };
  }

  it.skipIf(!hasSr28)(t('exports everything about one patient and audits the export'), async () => {
    const { erase, keep } = await seed();
    const res = await ctx.inject(`/api/patients/${erase}/export`);
    expect(res.statusCode).toBe(200);
    expect(res.headers['content-disposition']).toBe(
      `attachment; filename="phosledger-patient-${erase}.json"`,
    );
    const body = res.json();
    expect(body.format).toBe('phosledger-patient-export');
    expect(body.patient.label).toBe('ERASE-ME (invented)');
    expect(body.related.plan).toHaveLength(1);
    expect(body.related.plan_version).toHaveLength(2);
    expect(body.related.diary_audit).toHaveLength(1);
    expect(JSON.stringify(body)).not.toContain('KEEP-ME');
    expect(body.auditEvents.map((e: { action: string }) => e.action)).toContain('patient.read');
    const last = ctx.db.sqlite
      .prepare('SELECT action, patient_id FROM audit_event ORDER BY id DESC LIMIT 1')
      .get();
    expect(last).toEqual({ action: 'patient.export', patient_id: String(erase) });
    expect((await ctx.inject(`/api/patients/${keep}/export`)).json().patient.label).toBe(
      'KEEP-ME (invented)',
    );
  });

  it.skipIf(!hasSr28)(
    t('erases one patient with plans and versions, keeps others, anonymises the log'),
    async () => {
      const { erase, keep } = await seed();
      const before = ctx.db.sqlite
        .prepare('SELECT count(*) AS n FROM audit_event WHERE patient_id = ?')
        .get(String(erase)) as { n: number };
      expect(before.n).toBeGreaterThan(0);

      const bad = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${erase}/erase`,
        payload: {},
      });
      expect(bad.statusCode).toBe(400);

      const res = await ctx.inject({
        method: 'POST',
        url: `/api/patients/${erase}/erase`,
        payload: { confirm: 'erase' },
      });
      expect(res.statusCode).toBe(200);
      const body = res.json();
      expect(body.deleted).toMatchObject({ patient: 1, plan: 1, plan_version: 2, diary_audit: 1 });
      expect(body.auditEventsAnonymised).toBe(before.n);
      const linked = ctx.db.sqlite
        .prepare('SELECT count(*) AS n FROM audit_event WHERE patient_id = ?')
        .get(String(erase)) as { n: number };
      expect(linked.n).toBe(0);
      const refs = ctx.db.sqlite
        .prepare('SELECT action, entity_id, patient_ref FROM audit_event WHERE patient_ref = ?')
        .all(body.patientRef) as Array<{ action: string; entity_id: string | null }>;
      expect(refs.length).toBe(before.n + 1);
      expect(refs.at(-1)!.action).toBe('patient.erase');
      expect(
        refs.filter((r) => r.action.startsWith('patient.')).every((r) => r.entity_id === null),
      ).toBe(true);
      expect(
        JSON.stringify(ctx.db.sqlite.prepare('SELECT * FROM audit_event').all()),
      ).not.toContain('ERASE-ME');
      expect((await ctx.inject(`/api/patients/${erase}`)).statusCode).toBe(404);
      expect((await ctx.inject(`/api/patients/${keep}`)).statusCode).toBe(200);
      // plan versions of the kept patient are still immutable
      expect(() => ctx.db.sqlite.prepare('DELETE FROM plan_version').run()).toThrow(/immutable/);
    },
  );

  it.skipIf(!hasSr28)(t('keeps erasure to admins'), async () => {
    const { erase } = await seed();
    const dietitian = await ctx.signIn('dietitian');
    const res = await dietitian.inject({
      method: 'POST',
      url: `/api/patients/${erase}/erase`,
      payload: { confirm: 'erase' },
    });
    expect(res.statusCode).toBe(403);
    expect((await ctx.inject(`/api/patients/${erase}`)).statusCode).toBe(200);
  });

  it('answers 404 for an unknown patient', async () => {
    ctx = await createTestContext({ as: 'admin' });
    expect((await ctx.inject('/api/patients/999/export')).statusCode).toBe(404);
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/patients/999/erase',
      payload: { confirm: 'erase' },
    });
    expect(res.statusCode).toBe(404);
  });
});
