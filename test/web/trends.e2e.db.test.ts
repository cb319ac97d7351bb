/**
 * The trend view in real Chromium: results per analyte with the clinic band, plan versions and
 * binder changes on one time axis, tables of the same values beside each chart, a result typed
 * on the page, no CSP violation from the charting library, and axe-core WCAG 2.1 A/AA.
 */
import { mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fixedClock } from '../../src/clock.js';
import type { Db } from '../../src/db/database.js';
import { FoodRepository } from '../../src/foods/foods.repository.js';
import { LabService } from '../../src/patients/labs.service.js';
import { PatientService } from '../../src/patients/patients.service.js';
import { settingsSource } from '../../src/plans/plan-settings-source.js';
import { PlanService } from '../../src/plans/plans.service.js';
import { seedDemoPlan } from '../helpers/demo-plan.js';
import { chromiumPresent } from '../helpers/requirements.js';
import {
  axeReport,
  openWebHarness,
  runAxe,
  signInThroughPage,
  type WebHarness,
} from './harness.js';

const ARTIFACTS = fileURLToPath(new URL('../../test-artifacts/', import.meta.url));
const hasChromium = chromiumPresent();
const SAMPLE_BUNDLE = fileURLToPath(
  new URL('../fixtures/fhir/lab-results-bundle.json', import.meta.url),
);

/** Invented demo history: plan saved 5 Jan, binder raised and plan changed 3 Feb. */
async function seed(db: Db): Promise<void> {
  const jan5 = fixedClock('2026-01-05T10:00:00Z');
  await seedDemoPlan(db, jan5); // demo patient 1 (hemodialysis) with plan 1, version 1
  const feb3 = fixedClock('2026-02-03T10:00:00Z');
  const patients = new PatientService(db.kysely, feb3);
  const p = await patients.get(1);
  if (!p.binder) throw new Error('demo binder missing');
  await patients.update(1, { binder: { ...p.binder, units: 9 } }, 'dietitian-e2e');
  const plans = new PlanService(db.kysely, feb3, new FoodRepository(db.kysely), settingsSource(db));
  const { version } = await plans.get(1);
  // version 2: every item at 70% of its grams (invented demo change)
  await plans.save(1, {
    name: version.name,
    note: 'smaller dairy portions (invented demo data)',
    days: version.content.days.map((d) => ({
      label: d.label,
      occasions: d.occasions.map((o) => ({
        name: o.name,
        kind: o.kind,
        time: o.time,
        items: o.items.map((it) => ({
          foodId: it.foodId,
          grams: Math.round(it.grams * 0.7),
          label: it.label,
        })),
      })),
    })),
  });
  const labs = new LabService(db.kysely, feb3);
  // invented demo results: phosphate falls after the 3 Feb change
  for (const [value, date] of [
    [6.4, '2026-01-10'],
    [6.1, '2026-01-31'],
    [5.2, '2026-02-14'],
    [4.7, '2026-03-01'],
  ] as const) {
    await labs.add(1, { analyte: 'phosphate', value, unit: 'mg/dL', date }, 'dietitian-e2e');
  }
  await labs.add(1, { analyte: 'albumin', value: 32, unit: 'g/L', date: '2026-03-01' }, null);
  await labs.add(1, { analyte: 'calcium', value: 8.4, unit: 'mg/dL', date: '2026-03-01' }, null);
}

describe('trend view on the patient record in Chromium', () => {
  let hs: WebHarness;
  let page: Page;
  const consoleErrors: string[] = [];

  beforeAll(async () => {
    if (!hasChromium) return;
    mkdirSync(ARTIFACTS, { recursive: true });
    hs = await openWebHarness(seed);
    page = hs.page;
    page.on('console', (m) => {
      if (m.type() === 'error') consoleErrors.push(m.text());
    });
    page.on('pageerror', (e) => consoleErrors.push(e.message));
  }, 60_000);
  afterAll(async () => {
    await hs?.close();
  });

  it.skipIf(!hasChromium)(
    'draws every chart with its table and the events on one axis',
    async () => {
      // Under CI a missing browser is a failure, not a skip.
      await signInThroughPage(hs, '/patients/1');
      // the sign-in screen's own 401 (no session yet) is not the trend view's
      consoleErrors.length = 0;
      await page.waitForSelector('[data-chart="phosphate"] svg', { timeout: 15_000 });

      // phosphate: the demo's own result (2 Jan, 1.94 mmol/L) and the four above
      const rows = page.locator('table[data-analyte="phosphate"] tbody tr');
      expect(await rows.count()).toBe(5);
      expect(await rows.first().locator('td').nth(2).textContent()).toBe('4.7');
      const dots = page.locator('[data-chart="phosphate"] svg circle');
      expect(await dots.count()).toBe(5);
      // two plan versions (dashed) and binder changes (dotted: 5 Jan at creation, 3 Feb) per chart
      const dashed = page.locator('[data-chart="phosphate"] svg [stroke-dasharray="5,3"] line');
      const dotted = page.locator('[data-chart="phosphate"] svg [stroke-dasharray="1,3"] line');
      expect(await dashed.count()).toBe(2);
      expect(await dotted.count()).toBe(2);
      // the band (KDIGO 2017 toward the normal range 2.5-4.5 mg/dL) is drawn behind the results
      expect(await page.locator('[data-chart="phosphate"] svg rect').count()).toBeGreaterThan(0);
      expect(await page.locator('[data-chart="phosphate"] figcaption').textContent()).toMatch(
        /KDIGO 2017/,
      );

      // the same x position for the 3 Feb plan version in the phosphate and plan charts
      const xs = await page.evaluate(() =>
        ['phosphate', 'plan'].map((k) => {
          const lines = document.querySelectorAll(
            `[data-chart="${k}"] svg [stroke-dasharray="5,3"] line`,
          );
          return lines[1]?.getAttribute('x1') ?? lines[1]?.getAttribute('transform');
        }),
      );
      expect(xs[0]).toBe(xs[1]);

      const events = await page.locator('#trend-events tbody tr').allTextContents();
      expect(events.some((t) => /2026-02-03.*Binder prescription.*9 units per day/.test(t))).toBe(
        true,
      );
      expect(events.some((t) => /2026-02-03.*version 2/.test(t))).toBe(true);

      // corrected calcium (Payne 1973): 8.4 + 0.8 x (4.0 - 3.2) = 8.4 + 0.64 = 9.04 mg/dL
      expect(await page.locator('#corrected-calcium tbody tr td').nth(3).textContent()).toBe(
        '9.04',
      );
      await page.screenshot({ path: `${ARTIFACTS}trends-01-patient.png`, fullPage: true });
      expect(consoleErrors).toEqual([]);
      const violations = await runAxe(page);
      expect(violations, axeReport(violations)).toEqual([]);
    },
    60_000,
  );

  it.skipIf(!hasChromium)(
    'a result typed on the page joins its chart',
    async () => {
      await page.selectOption('#lab-kind', 'potassium');
      await page.selectOption('#lab-unit', 'mEq/L');
      await page.fill('#lab-value', '5.1');
      await page.fill('#lab-date', '2026-03-01');
      await page.click('#lab-form button[type="submit"]');
      await page.waitForSelector('table[data-analyte="potassium"] tbody tr', { timeout: 10_000 });
      const cells = await page
        .locator('table[data-analyte="potassium"] tbody tr td')
        .allTextContents();
      expect(cells.slice(0, 3)).toEqual(['2026-03-01', '5.1 mEq/L', '5.1']);
      // refused with where and why: 51 mmol/L potassium is a typing error
      await page.selectOption('#lab-unit', 'mmol/L');
      await page.fill('#lab-value', '51');
      await page.click('#lab-form button[type="submit"]');
      await page.waitForSelector('#lab-status.error', { timeout: 10_000 });
      expect(await page.locator('#lab-status').textContent()).toMatch(/outside 1-10 mmol\/L/);
      expect(consoleErrors.filter((e) => !/status of 400/.test(e))).toEqual([]);
    },
    60_000,
  );
  it.skipIf(!hasChromium)(
    'sets the record-system identifier and imports the sample FHIR Bundle on the page',
    async () => {
      await page.fill('#id-system', 'https://clinic.example.org/mrn');
      await page.fill('#id-value', 'DEMO-4471');
      await page.click('#identifier-form button[type="submit"]');
      await page.waitForSelector('#identifier-status.ok', { timeout: 10_000 });
      expect(await page.locator('#identifier-text').textContent()).toMatch(/DEMO-4471/);
      await page.setInputFiles('#fhir-file', SAMPLE_BUNDLE);
      await page.click('#fhir-import-form button[type="submit"]');
      await page.waitForFunction(
        () => /imported/.test(document.getElementById('fhir-import-status')?.textContent ?? ''),
        undefined,
        { timeout: 10_000 },
      );
      // the sample Bundle: 8 results stored, entry 11 repeats entry 1, entries 8, 9, 10, 13 refused
      expect(await page.locator('#fhir-import-status').textContent()).toBe(
        '8 imported, 1 already stored, 4 refused.',
      );
      expect(await page.locator('#fhir-rejected li').count()).toBe(4);
      await page.waitForFunction(
        () => document.querySelectorAll('table[data-analyte="phosphate"] tbody tr').length === 7,
        undefined,
        { timeout: 10_000 },
      );
      expect(await page.locator('table[data-analyte="pth"] tbody tr').count()).toBe(1);
      await page.screenshot({ path: `${ARTIFACTS}trends-02-imported.png`, fullPage: true });
      const violations = await runAxe(page);
      expect(violations, axeReport(violations)).toEqual([]);
    },
    60_000,
  );
});
