import { IntlMessageFormat } from 'intl-messageformat';
import { formatNumber } from '../i18n/format.js';
import type { PaperSize } from './handout.js';
import { drawCautionBox } from './pdf/caution.js';
import { drawAbsorbableChart } from './pdf/chart.js';
import { createPdfDocument, finishPdf } from './pdf/document.js';
import { PdfFlow, type FlowSurface } from './pdf/flow.js';
import { drawTable, type TableColumn } from './pdf/table.js';
import type { TextStyle } from './pdf/text.js';
import { THEME, TYPE } from './pdf/theme.js';
import type { DayVm, HandoutViewModel, OccasionVm } from './view-model.js';

export interface RenderedPdf {
  bytes: Buffer;
  pageCount: number;
  /** Code points no embedded font could draw (must be empty for a handout to be given out). */
  missingCodePoints: number[];
  /** Text runs whose shaping produced a .notdef glyph (must be 0). */
  notdefRuns: number;
}

const MARGIN = 30;
const BAND = 64;

const style = (
  sizePt: number,
  weight: 'regular' | 'bold' = 'regular',
  color: string = THEME.ink,
): TextStyle => ({
  sizePt,
  weight,
  color,
});

function drawBand(flow: PdfFlow, vm: HandoutViewModel): void {
  const doc = flow.doc;
  doc.rect(0, 0, doc.page.width, BAND).fill(THEME.brand);
  const half = flow.width * 0.6;
  // The title never gets cut: the largest size that fits one line, else two lines at 16 pt.
  let size: number = TYPE.title;
  while (size > 16 && flow.engine.widthOf(vm.strings.title, style(size, 'bold')) > half) size -= 2;
  const titleStyle = style(size, 'bold', THEME.onBrand);
  const lines = flow.wrap(vm.strings.title, titleStyle, half).slice(0, 2);
  const titleTop = (BAND - lines.length * flow.lineHeight(size)) / 2;
  flow.linesAt(lines, titleStyle, 0, titleTop, half);
  const right = [vm.header.patientLabel, vm.header.dateText];
  const rw = flow.width - half - 10;
  flow.linesAt(
    right.map((l) => flow.wrap(l, style(TYPE.small, 'bold', THEME.onBrand), rw)[0] ?? ''),
    style(TYPE.small, 'bold', THEME.onBrand),
    half + 10,
    12,
    rw,
    'end',
  );
}

/** The cover's who/when box in two pairs of columns (a one-day plan's shorter cover). */
function drawInfoCompact(flow: PdfFlow, vm: HandoutViewModel): void {
  const label = style(TYPE.body, 'bold', THEME.muted);
  const value = style(TYPE.body);
  const rows: string[][] = [
    [vm.strings.forLabel, vm.header.patientLabel, vm.strings.dateLabel, vm.header.dateText],
    [
      vm.strings.dietitianLabel,
      vm.header.dietitianName,
      vm.strings.clinicLabel,
      vm.header.clinicName,
    ],
    [vm.strings.contactLabel, vm.header.clinicContact, '', ''],
  ];
  const columns: TableColumn[] = [
    { share: 0.16, style: label },
    { share: 0.34, style: value },
    { share: 0.16, style: label },
    { share: 0.34, style: value },
  ];
  const inner = flow.width - 16;
  const h =
    rows.reduce((sum, row) => {
      const lines = row.map(
        (text, i) =>
          flow.wrap(text, i % 2 ? value : label, inner * (columns[i] as TableColumn).share - 8)
            .length,
      );
      return sum + Math.max(1, ...lines) * flow.lineHeight(TYPE.body) + 6;
    }, 0) + 12;
  const top = flow.y;
  flow.doc.roundedRect(flow.left, top, flow.width, h, 8).fill(THEME.brandPale);
  flow.y += 6;
  drawTable(flow, columns, rows, { x: 8, width: inner, padPt: 3 });
  flow.y = top + h + 8;
  flow.paragraph(vm.strings.subtitle, style(TYPE.subheading, 'bold', THEME.brand), { gapAfter: 2 });
  flow.paragraph(vm.strings.howToRead, style(TYPE.body), { gapAfter: 8 });
}

function drawInfo(flow: PdfFlow, vm: HandoutViewModel): void {
  const label = style(TYPE.body, 'bold', THEME.muted);
  const value = style(TYPE.body);
  const rows: [string, string][] = [
    [vm.strings.forLabel, vm.header.patientLabel],
    [vm.strings.dateLabel, vm.header.dateText],
    [vm.strings.dietitianLabel, vm.header.dietitianName],
    [vm.strings.clinicLabel, vm.header.clinicName],
    [vm.strings.contactLabel, vm.header.clinicContact],
  ];
  const columns: TableColumn[] = [
    { share: 0.3, style: label },
    { share: 0.7, style: value },
  ];
  const top = flow.y;
  const h =
    rows.reduce(
      (s, [, v]) =>
        s +
        Math.max(1, flow.wrap(v, value, flow.width * 0.7 - 24).length) *
          flow.lineHeight(TYPE.body) +
        8,
      0,
    ) + 12;
  flow.doc.roundedRect(flow.left, top, flow.width, h, 8).fill(THEME.brandPale);
  flow.y += 6;
  drawTable(flow, columns, rows, { x: 8, width: flow.width - 16, padPt: 4 });
  flow.y = top + h + 12;
  flow.paragraph(vm.strings.subtitle, style(TYPE.subheading, 'bold', THEME.brand), { gapAfter: 4 });
  flow.paragraph(vm.strings.howToRead, style(TYPE.body), { gapAfter: 12 });
}

function heading(flow: PdfFlow, text: string): void {
  const s = style(TYPE.heading, 'bold', THEME.brand);
  flow.ensure(flow.lineHeight(s.sizePt) * 2);
  flow.paragraph(text, s, { gapAfter: 4 });
}

function occasionHeight(
  flow: PdfFlow,
  occ: OccasionVm,
  itemCols: TableColumn[],
  inner: number,
  rowPadPt = 3,
): number {
  let h = 8 + titleBlockHeight(flow, occ, inner);
  for (const item of occ.items) {
    const a = flow.wrap(
      itemText(item),
      (itemCols[0] as TableColumn).style,
      inner * 0.62 - 6,
    ).length;
    const b = flow.wrap(item.portion, (itemCols[1] as TableColumn).style, inner * 0.38 - 6).length;
    h += Math.max(a, b) * flow.lineHeight(TYPE.body) + 2 * rowPadPt;
  }
  if (occ.binder) h += 5 + flow.measure(binderText(occ), style(TYPE.body, 'bold'), inner - 26);
  return h + 6;
}

/** The item's words with how to cook it, when a method was chosen. */
function itemText(item: OccasionVm['items'][number]): string {
  return item.preparation ? `${item.label} \u00b7 ${item.preparation}` : item.label;
}

/** The "how to cook" page: foods, one instruction per method, the water rule and the caution. */
function drawCooking(
  flow: PdfFlow,
  c: NonNullable<HandoutViewModel['cooking']>,
  cautionHeading: string,
): void {
  flow.newPage();
  heading(flow, c.heading);
  flow.paragraph(c.intro, style(TYPE.body), { gapAfter: 6 });
  for (const line of c.items) flow.paragraph(`\u2022 ${line}`, style(TYPE.body), { gapAfter: 2 });
  flow.y += 6;
  for (const step of c.steps) {
    flow.paragraph(step.label, style(TYPE.body, 'bold'), { gapAfter: 2 });
    flow.paragraph(step.how, style(TYPE.body), { gapAfter: 6 });
  }
  flow.paragraph(c.water, style(TYPE.body, 'bold'), { gapAfter: 8 });
  drawCautionBox(flow, cautionHeading, [c.caution]);
}

function occasionTitle(occ: OccasionVm): string {
  return `${occ.name}${occ.timeText ? `  ${occ.timeText}` : ''}`;
}

/** Whether the title and the absorbed line share one row (they do when both fit). */
function titleShares(flow: PdfFlow, occ: OccasionVm, inner: number): boolean {
  const t = flow.engine.widthOf(occasionTitle(occ), style(TYPE.subheading, 'bold'));
  const a = flow.engine.widthOf(occ.absorbedLine, style(TYPE.small));
  return t + a + 16 <= inner;
}

function titleBlockHeight(flow: PdfFlow, occ: OccasionVm, inner: number): number {
  const t = flow.measure(occasionTitle(occ), style(TYPE.subheading, 'bold'), inner);
  return titleShares(flow, occ, inner)
    ? t
    : t + flow.measure(occ.absorbedLine, style(TYPE.small), inner);
}

function binderText(occ: OccasionVm): string {
  return occ.binder ? occ.binder.line : '';
}

function drawPill(flow: PdfFlow, logicalX: number, y: number): void {
  const doc = flow.doc;
  const x = flow.phys(logicalX, 18);
  doc.save();
  doc.lineWidth(1.2).roundedRect(x, y, 18, 9, 4.5).fillAndStroke(THEME.onBrand, THEME.brand);
  doc.rect(x + 9, y, 9, 9).fill(THEME.brand);
  doc.lineWidth(1.2).roundedRect(x, y, 18, 9, 4.5).stroke(THEME.brand);
  doc.restore();
}

/** Where an occasion box goes across the page (logical x from the start side, width), in pt. */
interface Slot {
  x: number;
  width: number;
}

const ITEM_COLS: TableColumn[] = [
  { share: 0.62, style: style(TYPE.body) },
  { share: 0.38, style: style(TYPE.body, 'bold'), align: 'end' },
];

function slotInner(slot: Slot): number {
  return slot.width - 5 - 2 * 10;
}

/**
 * A meal that does not fit the rest of the page is split between two rows of its table (the
 * first part keeping at least two rows), instead of leaving the space empty; the binder line
 * goes with the second part. Returns false when the meal is drawn whole.
 */
function splitOccasion(flow: PdfFlow, occ: OccasionVm, slot: Slot, rowPadPt: number): boolean {
  const inner = slotInner(slot);
  const room = flow.bottom - flow.y - 6;
  if (flow.y <= flow.top || occasionHeight(flow, occ, ITEM_COLS, inner, rowPadPt) <= room) {
    return false;
  }
  let fitted = 0;
  for (let k = 2; k < occ.items.length; k++) {
    const part = { ...occ, items: occ.items.slice(0, k), binder: null };
    if (occasionHeight(flow, part, ITEM_COLS, inner, rowPadPt) <= room) fitted = k;
  }
  if (fitted === 0) return false;
  drawOccasion(flow, { ...occ, items: occ.items.slice(0, fitted), binder: null }, slot, rowPadPt);
  flow.newPage();
  drawOccasion(flow, { ...occ, items: occ.items.slice(fitted) }, slot, rowPadPt);
  return true;
}

function drawOccasion(
  flow: PdfFlow,
  occ: OccasionVm,
  slot: Slot = { x: 0, width: flow.width },
  rowPadPt = 3,
  allowSplit = false,
): void {
  if (allowSplit && splitOccasion(flow, occ, slot, rowPadPt)) return;
  const stripe = 5;
  const pad = 10;
  const inner = slotInner(slot);
  const itemCols = ITEM_COLS;
  const h = occasionHeight(flow, occ, itemCols, inner, rowPadPt);
  flow.ensure(h + 6);
  const top = flow.y;
  const doc = flow.doc;
  doc.roundedRect(flow.phys(slot.x, slot.width), top, slot.width, h, 6).fill(THEME.brandPale);
  doc.rect(flow.phys(slot.x, stripe), top, stripe, h).fill(THEME.brand);
  flow.y = top + 5;
  const x = slot.x + stripe + pad;
  const absorbed = style(TYPE.small, 'regular', THEME.muted);
  if (titleShares(flow, occ, inner)) {
    const y = flow.y;
    const lhT = flow.lineHeight(TYPE.subheading);
    flow.linesAt(
      [occ.absorbedLine],
      absorbed,
      x,
      y + lhT - flow.lineHeight(TYPE.small) - 1,
      inner,
      'end',
    );
    flow.paragraph(occasionTitle(occ), style(TYPE.subheading, 'bold'), { x, width: inner });
  } else {
    flow.paragraph(occasionTitle(occ), style(TYPE.subheading, 'bold'), { x, width: inner });
    flow.paragraph(occ.absorbedLine, absorbed, { x, width: inner });
  }
  drawTable(
    flow,
    itemCols,
    occ.items.map((i) => [itemText(i), i.portion]),
    { x, width: inner, padPt: rowPadPt },
  );
  if (occ.binder) {
    flow.y += 5;
    const s = style(TYPE.body, occ.binder.units > 0 ? 'bold' : 'regular');
    if (occ.binder.units > 0) drawPill(flow, x, flow.y + 5);
    flow.paragraph(binderText(occ), s, { x: x + 26, width: inner - 26 });
  }
  flow.y = top + h + 6;
}

/** One day: heading, total, (several days: chart), meals, what the name marks mean. */
function drawDay(
  flow: PdfFlow,
  day: DayVm,
  oneDay: boolean,
  setContinued: (heading: string | null) => void,
): void {
  if (oneDay) {
    // The heading, the total and the first meal stay together.
    const first = day.occasions[0];
    const firstH = first
      ? occasionHeight(flow, first, ITEM_COLS, flow.width - 5 - 2 * 10, 1.5)
      : flow.lineHeight(TYPE.body) * 2;
    flow.y += 2;
    flow.ensure(flow.lineHeight(TYPE.heading) * 2 + flow.lineHeight(TYPE.body) * 2 + firstH);
  }
  heading(flow, day.label ? `${day.heading}: ${day.label}` : day.heading);
  flow.paragraph(day.totalLine, style(TYPE.body), { gapAfter: oneDay ? 4 : 8 });
  setContinued(day.continuedHeading);
  // Several days: the chart comes first so it stays with the day's heading. One day: no
  // chart, so the plan fits one sheet; each meal's absorbed amount and the day's total line
  // already give its figures.
  if (!oneDay) {
    drawAbsorbableChart(flow, day.chart);
    flow.y += 6;
  }
  // One day: table rows a little tighter (1.5 pt padding instead of 3); type size unchanged.
  for (const occ of day.occasions) drawOccasion(flow, occ, undefined, oneDay ? 1.5 : 3, oneDay);
  for (const note of day.nameNotes) {
    flow.paragraph(note, style(TYPE.small, 'regular', THEME.muted), { gapAfter: 2 });
  }
  setContinued(null);
}

/** "Foods to watch": E numbers with their label names, plain words, usual foods, this plan's. */
function drawFoodsToWatch(flow: PdfFlow, vm: HandoutViewModel, oneDay: boolean): void {
  const w = vm.foodsToWatch;
  const gap = oneDay ? 4 : 8;
  if (oneDay) flow.ensure(flow.lineHeight(TYPE.heading) * 4);
  heading(flow, w.heading);
  flow.paragraph(w.intro, style(TYPE.body), { gapAfter: gap });
  if (w.codes.length > 0) {
    const rows = w.codes.map((c) => [c.code, c.names.join(', ')]);
    const withNames = w.codes.some((c) => c.names.length > 0);
    if (withNames && oneDay) {
      // One sheet: the codes run on as one paragraph instead of a table row each.
      flow.paragraph(
        w.codes.map((c) => `${c.code} ${c.names.join(', ')}`).join('  \u00b7  '),
        style(TYPE.body),
        { gapAfter: 4 },
      );
    } else if (withNames) {
      drawTable(
        flow,
        [
          { share: 0.2, style: style(TYPE.body, 'bold') },
          { share: 0.8, style: style(TYPE.body) },
        ],
        rows,
        { zebra: true },
      );
    } else {
      flow.paragraph(w.codes.map((c) => c.code).join('   '), style(TYPE.body, 'bold'), {
        gapAfter: 4,
      });
    }
    flow.y += gap;
  }
  flow.paragraph(w.plainWords, style(TYPE.body, 'bold'), { gapAfter: gap });
  flow.paragraph(w.foods, style(TYPE.body), { gapAfter: gap });
  if (w.inPlan) flow.paragraph(w.inPlan, style(TYPE.body), { gapAfter: gap });
}

/**
 * Draws the handout: a cover page (who, when, binder, cautions), one page per day (meals,
 * binder per meal, chart) and a "foods to watch" page. Fonts are shared parsed objects, so a
 * document costs no font parsing after the first in the process.
 */
export async function renderHandoutPdf(
  vm: HandoutViewModel,
  paper: PaperSize,
): Promise<RenderedPdf> {
  const doc = createPdfDocument(paper, {
    title: `${vm.strings.title} - ${vm.header.patientLabel}`,
    language: vm.language,
    createdAt: new Date(`${vm.header.date}T00:00:00Z`),
  });
  // The heading a day's continuation page repeats (set while that day's meals are drawn).
  let continued: string | null = null;
  const flow = new PdfFlow(doc as unknown as FlowSurface, vm.script, vm.direction, {
    marginPt: MARGIN,
    headerPt: BAND - MARGIN + 16,
    footerPt: 36,
    onNewPage: (f) => {
      drawBand(f, vm);
      if (continued)
        f.paragraph(continued, style(TYPE.subheading, 'bold', THEME.brand), { gapAfter: 6 });
    },
  });
  // A one-day plan runs on after the cover and keeps "foods to watch" on the same sheet, so it
  // prints on two pages; longer plans give each day a page of its own.
  const oneDay = vm.days.length === 1;
  flow.newPage();
  if (oneDay) drawInfoCompact(flow, vm);
  else drawInfo(flow, vm);

  heading(flow, vm.binder.heading);
  for (const line of vm.binder.lines) flow.paragraph(line, style(TYPE.body), { gapAfter: 2 });
  flow.y += 10;
  drawCautionBox(flow, vm.cautions.heading, vm.cautions.lines);

  if (oneDay) {
    // One sheet: what to watch for stays on the cover, the day's meals follow it.
    flow.y += 4;
    drawFoodsToWatch(flow, vm, true);
    drawDay(flow, vm.days[0] as DayVm, true, (c) => (continued = c));
    if (vm.cooking) drawCooking(flow, vm.cooking, vm.cautions.heading);
  } else {
    for (const day of vm.days) {
      flow.newPage();
      drawDay(flow, day, false, (c) => (continued = c));
    }
    if (vm.cooking) drawCooking(flow, vm.cooking, vm.cautions.heading);
    flow.newPage();
    drawFoodsToWatch(flow, vm, false);
  }

  // Footers, now that the page count is known.
  const range = doc.bufferedPageRange();
  const pages = range.count;
  const pageLabel = new IntlMessageFormat(vm.pageLabel.pattern, vm.pageLabel.locale);
  for (let i = 0; i < pages; i++) {
    doc.switchToPage(range.start + i);
    const y = doc.page.height - MARGIN - 34;
    doc
      .lineWidth(0.75)
      .strokeColor(THEME.rule)
      .moveTo(MARGIN, y)
      .lineTo(doc.page.width - MARGIN, y)
      .stroke();
    const label = String(
      pageLabel.format({
        page: formatNumber(vm.locale, i + 1),
        pages: formatNumber(vm.locale, pages),
      }),
    );
    const s = style(TYPE.small, 'regular', THEME.muted);
    const labelW = flow.engine.widthOf(label, s) + 4;
    flow.linesAt([label], s, flow.width - labelW, y + 2, labelW, 'end');
    const notice = vm.review.notice ? `phosledger \u00b7 ${vm.review.notice}` : 'phosledger';
    const noticeW = flow.width - labelW - 12;
    flow.linesAt(flow.wrap(notice, s, noticeW).slice(0, 2), s, 0, y + 2, noticeW);
  }
  doc.flushPages();
  const bytes = await finishPdf(doc);
  return {
    bytes,
    pageCount: pages,
    missingCodePoints: [...flow.engine.missing].sort((a, b) => a - b),
    notdefRuns: flow.engine.notdefRuns,
  };
}
