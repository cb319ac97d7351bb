/**
 * Browser-test harness: a real server on 127.0.0.1 (random port) over a temporary SQLite file,
 * an account to sign in with, and Debian's Chromium driven by playwright-core. Nothing leaves
 * the machine: the browser refuses every request that is not to the test server.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { TEST_SCRYPT_PARAMS } from '../../src/auth/password.js';
import { fixedClock } from '../../src/clock.js';
import { migrateToLatest, openDb, type Db } from '../../src/db/database.js';
import { buildApp, type App } from '../../src/server/app.js';

export const CHROMIUM = '/usr/bin/chromium';
/** Invented test credentials (never a real account). */
export const E2E_USER = { username: 'dietitian-e2e', password: 'plate ledger test password 42' };

export interface WebHarness {
  app: App;
  db: Db;
  baseUrl: string;
  context: BrowserContext;
  page: Page;
  /** URLs the browser tried to reach outside the test server (must stay empty). */
  offsite: string[];
  close(): Promise<void>;
}

/** Opens the server and the browser; `seed` fills the database before the server starts. */
export async function openWebHarness(seed: (db: Db) => Promise<void> | void): Promise<WebHarness> {
  const dir = mkdtempSync(join(tmpdir(), 'phosledger-web-'));
  const db = openDb(join(dir, 'test.sqlite'));
  await migrateToLatest(db);
  await seed(db);
  const app = await buildApp({
    db,
    clock: fixedClock('2026-03-05T09:30:00Z'), // invented fixed test time
    auth: { scryptParams: TEST_SCRYPT_PARAMS },
  });
  await app.ready();
  await app.auth.createUser(E2E_USER.username, 'dietitian', E2E_USER.password);
  const address = await app.listen({ host: '127.0.0.1', port: 0 });
  const context = await chromium.launchPersistentContext(join(dir, 'profile'), {
    executablePath: CHROMIUM,
    headless: true,
    acceptDownloads: true,
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
    ],
  });
  const offsite: string[] = [];
  await context.route('**/*', (route) => {
    const url = route.request().url();
    if (
      url.startsWith(address) ||
      url.startsWith('data:') ||
      url.startsWith('blob:') ||
      url === 'about:blank' ||
      url.startsWith('about:')
    ) {
      return route.continue();
    }
    offsite.push(url);
    return route.abort();
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    app,
    db,
    baseUrl: address,
    context,
    page,
    offsite,
    async close() {
      await context.close().catch(() => undefined);
      await app.close();
      await db.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

const require = createRequire(import.meta.url);
let axeSource: string | undefined;

export interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: Array<{ target: string[]; html: string }>;
}

/**
 * Runs axe-core (WCAG 2.0/2.1 A and AA rules) on the page. The script is evaluated through the
 * DevTools protocol, so the page's Content-Security-Policy stays in force.
 */
export async function runAxe(page: Page): Promise<AxeViolation[]> {
  axeSource ??= readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');
  await page.evaluate(axeSource);
  return page.evaluate(async () => {
    const axe = (
      window as unknown as {
        axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: AxeViolation[] }> };
      }
    ).axe;
    const res = await axe.run(document, {
      runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] },
      resultTypes: ['violations'],
    });
    return res.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.map((n) => ({ target: n.target, html: n.html.slice(0, 200) })),
    }));
  });
}

/** A readable one-line-per-problem text of axe violations (for the assertion message). */
export function axeReport(violations: AxeViolation[]): string {
  return violations
    .map(
      (v) =>
        `${v.id} (${v.impact}): ${v.help} at ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`,
    )
    .join('\n');
}

/** Signs in through the sign-in screen (the way a person does) and lands on `next`. */
export async function signInThroughPage(hs: WebHarness, next = '/patients'): Promise<void> {
  const { page } = hs;
  await page.goto(`${hs.baseUrl}${next}`);
  await page.waitForURL('**/signin?next=*');
  await page.fill('#signin-username', E2E_USER.username);
  await page.fill('#signin-password', E2E_USER.password);
  await page.keyboard.press('Enter');
  await page.waitForURL(`**${next}`);
}

/** Calls the API with the browser's session cookie and CSRF token (for test set-up only). */
export async function apiAs<T>(
  hs: WebHarness,
  method: string,
  path: string,
  body?: unknown,
): Promise<T> {
  const req = hs.context.request;
  const session = await (await req.get(`${hs.baseUrl}/api/session`)).json();
  const res = await req.fetch(`${hs.baseUrl}${path}`, {
    method,
    headers: { 'x-csrf-token': String(session.csrfToken) },
    ...(body === undefined ? {} : { data: body }),
  });
  if (!res.ok()) throw new Error(`${method} ${path}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}
