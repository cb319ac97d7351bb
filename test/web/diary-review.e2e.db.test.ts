/**
 * The diary review flow in real Chromium: paste a diary whose lines name several foods, see one
 * row per food, the list of entries waiting for review (a misspelt food matched with low
 * confidence, a negative amount), confirm one, enter the amount of the other, and watch both
 * join the day's totals. axe-core WCAG 2.1 A/AA on the screen; screenshots in test-artifacts/.
 * Needs USDA SR28 and Debian's chromium: under CI a missing one fails; elsewhere it skips.
 */
import { mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { insertFoods, loadAllSr28Foods } from '../helpers/sr28.js';
import { chromiumPresent } from '../helpers/requirements.js';
import { hasSr28 } from '../helpers/shared.js';
import {
  axeReport,
  openWebHarness,
  runAxe,
  signInThroughPage,
  type WebHarness,
} from './harness.js';

const POLL = { timeout: 15_000, interval: 100 };
const ARTIFACTS = fileURLToPath(new URL('../../test-artifacts/', import.meta.url));
const canRun = hasSr28 && chromiumPresent();

/** Invented diary (invented demo data). */
const DIARY = [
  '2026-03-03',
  'breakfast: 2 slices white bread with 1 slice of cheese singles', // line 2: two foods
  'wite bread', // line 3: misspelt, matched below the review threshold
  'dinner: -100 g rice', // line 4: negative amount
].join('\n');

async function dayPhosphorus(page: Page): Promise<string> {
  return (
    (await page.locator('#diary-days tbody tr').first().locator('td').nth(1).textContent()) ?? ''
  );
}

describe.skipIf(!canRun)('diary review in Chromium (USDA SR28 foods)', () => {
  let hs: WebHarness;
  let page: Page;

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    hs = await openWebHarness((db) => {
      insertFoods(db, [...loadAllSr28Foods().values()]);
    });
    page = hs.page;
  }, 120_000);
  afterAll(async () => {
    await hs?.close();
  });

  it('sifts a diary: one row per food, and the entries waiting for review listed', async () => {
    await signInThroughPage(hs, '/diary');
    await page.fill('#diary-text', DIARY);
    await page.click('#diary-form button[type="submit"]');
    await page.waitForSelector('#diary-entries tbody tr');
    // line 2 names two foods: two rows, keys 2 and 2.1; the second is the processed cheese
    expect(await page.locator('#diary-entries tr[data-line="2"]').count()).toBe(2);
    await expect
      .poll(() => page.locator('tr[data-key="2.1"] [data-testid="match-name"]').textContent(), POLL)
      .toMatch(/^Cheese, pasteurized process, American/);
    // the misspelt line and the negative amount wait for review, outside the totals
    await expect.poll(() => page.locator('#diary-review li').count(), POLL).toBe(2);
    expect(await page.locator('[data-review-key="3"]').textContent()).toContain('confidence');
    expect(await page.locator('[data-review-key="4"]').textContent()).toContain('negative');
    expect(await page.locator('tr[data-key="3"] [data-testid="awaiting-review"]').count()).toBe(1);
    const violations = await runAxe(page);
    expect(violations, axeReport(violations)).toEqual([]);
    await page.screenshot({ path: `${ARTIFACTS}diary-review-1.png`, fullPage: true });
  });

  it('confirming a weak match brings it into the day total', async () => {
    const before = await dayPhosphorus(page);
    await page.click('tr[data-key="3"] button:has-text("Confirm")');
    await expect
      .poll(() => page.locator('#diary-status').textContent(), POLL)
      .toContain('confirmed');
    await expect.poll(() => page.locator('#diary-review li').count(), POLL).toBe(1);
    expect(await page.locator('tr[data-key="3"] [data-testid="awaiting-review"]').count()).toBe(0);
    expect(await dayPhosphorus(page)).not.toBe(before);
  });

  it('entering the amount of a negative line counts it', async () => {
    await page.fill('tr[data-key="4"] input.entry-amount', '100 g');
    await page.click('tr[data-key="4"] button:has-text("Confirm")');
    await expect.poll(() => page.locator('#diary-review li').count(), POLL).toBe(0);
    expect(await page.locator('[data-testid="review-empty"]').count()).toBe(1);
    // 100 g entered by the reviewer
    expect(await page.locator('tr[data-key="4"]').textContent()).toContain('100 g');
    const violations = await runAxe(page);
    expect(violations, axeReport(violations)).toEqual([]);
    await page.screenshot({ path: `${ARTIFACTS}diary-review-2.png`, fullPage: true });
  });

  it('fetched nothing from outside the server', () => {
    expect(hs.offsite).toEqual([]);
  });
});
