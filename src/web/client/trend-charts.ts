import * as Plot from '@observablehq/plot';
import type { AnalyteTrend, Trends } from '../../patients/trends.js';
import { h } from './dom.js';
import { num } from './format.js';

/**
 * The trend view: one chart per analyte (the clinic's band behind the results), all on one time
 * axis with the plan versions (dashed) and binder changes (dotted), and a chart of the planned
 * daily absorbable phosphorus. Each chart has a table of the same values beside it.
 */

const DAY_MS = 86_400_000;
const INK = '#2b2b2b';
const PLAN_RULE = '#5b4a3a';
const BINDER_RULE = '#9a5b00';
const BAND_FILL = '#e9dcc0';

const day = (iso: string) => new Date(`${iso.slice(0, 10)}T00:00:00Z`);

/** One x domain for every chart, so a vertical line means the same day in each. */
export function timeDomain(t: Trends): [Date, Date] | null {
  const dates = [
    ...t.analytes.flatMap((a) => a.points.map((p) => p.date)),
    ...t.planVersions.map((v) => v.date),
    ...t.binderChanges.map((b) => b.date),
  ].sort();
  const first = dates[0];
  const last = dates.at(-1);
  if (!first || !last) return null;
  return [new Date(day(first).getTime() - 3 * DAY_MS), new Date(day(last).getTime() + 3 * DAY_MS)];
}

/**
 * Fits a Plot chart to the page: Plot adds a <style> element (the CSP allows no inline style;
 * app.css carries its rules) and labels its mark groups with aria-label but no role, which
 * WCAG checks refuse. The chart becomes one image with its label; the table beside it carries
 * the values for screen readers.
 */
function forThePage(el: Element): Element {
  for (const s of el.querySelectorAll('style')) s.remove();
  for (const g of el.querySelectorAll('[aria-label]')) g.removeAttribute('aria-label');
  for (const g of el.querySelectorAll('[aria-description]')) g.removeAttribute('aria-description');
  el.setAttribute('role', 'img');
  el.setAttribute('class', `${el.getAttribute('class') ?? ''} trend-svg`.trim());
  return el;
}

function eventMarks(t: Trends) {
  return [
    Plot.ruleX(t.planVersions, {
      x: (v: Trends['planVersions'][number]) => day(v.date),
      stroke: PLAN_RULE,
      strokeDasharray: '5,3',
      strokeWidth: 1.5,
    }),
    Plot.ruleX(t.binderChanges, {
      x: (b: Trends['binderChanges'][number]) => day(b.date),
      stroke: BINDER_RULE,
      strokeDasharray: '1,3',
      strokeWidth: 2,
    }),
  ];
}

function analyteChart(a: AnalyteTrend, t: Trends, domain: [Date, Date]): Element {
  const values = a.points.map((p) => p.canonicalValue);
  const lo = Math.min(...values, a.band.min ?? Infinity);
  const hi = Math.max(...values, a.band.max ?? -Infinity);
  const pad = (hi - lo || hi || 1) * 0.15;
  const yDomain: [number, number] = [Math.max(0, lo - pad), hi + pad];
  const band = [
    {
      y1: a.band.min ?? yDomain[0],
      y2: a.band.max ?? yDomain[1],
    },
  ];
  const svg = Plot.plot({
    width: 600,
    height: 190,
    marginLeft: 56,
    x: { type: 'utc', domain, label: null },
    y: { domain: yDomain, label: a.canonicalUnit, grid: true },
    ariaLabel: `${a.label} over time, ${a.canonicalUnit}`,
    ariaDescription: `${a.points.length} result(s); band ${bandText(a)}`,
    marks: [
      a.band.min !== null || a.band.max !== null
        ? Plot.rectY(band, { x1: domain[0], x2: domain[1], y1: 'y1', y2: 'y2', fill: BAND_FILL })
        : null,
      ...eventMarks(t),
      Plot.lineY(a.points, {
        x: (p: { date: string }) => day(p.date),
        y: 'canonicalValue',
        stroke: INK,
      }),
      Plot.dot(a.points, {
        x: (p: { date: string }) => day(p.date),
        y: 'canonicalValue',
        fill: INK,
        r: 3.5,
        title: (p: { date: string; canonicalValue: number }) =>
          `${p.date}: ${p.canonicalValue} ${a.canonicalUnit}`,
      }),
    ],
  });
  return forThePage(svg);
}

function bandText(a: AnalyteTrend): string {
  const u = a.canonicalUnit;
  if (a.band.min !== null && a.band.max !== null)
    return `${num(a.band.min, 2)}–${num(a.band.max, 2)} ${u}`;
  if (a.band.max !== null) return `up to ${num(a.band.max, 2)} ${u}`;
  if (a.band.min !== null) return `at least ${num(a.band.min, 2)} ${u}`;
  return 'none set';
}

function analyteTable(a: AnalyteTrend): HTMLTableElement {
  return h(
    'table',
    { class: 'trend-table', 'data-analyte': a.analyte },
    h('caption', {}, `${a.label}: results (band ${bandText(a)})`),
    h(
      'thead',
      {},
      h(
        'tr',
        {},
        h('th', { scope: 'col' }, 'Date'),
        h('th', { scope: 'col' }, 'As entered'),
        h('th', { scope: 'col', class: 'n' }, a.canonicalUnit),
        h('th', { scope: 'col' }, 'Source'),
      ),
    ),
    h(
      'tbody',
      {},
      [...a.points]
        .reverse()
        .map((p) =>
          h(
            'tr',
            {},
            h('td', { class: 'num' }, p.date),
            h('td', { class: 'num' }, `${num(p.value, 2)} ${p.unit}`),
            h('td', { class: 'n num' }, num(p.canonicalValue, 2)),
            h('td', {}, p.source),
          ),
        ),
    ),
  );
}

function planChart(t: Trends, domain: [Date, Date]): Element {
  const steps = t.planVersions.map((v) => ({ x: day(v.date), ...v.absorbablePhosphorusMgPerDay }));
  const last = steps.at(-1);
  if (last) steps.push({ ...last, x: domain[1] });
  const svg = Plot.plot({
    width: 600,
    height: 170,
    marginLeft: 56,
    x: { type: 'utc', domain, label: null },
    y: { label: 'absorbable P, mg/day', grid: true, zero: true },
    ariaLabel: 'Planned daily absorbable phosphorus of each plan version, with binder changes',
    marks: [
      Plot.areaY(steps, { x: 'x', y1: 'low', y2: 'high', curve: 'step-after', fill: BAND_FILL }),
      Plot.lineY(steps, { x: 'x', y: 'typical', curve: 'step-after', stroke: INK }),
      ...eventMarks(t),
    ],
  });
  return forThePage(svg);
}

function eventsTable(t: Trends): HTMLTableElement {
  const rows = [
    ...t.planVersions.map((v) => ({
      date: v.date,
      what: `Plan "${v.planName}" version ${v.version}`,
      detail: `planned absorbable phosphorus ${num(v.absorbablePhosphorusMgPerDay.typical, 0)} mg/day (range ${num(v.absorbablePhosphorusMgPerDay.low, 0)}–${num(v.absorbablePhosphorusMgPerDay.high, 0)})`,
    })),
    ...t.binderChanges.map((b) => ({ date: b.date, what: 'Binder prescription', detail: b.text })),
  ].sort((a, b) => b.date.localeCompare(a.date));
  return h(
    'table',
    { class: 'trend-table', id: 'trend-events' },
    h('caption', {}, 'Plan versions and binder changes'),
    h(
      'thead',
      {},
      h(
        'tr',
        {},
        h('th', { scope: 'col' }, 'Date'),
        h('th', { scope: 'col' }, 'Change'),
        h('th', { scope: 'col' }, 'Detail'),
      ),
    ),
    h(
      'tbody',
      {},
      rows.map((r) =>
        h('tr', {}, h('td', { class: 'num' }, r.date), h('td', {}, r.what), h('td', {}, r.detail)),
      ),
    ),
  );
}

function correctedTable(t: Trends): HTMLElement | null {
  const pts = t.correctedCalcium.points;
  if (pts.length === 0) return null;
  return h(
    'div',
    { class: 'trend-row' },
    h(
      'table',
      { class: 'trend-table', id: 'corrected-calcium' },
      h('caption', {}, 'Albumin-corrected calcium (same-day calcium and albumin)'),
      h(
        'thead',
        {},
        h(
          'tr',
          {},
          h('th', { scope: 'col' }, 'Date'),
          h('th', { scope: 'col', class: 'n' }, 'Total Ca mg/dL'),
          h('th', { scope: 'col', class: 'n' }, 'Albumin g/dL'),
          h('th', { scope: 'col', class: 'n' }, 'Corrected mg/dL'),
        ),
      ),
      h(
        'tbody',
        {},
        [...pts]
          .reverse()
          .map((p) =>
            h(
              'tr',
              {},
              h('td', { class: 'num' }, p.date),
              h('td', { class: 'n num' }, num(p.totalMgPerDl, 2)),
              h('td', { class: 'n num' }, num(p.albuminGPerDl, 2)),
              h('td', { class: 'n num' }, num(p.correctedMgPerDl, 2)),
            ),
          ),
      ),
    ),
    h(
      'p',
      { class: 'source' },
      t.correctedCalcium.formula,
      h('br', {}),
      t.correctedCalcium.caution,
    ),
  );
}

/** The whole trend view for a patient. */
export function renderTrends(t: Trends): HTMLElement[] {
  const domain = timeDomain(t);
  const out: HTMLElement[] = [h('p', { class: 'caution-inline small' }, t.caution)];
  if (!domain) {
    out.push(
      h('p', { class: 'muted' }, 'No results, plan versions or binder changes recorded yet.'),
    );
    return out;
  }
  out.push(
    h(
      'p',
      { class: 'small muted legend' },
      'Shaded: the clinic band. Dashed line: a plan version saved. Dotted line: a binder prescription change.',
    ),
  );
  out.push(
    h(
      'div',
      { class: 'trend-row', 'data-chart': 'plan' },
      h(
        'figure',
        { class: 'trend-chart' },
        planChart(t, domain),
        h('figcaption', {}, 'Planned daily absorbable phosphorus (typical, with its range)'),
      ),
      eventsTable(t),
    ),
  );
  for (const a of t.analytes.filter((x) => x.points.length > 0)) {
    out.push(
      h(
        'div',
        { class: 'trend-row', 'data-chart': a.analyte },
        h(
          'figure',
          { class: 'trend-chart' },
          analyteChart(a, t, domain),
          h('figcaption', {}, `${a.label} (${a.canonicalUnit}). Band: ${a.band.source}`),
        ),
        analyteTable(a),
      ),
    );
  }
  const corrected = correctedTable(t);
  if (corrected) out.push(corrected);
  return out;
}
