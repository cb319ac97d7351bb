/**
 * First-run set-up as a new user does it, in real Chromium: start the server on an empty
 * database, open the one-time link it prints, fill in the form, and land signed in as the admin.
 * Then the Take-home sheet preview of the invented demo plan renders inside the page's CSP.
 * Needs Debian's chromium: skipped (saying so) without it, and failing when CI is set.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fixedClock } from '../../src/clock.js';
import { loadConfig } from '../../src/config.js';
import { serve } from '../../src/server/serve.js';
import { chromiumPresent } from '../helpers/requirements.js';
import { CHROMIUM, axeReport, runAxe } from './harness.js';

const hasChromium = chromiumPresent();

describe.skipIf(!hasChromium)('set-up from the printed link in Chromium', () => {
  let dir: string;
  let server: Awaited<ReturnType<typeof serve>>;
  let printed = '';
  let context: BrowserContext;
  let page: Page;
  const consoleErrors: string[] = [];

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'phl-setup-e2e-'));
    const out = new PassThrough();
    out.on('data', (c: Buffer) => (printed += c));
    server = await serve(
      loadConfig(
        {},
        {
          dbFile: join(dir, 'db.sqlite'),
          host: '127.0.0.1',
          port: 0,
          seedDemo: true, // invented demo clinic, patient and plan (for the preview)
          logLevel: 'silent',
        },
      ),
      fixedClock('2026-03-05T09:30:00Z'), // invented fixed time
      { stdout: out, stderr: new PassThrough().resume() },
    );
    context = await chromium.launchPersistentContext(join(dir, 'profile'), {
      executablePath: CHROMIUM,
      headless: true,
      viewport: { width: 1280, height: 720 },
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1',
      ],
    });
    page = context.pages()[0] ?? (await context.newPage());
    page.on('console', (m) => {
      if (m.type() === 'error') consoleErrors.push(m.text());
    });
  }, 120_000);

  afterAll(async () => {
    await context?.close().catch(() => undefined);
    await server?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('creates the admin from the printed one-time link, on a styled page', async () => {
    const link = /(http:\/\/127\.0\.0\.1:\d+\/setup\?token=[\w-]+)/.exec(printed)?.[1];
    expect(link, printed).toBeDefined();
    await page.goto(link!);
    await expect(page.locator('h1').textContent()).resolves.toBe('Create the clinic admin account');
    // styled like the other screens: the shared stylesheet applies (its card has a border)
    const cardBorder = await page
      .locator('.card')
      .evaluate((el) => getComputedStyle(el).borderTopStyle);
    expect(cardBorder).not.toBe('none');
    const violations = await runAxe(page);
    expect(violations, axeReport(violations)).toEqual([]);

    await page.fill('#setup-username', 'clinic-admin');
    await page.fill('#setup-password', 'ledger lantern basalt ochre');
    await page.fill('#setup-password2', 'ledger lantern basalt ochre');
    await page.click('button[type="submit"]');
    await page.waitForSelector('h1:text("Admin account created")');
    expect(await page.textContent('main')).toContain('You are signed in as clinic-admin');

    // the link is spent, and the admin is signed in
    await page.goto(link!);
    expect(await page.textContent('h1')).toBe('Set-up is done');
    await page.goto(`${server.address}/patients`);
    await page.waitForFunction(() =>
      document.getElementById('whoami-name')?.textContent?.includes('clinic-admin'),
    );
  });

  it('shows the Take-home sheet preview without a <base> the page CSP refuses', async () => {
    const plan = server.db.sqlite.prepare('SELECT id FROM plan ORDER BY id LIMIT 1').get() as
      { id: number } | undefined;
    expect(plan, 'the demo plan (seeded on first start)').toBeDefined();
    consoleErrors.length = 0;
    await page.goto(`${server.address}/plans/${plan!.id}/preview?lang=en`);
    const frame = page.frameLocator('#handout-frame');
    await frame.locator('.sheet').waitFor({ timeout: 15_000 });
    const bases = await frame.locator('base').count();
    expect(bases).toBe(0);
    // the sheet's own stylesheet still resolves: handout.css sets body text to 13 pt
    const fontSize = await frame.locator('body').evaluate((el) => getComputedStyle(el).fontSize);
    expect(fontSize).toBe('17.3333px'); // 13 pt x 96/72 px per pt
    expect(consoleErrors.filter((e) => /base URI|Content Security Policy/i.test(e))).toEqual([]);
  });
});
