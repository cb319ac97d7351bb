/**
 * The whole consult in real Chromium: sign in, create a patient, record the binder, build a day
 * of five foods with the keyboard only, watch the totals and the binder schedule, open the
 * take-home sheet in Spanish and download its PDF, sift a pasted diary and fix one match. Every
 * screen passes axe-core's WCAG 2.1 A/AA rules; screenshots go to test-artifacts/.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { insertFoods, loadAllSr28Foods } from '../helpers/sr28.js';
import { chromiumPresent } from '../helpers/requirements.js';
import { hasSr28 } from '../helpers/shared.js';
import {
  apiAs,
  axeReport,
  openWebHarness,
  runAxe,
  signInThroughPage,
  type WebHarness,
} from './harness.js';

const POLL = { timeout: 10_000, interval: 100 };
const ARTIFACTS = fileURLToPath(new URL('../../test-artifacts/', import.meta.url));
const canRun = hasSr28 && chromiumPresent();

async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: `${ARTIFACTS}${name}.png`, fullPage: true });
}

async function expectAccessible(page: Page): Promise<void> {
  const violations = await runAxe(page);
  expect(violations, axeReport(violations)).toEqual([]);
}

/** Per 100 g values of named USDA SR28 foods (NDB number -> P mg, protein g). */
function sr28(ndb: string) {
  const f = loadAllSr28Foods().get(ndb);
  if (!f) throw new Error(`NDB ${ndb} missing`);
  return { name: f.name, phosphorusMg: f.per100g.phosphorusMg ?? 0 };
}

/** Clicks "Save version" and waits for the version number (edits before it were drafts). */
async function saveVersion(page: Page): Promise<void> {
  await page.locator('#save-version-btn').click();
  await page.waitForFunction(() =>
    /^Saved as version \d+/.test(document.getElementById('save-state')?.textContent ?? ''),
  );
}

async function phosphorusTotal(page: Page): Promise<string> {
  const el = page.locator('[data-testid="total-phosphorusMg"]');
  return (await el.count()) > 0 ? ((await el.textContent()) ?? '') : '';
}

describe.skipIf(!canRun)('consult screens in Chromium (USDA SR28 foods)', () => {
  let hs: WebHarness;
  let page: Page;
  let patientUrl = '';
  let planUrl = '';

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    hs = await openWebHarness((db) => {
      insertFoods(db, [...loadAllSr28Foods().values()]);
    });
    page = hs.page;
    page.on('console', (m) => {
      if (process.env.WEB_DEBUG) process.stderr.write(`console ${m.type()}: ${m.text()}\n`);
    });
    page.on('pageerror', (e) => {
      if (process.env.WEB_DEBUG) process.stderr.write(`pageerror: ${e.message}\n`);
    });
  });
  afterAll(async () => {
    await hs?.close();
  });

  it('sends a visitor to the sign-in screen and signs in there', async () => {
    await page.goto(`${hs.baseUrl}/signin`);
    await expectAccessible(page);
    await shot(page, '01-signin');
    await signInThroughPage(hs, '/patients');
    expect(new URL(page.url()).pathname).toBe('/patients');
  });

  it('creates a patient record and records the binder prescription', async () => {
    await page.waitForSelector('#patient-list table, #patient-list p');
    await expectAccessible(page);
    await page.fill('#pf-label', 'Bed 4 (invented test patient)');
    await page.selectOption('#pf-language', 'es');
    await page.fill('#pf-weight', '70');
    await page.selectOption('#pf-stage', '5');
    await page.selectOption('#pf-dialysis', 'hemodialysis');
    await shot(page, '02-caseload');
    await page.click('#patient-form button[type="submit"]');
    await page.waitForURL('**/patients/*');
    patientUrl = page.url();
    await expect.poll(() => page.locator('#patient-language').textContent(), POLL).toBe('es');
    // KDOQI 2020: maintenance hemodialysis without diabetes, 1.0-1.2 g/kg/day x 70 kg = 70-84 g/day
    await expect
      .poll(() => page.locator('[data-target="proteinG"] strong').textContent(), POLL)
      .toBe('70–84 g/day');
    // Calcium acetate 667 mg, six units a day (invented prescription for the test).
    await page.selectOption('#bf-ingredient', 'calcium-acetate');
    await page.fill('#bf-strength', '667');
    await page.fill('#bf-units', '6');
    await page.selectOption('#bf-schedule', 'per-day');
    await page.click('#binder-form button[type="submit"]');
    await expect.poll(() => page.locator('#binder-status').textContent(), POLL).toContain('saved');
    expect(await page.locator('#patient-language').textContent()).toBe('es');
    await expectAccessible(page);
    await shot(page, '03-patient-record');
  });

  it('builds a day of five foods with the keyboard alone, totals changing as it goes', async () => {
    await page.fill('#new-plan-name', 'First consult');
    await page.click('#new-plan-form button[type="submit"]');
    await page.waitForURL('**/plans/*');
    planUrl = page.url();
    await page.waitForFunction(() => document.activeElement?.id === 'food-search');

    // [query, NDB expected at the top, occasion index, keys in the measure picker]
    const steps: Array<[string, string, number, string[]]> = [
      ['bread white commercially', '18069', 0, ['2']], // 2 slices x 29 g = 58 g (SR28 WEIGHT)
      ['milk whole 3.25', '01077', 0, ['1']], // 1 cup = 244 g
      // third measure, ".5 breast = 86 g": 1 breast = 86 / 0.5 = 172 g
      ['chicken breast roasted meat only', '05064', 1, ['1', 'Tab', 'ArrowDown', 'ArrowDown']],
      ['rice white long-grain enriched cooked', '20045', 1, ['1']], // 1 cup = 158 g
      ['cheese cheddar', '01009', 3, ['1', 'Tab', 'ArrowDown', 'ArrowDown', 'ArrowDown']], // 1 oz = 28.35 g
    ];
    const totals: string[] = [await phosphorusTotal(page)];
    let currentOcc = 0;
    for (const [query, ndb, occ, pickerKeys] of steps) {
      // Move the occasion selector with the keyboard: it sits just before the food finder.
      if (occ !== currentOcc) {
        await page.keyboard.press('Shift+Tab');
        for (let i = currentOcc; i < occ; i++) await page.keyboard.press('ArrowDown');
        await page.keyboard.press('Tab');
        currentOcc = occ;
      }
      await page.keyboard.type(query);
      await page.waitForFunction(
        (q) => document.getElementById('food-results')?.dataset.query === q,
        query,
      );
      // Read where the wanted food sits in the list, then walk there with the arrow keys.
      const names = await page.locator('#food-results .r-name').allTextContents();
      const at = names.indexOf(sr28(ndb).name);
      expect(at, `${sr28(ndb).name} in ${names.join(' | ')}`).toBeGreaterThanOrEqual(0);
      for (let i = 0; i < at; i++) await page.keyboard.press('ArrowDown');
      await page.keyboard.press('Enter');
      await page.waitForFunction(() => !document.getElementById('measure-picker')?.hidden);
      await expect
        .poll(() => page.locator('#picked-name').textContent(), POLL)
        .toBe(sr28(ndb).name);
      for (const k of pickerKeys) await page.keyboard.press(k);
      const before = await page.locator('#save-state').textContent();
      await page.keyboard.press('Enter');
      await page.waitForFunction((b) => {
        const t = document.getElementById('save-state')?.textContent ?? '';
        return t !== b && t.startsWith('Saved');
      }, before);
      await page.waitForFunction(() => document.activeElement?.id === 'food-search');
      await expect.poll(() => phosphorusTotal(page), POLL).not.toBe(totals[totals.length - 1]);
      totals.push(await phosphorusTotal(page));
      // Edits are drafts; the first food is kept as a version of its own (version 2).
      if (totals.length === 2) {
        await saveVersion(page);
        await page.locator('#food-search').focus();
      }
    }
    await saveVersion(page);
    // USDA SR28 per 100 g: bread 18069 P 98 mg, milk 01077 84, chicken 05064 228, rice 20045 43,
    // cheddar 01009 455. Day: 58 g x 0.98 = 56.84; 244 x 0.84 = 204.96; 172 x 2.28 = 392.16;
    // 158 x 0.43 = 67.94; 28.35 x 4.55 = 128.99; sum = 850.89 -> "851 mg".
    const grams: Record<string, number> = {
      '18069': 58,
      '01077': 244,
      '05064': 172,
      '20045': 158,
      '01009': 28.35,
    };
    const expected = Object.entries(grams).reduce(
      (s, [n, gr]) => s + (gr * sr28(n).phosphorusMg) / 100,
      0,
    );
    expect(Math.round(expected)).toBe(851);
    expect(totals.at(-1)).toBe('851 mg');
    expect(new Set(totals).size).toBe(totals.length); // every addition changed the total
    expect(await page.locator('.occasion tbody tr').count()).toBe(5);

    // The binder schedule sits beside the meals: six prescribed units, none beyond that.
    const slots = page.locator('[data-testid="binder-slot"]');
    expect(await slots.count()).toBeGreaterThan(0);
    const units = (await slots.locator('.units').allTextContents()).map((t) =>
      Number.parseInt(t, 10),
    );
    expect(units.reduce((a, b) => a + b, 0)).toBeLessThanOrEqual(6);
    expect(units.some((u) => u > 0)).toBe(true);
    await expect
      .poll(() => page.locator('#binder-schedule').textContent(), POLL)
      .toContain('calcium acetate');

    // An additive flag (cheddar is not processed cheese, so only if the model says so) and the
    // high-ratio flag show their evidence on focus.
    const flag = page.locator('.flag.has-tip').first();
    if ((await flag.count()) > 0) {
      await flag.focus();
      expect(await page.locator('.flag.has-tip:focus .tip').isVisible()).toBe(true);
    }
    await expectAccessible(page);
    await shot(page, '04-plate-ledger');
  });

  it('changes a quantity and finds swaps for the heaviest load', async () => {
    const before = await phosphorusTotal(page);
    const qty = page.locator('.occasion tbody tr').first().locator('input[type="number"]');
    await qty.fill('3'); // bread: 3 slices = 87 g
    await qty.press('Enter');
    await expect.poll(() => phosphorusTotal(page), POLL).not.toBe(before);
    // The rows were drawn again from the new summary; the keyboard stays where it was.
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-focus-key'))).toBe(
      'qty-0-0-0',
    );
    await page.locator('#contributors button').first().click();
    await page.waitForSelector('#swaps h3');
    await shot(page, '05-swaps');
  });

  it('opens an earlier saved version read-only from the version list', async () => {
    const current = await phosphorusTotal(page);
    // Versions kept: 1 (created), 2 (first food), 3 (five foods); later edits are a draft.
    const items = page.locator('#version-list li');
    await expect.poll(() => items.count(), POLL).toBe(3);
    expect(await page.locator('#version-list [aria-current="page"]').textContent()).toContain(
      '(current)',
    );
    // Version 2 holds the first food only (bread 58 g, USDA SR28 NDB 18069: 98 mg P per 100 g
    // -> 56.84 mg, shown as "57 mg"), as it was saved before the other four were added.
    await page.locator('#version-list a', { hasText: /^Version 2$/ }).click();
    await page.waitForURL('**/plans/*?version=2');
    await expect.poll(() => phosphorusTotal(page), POLL).toBe('57 mg');
    expect(current).not.toBe('57 mg');
    expect(await page.locator('#past-banner').isVisible()).toBe(true);
    expect(await page.locator('#past-title').textContent()).toContain('Version 2');
    expect(await page.locator('.adder').isVisible()).toBe(false);
    // Its take-home sheet is the sheet of that version.
    expect(await page.locator('#handout-link').getAttribute('href')).toMatch(
      /\/plans\/\d+\/preview\?version=2$/,
    );
    const controls = page.locator('#day-panel input, #day-panel button');
    expect(await controls.count()).toBeGreaterThan(0);
    for (const el of await controls.all()) expect(await el.isDisabled()).toBe(true);
    await expectAccessible(page);
    await shot(page, '05b-saved-version');
    await page.click('#past-current-link');
    await expect.poll(() => phosphorusTotal(page), POLL).toBe(current);
  });

  it('opens the take-home sheet in Spanish and downloads its PDF', async () => {
    // A real patient's sheet prints only with the clinic's own details (never the demo's).
    await apiAs(hs, 'PUT', '/api/settings/clinic', {
      name: 'Test Renal Unit',
      contact: '555-0100',
      dietitianName: 'R. Test',
    });
    await page.goto(`${planUrl}/preview`);
    await expect.poll(() => page.locator('#handout-lang').inputValue(), POLL).toBe('es');
    await page.waitForFunction(
      () => (document.getElementById('handout-frame') as HTMLIFrameElement).dataset.lang === 'es',
    );
    const frame = page.frameLocator('#handout-frame');
    await expect.poll(() => frame.locator('html').getAttribute('lang'), POLL).toBe('es');
    await expectAccessible(page);
    await shot(page, '06-take-home-sheet-es');
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.click('#handout-pdf'),
    ]);
    const path = `${ARTIFACTS}handout-es.pdf`;
    await download.saveAs(path);
    expect(readFileSync(path).subarray(0, 5).toString('latin1')).toBe('%PDF-');
  });

  it('sifts a pasted diary and fixes one match', async () => {
    await page.goto(`${hs.baseUrl}/diary`);
    // Invented diary for the test.
    await page.fill(
      '#diary-text',
      [
        '2026-03-03',
        'breakfast: 2 slices white bread',
        'lunch - 1 cup cooked white rice',
        'snack: 1 apple',
      ].join('\n'),
    );
    await page.click('#diary-form button[type="submit"]');
    await page.waitForSelector('#diary-entries tbody tr');
    await expectAccessible(page);
    const row = page.locator('#diary-entries tbody tr').last();
    const input = row.locator('input[role="combobox"]');
    await input.fill('apples raw with skin');
    await page.waitForFunction(
      (id) => document.getElementById(id)?.dataset.query === 'apples raw with skin',
      (await input.getAttribute('aria-controls')) ?? '',
    );
    await input.press('Enter');
    await expect
      .poll(() => page.locator('#diary-status').textContent(), POLL)
      .toContain('now matches');
    await expect
      .poll(
        () =>
          page
            .locator('#diary-entries tbody tr')
            .last()
            .locator('[data-testid="match-name"]')
            .textContent(),
        POLL,
      )
      .toBe(sr28('09003').name);
    await shot(page, '07-diary-sift');
  });

  it('shows the food tables with counts, and the clinic settings', async () => {
    await page.goto(`${hs.baseUrl}/imports`);
    await page.waitForSelector('#sources table');
    // Every SR28 food went in through the test helper (one source).
    const before = await page.locator('#sources tbody tr').count();
    expect(before).toBeGreaterThan(0);
    // Start an import from an uploaded file (invented demo products) and follow its progress.
    await page.selectOption('#import-format', 'products-csv');
    await page.setInputFiles(
      '#import-file',
      fileURLToPath(new URL('../fixtures/import/products-mini.csv', import.meta.url)),
    );
    await page.click('#import-form button[type="submit"]');
    await expect
      .poll(() => page.locator('#import-status').textContent(), POLL)
      .toContain('Imported');
    expect(await page.locator('#import-progress').getAttribute('value')).toBe('100');
    await expect.poll(() => page.locator('#sources tbody tr').count(), POLL).toBe(before + 1);
    await expectAccessible(page);
    await shot(page, '08-food-tables');
    await page.goto(`${hs.baseUrl}/settings`);
    await page.waitForSelector('#absorption-form input');
    await expectAccessible(page);
    await shot(page, '09-clinic-settings');
    await page.goto(patientUrl);
    await page.waitForSelector('#plans table');
    await page.goto(`${hs.baseUrl}/patients`);
    await page.waitForSelector('#patient-list table');
    expect(await page.locator('#patient-list tbody tr').count()).toBe(1);
    await shot(page, '10-caseload-list');
  });

  it('fetched nothing from outside the server', () => {
    expect(hs.offsite).toEqual([]);
  });
});
