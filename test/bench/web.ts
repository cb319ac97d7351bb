/**
 * Consult screens in real Chromium over loopback, on a database holding every USDA SR28 food:
 * type-ahead keystroke-to-rendered latency (goal p95 < 50 ms) against a bare fetch of the same
 * search from the page (the baseline) and a fetch from a bare node:http server (the browser's own
 * floor on this machine), the plate ledger's first paint (goal < 1 s) and its page weight
 * (goal < 300 kB). The server runs in its own process, as in a clinic.
 */
import { existsSync } from 'node:fs';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { insertFoods, loadAllSr28Foods } from '../helpers/sr28.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { apiAs, CHROMIUM, openWebHarness, signInThroughPage } from '../web/harness.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

// Words a dietitian types during a consult (invented list, common SR28 foods).
const WORDS = [
  'chicken breast',
  'cheddar',
  'white bread',
  'milk whole',
  'rice cooked',
  'egg raw',
  'apples raw',
  'pinto beans',
  'yogurt plain',
  'salmon',
];

function line(label: string, v: string): void {
  console.log(`   ${label.padEnd(44)} ${v}`);
}

export const webBench: BenchSection = {
  name: 'web',
  title:
    'consult screens in Chromium: type-ahead round trip, plate ledger first paint, page weight',
  async run() {
    if (!hasSr28) return void console.log(`   skipped: ${SR28_MISSING}`);
    if (!existsSync(CHROMIUM))
      return void console.log(`   skipped: ${CHROMIUM} not installed (apt-get install chromium)`);
    const hs = await openWebHarness((db) => {
      insertFoods(db, [...loadAllSr28Foods().values()]);
    });
    try {
      await signInThroughPage(hs);
      // An invented patient with a one-day plan of five SR28 foods.
      const patient = await apiAs<{ id: number }>(hs, 'POST', '/api/patients', {
        label: 'Bench patient (invented)',
        weightKg: 70,
        ckdStage: '5',
        dialysis: 'hemodialysis',
        diabetes: false,
        binder: {
          ingredient: 'calcium-acetate',
          unitStrengthMg: 667,
          schedule: 'per-day',
          units: 6,
        },
      });
      const hits = async (q: string) =>
        (
          await apiAs<Array<{ id: number }>>(
            hs,
            'GET',
            `/api/foods?q=${encodeURIComponent(q)}&limit=1`,
          )
        )[0]?.id ?? 0;
      const ids = await Promise.all(
        ['chicken breast roasted', 'cheddar', 'white bread', 'milk whole', 'rice white cooked'].map(
          hits,
        ),
      );
      const plan = await apiAs<{ id: number }>(hs, 'POST', `/api/patients/${patient.id}/plans`, {
        name: 'Bench plan',
        days: [
          {
            label: 'Day 1',
            occasions: [
              {
                name: 'Breakfast',
                items: [
                  { foodId: ids[2], grams: 58 },
                  { foodId: ids[3], grams: 244 },
                ],
              },
              {
                name: 'Lunch',
                items: [
                  { foodId: ids[0], grams: 120 },
                  { foodId: ids[4], grams: 160 },
                ],
              },
              { name: 'Dinner', items: [{ foodId: ids[1], grams: 30 }] },
            ],
          },
        ],
      });
      const url = `${hs.baseUrl}/plans/${plan.id}`;
      const { page } = hs;

      // Page weight and first paint: a cold load (cache disabled through DevTools).
      const cdp = await hs.context.newCDPSession(page);
      await cdp.send('Network.enable');
      await cdp.send('Network.setCacheDisabled', { cacheDisabled: true });
      const bytes = new Map<string, number>();
      cdp.on('Network.loadingFinished', (e: { requestId: string; encodedDataLength: number }) => {
        bytes.set(e.requestId, e.encodedDataLength);
      });
      const paints: number[] = [];
      const ready: number[] = [];
      for (let i = 0; i < 6; i++) {
        bytes.clear();
        await page.goto(url, { waitUntil: 'load' });
        await page.waitForSelector('[data-testid="total-phosphorusMg"]');
        const t = await page.evaluate(() => {
          const fcp = performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? NaN;
          const totals = performance.getEntriesByName('phl-totals')[0]?.startTime ?? NaN;
          return { fcp, now: totals };
        });
        if (i > 0) {
          paints.push(t.fcp);
          ready.push(t.now);
        }
      }
      const weight = [...bytes.values()].reduce((a, b) => a + b, 0);
      // Where the last load spent its time: each request's start and end, ms after navigation.
      const requests = await page.evaluate(() =>
        (performance.getEntriesByType('resource') as PerformanceResourceTiming[]).map((r) => ({
          name: new URL(r.name).pathname,
          start: Math.round(r.startTime),
          end: Math.round(r.responseEnd),
        })),
      );
      await cdp.send('Network.setCacheDisabled', { cacheDisabled: false });

      // Type-ahead: real key presses; the page records keydown time and the time the listbox
      // shows that query's results (after the next animation frame, i.e. painted). The page is
      // loaded afresh for each word, so no answer comes from the finder's per-page memory.
      const lat: number[] = [];
      for (const word of WORDS) {
        await page.goto(url, { waitUntil: 'load' });
        await page.waitForSelector('[data-testid="total-phosphorusMg"]');
        await page.evaluate(() => {
          const w = window as unknown as { __lat: number[]; __t: number };
          w.__lat = [];
          const input = document.getElementById('food-search') as HTMLInputElement;
          const list = document.getElementById('food-results') as HTMLElement;
          input.addEventListener('keydown', () => (w.__t = performance.now()), true);
          new MutationObserver(() => {
            if (list.dataset.query !== input.value.trim()) return;
            const t0 = w.__t;
            requestAnimationFrame(() => w.__lat.push(performance.now() - t0));
          }).observe(list, { attributes: true, attributeFilter: ['data-query'], childList: true });
        });
        await page.focus('#food-search');
        for (const ch of word) {
          const before = await page.evaluate(
            () => (window as unknown as { __lat: number[] }).__lat.length,
          );
          await page.keyboard.press(ch === ' ' ? 'Space' : ch);
          if (ch !== ' ') {
            await page
              .waitForFunction(
                (n) => (window as unknown as { __lat: number[] }).__lat.length > n,
                before,
                { timeout: 5000 },
              )
              .catch(() => undefined);
          }
        }
        lat.push(...(await page.evaluate(() => (window as unknown as { __lat: number[] }).__lat)));
      }

      // Baseline: the bare search request from the same page, no rendering.
      const queries = WORDS.flatMap((w) => [...w].map((_, i) => w.slice(0, i + 1).trim())).filter(
        (q) => q.length > 0,
      );
      const base = await page.evaluate(async (qs) => {
        const out: number[] = [];
        for (const q of qs) {
          const t0 = performance.now();
          await (await fetch(`/api/foods?q=${encodeURIComponent(q)}&limit=12`)).json();
          out.push(performance.now() - t0);
        }
        return out;
      }, queries);

      // The browser's own floor: the same number of fetches from a page of a bare node:http
      // server answering a search-sized body at once, so no product code is in the way. Its
      // requests go to another port on purpose: the off-server count is taken before them.
      const offsite = hs.offsite.length;
      const sample = await (
        await hs.context.request.get(`${hs.baseUrl}/api/foods?q=chicken&limit=12`)
      ).body();
      const bare = createServer((_req, res) => {
        res.writeHead(200, { 'content-type': 'application/json' }).end(sample);
      });
      await new Promise<void>((r) => bare.listen(0, '127.0.0.1', r));
      const floorPage = await hs.context.newPage();
      let floor: number[];
      try {
        await floorPage.goto(`http://127.0.0.1:${(bare.address() as AddressInfo).port}/`);
        floor = await floorPage.evaluate(async (n) => {
          const out: number[] = [];
          for (let i = 0; i < n; i++) {
            const t0 = performance.now();
            await (await fetch(`/x?i=${i}`)).json();
            out.push(performance.now() - t0);
          }
          return out;
        }, queries.length);
      } finally {
        await floorPage.close();
        bare.close();
      }

      const p95 = percentile(lat, 95);
      const b95 = percentile(base, 95);
      line('foods in database (USDA SR28)', fmt(loadAllSr28Foods().size));
      line('type-ahead keystrokes measured', fmt(lat.length));
      line(
        'type-ahead keystroke-to-rendered p50 / p95',
        `${fmt(percentile(lat, 50), 1)} / ${fmt(p95, 1)} ms (goal p95 < 50 ms)`,
      );
      line('baseline bare fetch p50 / p95', `${fmt(percentile(base, 50), 1)} / ${fmt(b95, 1)} ms`);
      line('ratio type-ahead p95 / baseline p95', `${fmt(p95 / b95, 2)}x`);
      line(
        'browser floor: fetch from a bare server p50/p95',
        `${fmt(percentile(floor, 50), 1)} / ${fmt(percentile(floor, 95), 1)} ms (same body, no product code)`,
      );
      line(
        'plate ledger first contentful paint p50 / max',
        `${fmt(percentile(paints, 50), 0)} / ${fmt(Math.max(...paints), 0)} ms (goal < 1,000 ms)`,
      );
      line(
        'plate ledger totals rendered p50 / max',
        `${fmt(percentile(ready, 50), 0)} / ${fmt(Math.max(...ready), 0)} ms`,
      );
      line(
        'plate ledger page weight (cold, all requests)',
        `${fmt(weight / 1024, 1)} kB (goal < 300 kB)`,
      );
      for (const r of requests) line(`  load: ${r.name}`, `${fmt(r.start)} -> ${fmt(r.end)} ms`);
      if (offsite > 0) line('requests outside the server (must be 0)', String(offsite));
    } finally {
      await hs.close();
    }
  },
};
