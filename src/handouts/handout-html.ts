import { projectPath } from '../paths.js';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import Handlebars from 'handlebars';
import type { LanguageStatus } from '../i18n/catalogue.js';
import type { PaperSize } from './handout.js';
import type { ChartVm, HandoutViewModel } from './view-model.js';

/** Templates and their partials, next to the message catalogues under templates/. */
export const HANDOUT_TEMPLATES_DIR = projectPath('templates', 'handout');

/** Where the routes serve the stylesheet and fonts of the HTML view. */
export const HANDOUT_ASSETS_PATH = '/handouts/assets';

function compileTemplates(dir: string) {
  const hb = Handlebars.create();
  const partials = join(dir, 'partials');
  for (const f of readdirSync(partials).filter((x) => x.endsWith('.hbs'))) {
    hb.registerPartial(f.replace(/\.hbs$/, ''), readFileSync(join(partials, f), 'utf8'));
  }
  // strict: a field the template names that the view-model lacks is an error, not a blank.
  return hb.compile(readFileSync(join(dir, 'handout.hbs'), 'utf8'), { strict: true });
}

// Compiled once, when the module loads (at start-up).
const template = compileTemplates(HANDOUT_TEMPLATES_DIR);

interface SvgChart {
  title: string;
  width: number;
  height: number;
  rects: { x: number; y: number; w: number; h: number; cls: string }[];
  lines: { x1: number; y1: number; x2: number; y2: number; cls: string }[];
  texts: { x: number; y: number; text: string; anchor: 'start' | 'end'; cls: string }[];
  legend: ChartVm['legend'];
}

const r1 = (n: number) => Math.round(n * 10) / 10;

/** The same chart as the PDF's, as SVG geometry (attributes only, so no inline styles). */
export function chartSvg(chart: ChartVm, direction: 'ltr' | 'rtl'): SvgChart {
  const width = 640;
  const rowH = 26;
  const labelW = 170;
  const valueW = 150;
  const barX = labelW + 10;
  const barW = width - barX - valueW;
  const rows = chart.rows.length + 1;
  const height = rows * rowH + (chart.target ? 26 : 6);
  const maxMg =
    Math.max(
      1,
      chart.whole.totalMg,
      chart.whole.absorbableMg.high,
      chart.target?.mg ?? 0,
      ...chart.rows.map((r) => r.absorbableMg.high),
    ) * 1.05;
  const s = (v: number) => (Math.max(0, v) / maxMg) * barW;
  const X = (x: number, w = 0) => r1(direction === 'ltr' ? x : width - x - w);
  // SVG text follows the page's direction, so 'start' is the right end in RTL pages.
  const start = 'start' as const;
  const out: SvgChart = {
    title: chart.title,
    width,
    height,
    rects: [],
    lines: [],
    texts: [],
    legend: chart.legend,
  };
  const bar = (
    i: number,
    label: string,
    value: string,
    a: ChartVm['whole']['absorbableMg'],
    totalMg: number | null,
  ) => {
    const y = i * rowH + 6;
    out.texts.push({
      x: X(0),
      y: y + 12,
      text: label,
      anchor: start,
      cls: totalMg === null ? '' : 'strong',
    });
    if (totalMg !== null)
      out.rects.push({ x: X(barX, s(totalMg)), y, w: r1(s(totalMg)), h: 14, cls: 'food' });
    out.rects.push({ x: X(barX, s(a.typical)), y, w: r1(s(a.typical)), h: 14, cls: 'bar' });
    const [x1, x2] = [X(barX + s(a.low)), X(barX + s(a.high))];
    out.lines.push({ x1, y1: y + 7, x2, y2: y + 7, cls: 'range' });
    out.lines.push({ x1, y1: y + 2, x2: x1, y2: y + 12, cls: 'range' });
    out.lines.push({ x1: x2, y1: y + 2, x2, y2: y + 12, cls: 'range' });
    const end = Math.max(a.high, a.typical, totalMg ?? 0);
    out.texts.push({
      x: X(barX + s(end) + 8),
      y: y + 12,
      text: value,
      anchor: start,
      cls: totalMg === null ? '' : 'strong',
    });
  };
  chart.rows.forEach((r, i) => bar(i, r.label, r.valueText, r.absorbableMg, null));
  bar(
    chart.rows.length,
    chart.whole.label,
    chart.whole.valueText,
    chart.whole.absorbableMg,
    chart.whole.totalMg,
  );
  out.lines.push({ x1: X(barX), y1: 0, x2: X(barX), y2: rows * rowH, cls: 'axis' });
  if (chart.target) {
    const tx = X(barX + s(chart.target.mg));
    out.lines.push({ x1: tx, y1: 0, x2: tx, y2: rows * rowH + 4, cls: 'target-line' });
    out.texts.push({
      x: X(barX),
      y: rows * rowH + 20,
      text: chart.target.text,
      anchor: start,
      cls: 'target',
    });
  }
  return out;
}

export interface HtmlOptions {
  paper?: PaperSize;
  /** The language's review status and completeness, shown in the clinic panel. */
  status?: LanguageStatus;
  /** For the PDF links in the clinic panel. */
  planId?: number;
  /** The saved version shown, when not the latest (kept in the PDF links). */
  version?: number | undefined;
}

/**
 * The HTML print view of a handout: the same view-model as the PDF, with a clinic panel (not
 * printed unless strings fall back to English) stating the translation's review status.
 */
export function renderHandoutHtml(vm: HandoutViewModel, opts: HtmlOptions = {}): string {
  const paper = opts.paper ?? 'a4';
  const review = opts.status?.review ?? {
    status: vm.review.status,
    note: '',
    reviewer: null,
    date: null,
  };
  const pdf = (p: PaperSize) =>
    opts.planId === undefined
      ? null
      : {
          label: p === 'a4' ? 'A4' : 'US Letter',
          href: `/api/plans/${opts.planId}/handout.pdf?lang=${encodeURIComponent(vm.language)}&paper=${p}${opts.version ? `&version=${opts.version}` : ''}`,
        };
  return template({
    vm,
    paper,
    assets: HANDOUT_ASSETS_PATH,
    days: vm.days.map((d) => ({ ...d, chartSvg: chartSvg(d.chart, vm.direction) })),
    clinic: {
      language: vm.language,
      languageName: opts.status?.englishName ?? vm.languageName,
      reviewStatus: review.status,
      reviewLabel:
        review.status === 'reviewed'
          ? `reviewed by a qualified medical translator${review.reviewer ? ` (${review.reviewer}, ${review.date})` : ''}`
          : 'drafted, not reviewed by a qualified medical translator: check it before relying on it',
      reviewNote: review.note,
      incomplete: vm.fallbackKeys.length > 0,
      fallbackKeys: vm.fallbackKeys,
      pdfLinks: [pdf('a4'), pdf('letter')].filter((x) => x !== null),
      paperLabel: paper === 'a4' ? 'A4' : 'US Letter',
    },
  });
}
