/**
 * Browser-test harness: a real server on 127.0.0.1 (random port, its own process) over a
 * temporary SQLite file, an account to sign in with, and Debian's Chromium driven by
 * playwright-core. Nothing leaves the machine: the browser resolves no host name but the test server's, and every request to
 * anywhere else is recorded in `offsite`.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { migrateToLatest, openDb, type Db } from '../../src/db/database.js';

const SERVER = fileURLToPath(new URL('./server-process.ts', import.meta.url));

import { CHROMIUM } from '../helpers/requirements.js';

export { CHROMIUM };
/** Invented test credentials (never a real account). */
export const E2E_USER = { username: 'dietitian-e2e', password: 'plate ledger test password 42' };

export interface WebHarness {
  baseUrl: string;
  context: BrowserContext;
  page: Page;
  /** URLs the browser tried to reach outside the test server (must stay empty). */
  offsite: string[];
  close(): Promise<void>;
}

/** Starts server-process.ts over the database file and waits for its address. */
async function startServer(file: string): Promise<{ address: string; child: ChildProcess }> {
  const child = spawn(
    process.execPath,
    ['--import', 'tsx', SERVER, file, E2E_USER.username, E2E_USER.password],
    { stdio: ['pipe', 'pipe', 'inherit'] },
  );
  const lines = createInterface({ input: child.stdout! });
  const address = await new Promise<string>((resolve, reject) => {
    child.once('exit', (code) => reject(new Error(`test server exited (${code})`)));
    lines.on('line', (l) => {
      if (l.startsWith('READY ')) resolve(l.slice(6));
    });
  });
  return { address, child };
}

/**
 * Opens the server (in its own process) and the browser; `seed` fills the database file before
 * the server opens it.
 */
export async function openWebHarness(seed: (db: Db) => Promise<void> | void): Promise<WebHarness> {
  const dir = mkdtempSync(join(tmpdir(), 'phosledger-web-'));
  const file = join(dir, 'test.sqlite');
  const db = openDb(file);
  await migrateToLatest(db);
  await seed(db);
  await db.close();
  const { address, child } = await startServer(file);
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
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
      // Every host name but the test server's resolves to nothing: no request leaves the machine.
      '--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE 127.0.0.1',
      // and an address typed as digits goes to a closed port instead.
      '--proxy-server=127.0.0.1:9',
      '--proxy-bypass-list=127.0.0.1',
    ],
  });
  // Watched, not intercepted: routing every request through the driver would add its round trip
  // (~15 ms) to each one the benchmark times. The resolver rule above already stops the browser
  // from reaching any other host; a request that tries is recorded here.
  const offsite: string[] = [];
  context.on('request', (request) => {
    const url = request.url();
    if (!url.startsWith(address) && !/^(data|blob|about):/.test(url)) offsite.push(url);
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    baseUrl: address,
    context,
    page,
    offsite,
    async close() {
      await context.close().catch(() => undefined);
      child.stdin!.end();
      await exited;
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
