/**
 * The Plate ledger's balancing panel in real Chromium, by keyboard: balance the day shown, read
 * the proposal (changes, totals, binding limits), accept it as a new version. USDA SR28 foods;
 * skips with its reason without SR28 or Chromium, and fails when CI is set.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Food } from '../../src/foods/food.js';
import { chromiumPresent } from '../helpers/requirements.js';
import { hasSr28 } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';
import {
  apiAs,
  axeReport,
  openWebHarness,
  runAxe,
  signInThroughPage,
  type WebHarness,
} from './harness.js';

const POLL = { timeout: 20_000, interval: 100 };
const canRun = hasSr28 && chromiumPresent();

// USDA SR28 NDB numbers
const NDB = ['18069', '01077', '05064', '20045', '01009', '09003', '04053'];

describe.skipIf(!canRun)('balancing a day in the Plate ledger (Chromium, USDA SR28 foods)', () => {
  let hs: WebHarness;
  let page: Page;
  let planId = 0;
  let foods: Food[] = [];

  beforeAll(async () => {
    hs = await openWebHarness((db) => {
      foods = insertFoods(db, sr28Foods(...NDB));
    });
    page = hs.page;
    await signInThroughPage(hs, '/patients');
    // Invented demo patient: 70 kg on hemodialysis -> protein 70-84 g/day (KDOQI 2020)
    const patient = await apiAs<{ id: number }>(hs, 'POST', '/api/patients', {
      label: 'E2E-19 (invented)',
      weightKg: 70,
      ckdStage: '5',
      dialysis: 'hemodialysis',
      diabetes: false,
    });
    const [bread, milk, chicken, rice, cheddar, apple, oil] = foods.map((f) => f.id);
    const plan = await apiAs<{ id: number }>(hs, 'POST', `/api/patients/${patient.id}/plans`, {
      name: 'Balance in the browser (invented demo plan)',
      days: [
        {
          label: 'Monday',
          occasions: [
            {
              name: 'Breakfast',
              items: [
                { foodId: bread, grams: 120 },
                { foodId: milk, grams: 250 },
              ],
            },
            {
              name: 'Lunch',
              items: [
                { foodId: chicken, grams: 120 },
                { foodId: rice, grams: 300 },
                { foodId: cheddar, grams: 40 },
                { foodId: oil, grams: 20 },
              ],
            },
            { name: 'Snack', items: [{ foodId: apple, grams: 150 }] },
          ],
        },
      ],
    });
    planId = plan.id;
  }, 60_000);
  afterAll(async () => {
    await hs?.close();
  });

  it('balances the day shown, shows the review, and accepts it with the keyboard', async () => {
    await page.goto(`${hs.baseUrl}/plans/${planId}`);
    await page.waitForSelector('[data-testid="total-phosphorusMg"]');
    const before = await page.locator('[data-testid="total-phosphorusMg"]').textContent();
    await page.focus('#balance-run');
    await page.keyboard.press('Enter');
    await page.waitForSelector('#balance-review-h', POLL);
    // The review takes the focus, so a keyboard user lands on it.
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('balance-review-h');
    expect(await page.locator('#balance-review-h').textContent()).toBe('Proposal for Monday');
    expect(await page.locator('[data-testid="balance-verdict"]').textContent()).toContain(
      'Every limit met',
    );
    const changes = await page.locator('[data-testid="balance-change"]').count();
    expect(changes).toBeGreaterThan(0);
    expect(await page.locator('#balance-review').textContent()).toContain(
      'never goes below the protein target',
    );
    const violations = await runAxe(page);
    expect(violations, axeReport(violations)).toEqual([]);
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('balance-accept');
    await page.keyboard.press('Enter');
    await expect
      .poll(() => page.locator('#balance-status').textContent(), POLL)
      .toBe('Saved as version 2.');
    expect(await page.locator('#balance-review').isHidden()).toBe(true);
    await expect
      .poll(() => page.locator('[data-testid="total-phosphorusMg"]').textContent(), POLL)
      .not.toBe(before);
    const saved = await apiAs<{ version: number; note: string }>(hs, 'GET', `/api/plans/${planId}`);
    expect(saved.version).toBe(2);
    expect(saved.note).toMatch(/^Balanced day 1 by the optimiser/);
    expect(hs.offsite).toEqual([]);
  });
});
