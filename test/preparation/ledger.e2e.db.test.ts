/**
 * The plate ledger's preparation picker in real Chromium, with the keyboard only: Tab from the
 * item's words to its "Preparation of ..." select, arrow down to "Boiled, water thrown away",
 * and the saved version's summary applies it. Needs SR28 and Debian's chromium.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PlanSummary } from '../../src/plans/summary-types.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';
import { chromiumPresent } from '../helpers/requirements.js';
import { hasSr28 } from '../helpers/shared.js';
import {
  apiAs,
  axeReport,
  openWebHarness,
  runAxe,
  signInThroughPage,
  type WebHarness,
} from '../web/harness.js';

const canRun = hasSr28 && chromiumPresent();

describe.skipIf(!canRun)('plate ledger preparation picker (USDA SR28)', () => {
  let hs: WebHarness;
  let page: Page;
  let chickenId = 0;
  beforeAll(async () => {
    hs = await openWebHarness((db) => {
      // USDA SR28 NDB 05062 chicken breast, meat only, raw: P 213 mg per 100 g
      chickenId = insertFoods(db, sr28Foods('05062'))[0]?.id ?? 0;
    });
    page = hs.page;
  });
  afterAll(async () => {
    await hs?.close();
  });

  it('chooses boiled and drained with the keyboard and the totals fall', async () => {
    await signInThroughPage(hs, '/patients');
    const patient = await apiAs<{ id: number }>(hs, 'POST', '/api/patients', {
      label: 'Bed 9 (invented test patient)',
      weightKg: 70,
      ckdStage: '5',
      dialysis: 'hemodialysis',
      diabetes: false,
    });
    const plan = await apiAs<{ id: number }>(hs, 'POST', `/api/patients/${patient.id}/plans`, {
      name: 'Boiled chicken',
      days: [
        {
          label: 'Day 1',
          occasions: [{ name: 'Lunch', items: [{ foodId: chickenId, grams: 100 }] }],
        },
      ],
    });
    await page.goto(`${hs.baseUrl}/plans/${plan.id}`);
    const select = page.locator('select[aria-label^="Preparation of"]');
    await expect
      .poll(() => select.locator('option').count(), { timeout: 10_000 })
      .toBeGreaterThan(1);
    await page.focus('input[aria-label^="Patient’s own words"]');
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))).toMatch(
      /^Preparation of Chicken/,
    );
    const before = await page.locator('#save-state').textContent();
    await page.keyboard.press('ArrowDown'); // "as listed" -> the first method, boiled and drained
    await page.waitForFunction((b) => {
      const t = document.getElementById('save-state')?.textContent ?? '';
      return t !== b && t.startsWith('Saved as a draft');
    }, before);
    // The edit is a draft until a version is kept: keep one, then read its summary.
    await page.locator('#save-version-btn').click();
    await page.waitForFunction(() =>
      /^Saved as version \d+/.test(document.getElementById('save-state')?.textContent ?? ''),
    );
    const s = await apiAs<PlanSummary>(hs, 'GET', `/api/plans/${plan.id}/summary`);
    const item = s.days[0]?.occasions[0]?.items[0];
    expect(item?.preparation?.method).toBe('boil-drain');
    // typed grams of poultry are read as plate grams (the larger reading): 100 / 0.77 g raw x
    // 2.13 mg/g x 0.63 (Cupisti 2006) = 174.3 mg
    expect(item?.nutrients.phosphorusMg).toBe(174.3);
    await expect
      .poll(() => page.locator('.prep-note').first().textContent(), { timeout: 10_000 })
      .toContain('129.9 g raw = 100 g cooked');
    // the weight select follows the method select in the tab order (focus left it for the
    // "Save version" button)
    await page.focus('select[aria-label^="Preparation of"]');
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))).toMatch(
      /^Weight of Chicken/,
    );
    const violations = await runAxe(page);
    expect(violations, axeReport(violations)).toEqual([]);
  });
});
