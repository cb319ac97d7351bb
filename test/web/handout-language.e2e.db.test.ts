/**
 * The take-home sheet in the patient's language, in real Chromium: the sheet opens in the
 * patient's language with the starter names (marked drafted) and drinks in ml, the dietitian
 * names a food in the Food names panel and the sheet shows it, the Arabic sheet reads right to
 * left with the Arabic names, and the PDF downloads once the clinic details are set.
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

const POLL = { timeout: 10_000, interval: 100 };
const canRun = hasSr28 && chromiumPresent();
// Under CI the browser and SR28 must be there: the test fails instead of skipping.

// USDA SR28 NDB numbers: 14148 cola, regular; 07008 bologna, beef and pork. Invented patient.
const NDB = ['14148', '07008'] as const;

async function sheetText(page: Page): Promise<string> {
  return (await page.frameLocator('#handout-frame').locator('body').textContent()) ?? '';
}

describe.skipIf(!canRun)('take-home sheet language flow in Chromium (USDA SR28 foods)', () => {
  let hs: WebHarness;
  let page: Page;
  let foods: Food[] = [];
  let planId = 0;

  beforeAll(async () => {
    hs = await openWebHarness((db) => {
      foods = insertFoods(db, sr28Foods(...NDB));
    });
    page = hs.page;
    await signInThroughPage(hs, '/patients');
    const [cola, bologna] = foods as [Food, Food];
    const can = cola.portions.find((p) => /^can/.test(p.description));
    const patient = await apiAs<{ id: number }>(hs, 'POST', '/api/patients', {
      label: 'SHEET-01 (invented)',
      language: 'es-MX',
      weightKg: 70,
      ckdStage: '4',
      dialysis: 'none',
      diabetes: false,
    });
    const plan = await apiAs<{ id: number }>(hs, 'POST', `/api/patients/${patient.id}/plans`, {
      name: 'Sheet language test',
      days: [
        {
          label: 'Day 1',
          occasions: [
            {
              name: 'Lunch',
              items: [
                { foodId: cola.id, measure: { portionId: can!.id, count: 1 } },
                { foodId: bologna.id, grams: 28 },
              ],
            },
          ],
        },
      ],
    });
    planId = plan.id;
  });
  afterAll(async () => {
    await hs?.close();
  });

  it("opens in the patient's language with drafted starter names and the drink in ml", async () => {
    await page.goto(`${hs.baseUrl}/plans/${planId}/preview`);
    await expect.poll(() => page.locator('#handout-lang').inputValue(), POLL).toBe('es');
    await expect.poll(() => sheetText(page), POLL).toContain('Refresco de cola *');
    const text = await sheetText(page);
    // SR28 14148: 1 can = 370 g at 30.8 g per fl oz (29.5735 ml): 355 ml to 5 ml.
    expect(text).toContain('1 lata (unos 355 ml)');
    expect(text).toContain('Mortadela (bolonia) *');
    expect(text).not.toContain('Bologna, beef and pork');
    // No clinic details yet: the sheet says so and holds the PDF.
    await expect.poll(() => page.locator('#handout-clinic-missing').isVisible(), POLL).toBe(true);
    expect(await page.locator('#handout-pdf').getAttribute('aria-disabled')).toBe('true');
    const violations = await runAxe(page);
    expect(violations, axeReport(violations)).toEqual([]);
  });

  it('a name saved in the Food names panel is on the sheet, unmarked once checked', async () => {
    const bologna = foods[1] as Food;
    const input = page.locator(`#food-name-${bologna.id}`);
    await expect.poll(() => input.inputValue(), POLL).toBe('Mortadela (bolonia)');
    await input.fill('Mortadela de la tienda');
    await page.getByLabel(`Checked? ${bologna.name}`).selectOption('reviewed');
    await page.locator('tr', { has: input }).getByRole('button', { name: 'Save' }).click();
    await expect
      .poll(() => page.locator('#food-names-status').textContent(), POLL)
      .toContain('Saved');
    await expect.poll(() => sheetText(page), POLL).toContain('Mortadela de la tienda');
    expect(await sheetText(page)).not.toContain('Mortadela de la tienda *');
  });

  it('the Arabic sheet reads right to left with the Arabic names, and its PDF downloads', async () => {
    await apiAs(hs, 'PUT', '/api/settings/clinic', {
      name: 'Test Renal Unit',
      contact: '555-0100',
      dietitianName: 'R. Test',
    });
    await page.locator('#handout-lang').selectOption('ar');
    await expect.poll(() => sheetText(page), POLL).toContain('مشروب الكولا');
    const dir = await page.frameLocator('#handout-frame').locator('html').getAttribute('dir');
    expect(dir).toBe('rtl');
    // The Food names panel follows the sheet's language, typed right to left.
    const cola = foods[0] as Food;
    await expect
      .poll(() => page.locator(`#food-name-${cola.id}`).getAttribute('dir'), POLL)
      .toBe('rtl');
    await expect.poll(() => page.locator('#handout-clinic-missing').isVisible(), POLL).toBe(false);
    const href = await page.locator('#handout-pdf').getAttribute('href');
    const res = await hs.context.request.get(`${hs.baseUrl}${href}`);
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toBe('application/pdf');
  });
});
