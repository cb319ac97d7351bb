import type { PdfFlow } from './flow.js';
import type { TextStyle } from './text.js';
import { THEME, TYPE } from './theme.js';

/** What the absorbable-phosphorus chart draws; all amounts in mg of phosphorus. */
export interface AbsorbableChartData {
  title: string;
  rows: {
    label: string;
    absorbableMg: { low: number; typical: number; high: number };
    valueText: string;
  }[];
  whole: {
    label: string;
    absorbableMg: { low: number; typical: number; high: number };
    totalMg: number;
    /** e.g. "306 of 510 mg": absorbable of total, in the reader's language. */
    valueText: string;
  };
  target: { mg: number; text: string } | null;
  legend: { absorbed: string; inFood: string; range: string };
}

const BAR_H = 12;
const ROW_H = 19;

function legendHeight(flow: PdfFlow, data: AbsorbableChartData): number {
  const small: TextStyle = { sizePt: TYPE.small, weight: 'regular', color: THEME.ink };
  const items = [data.legend.absorbed, data.legend.inFood, data.legend.range];
  const w = items.reduce((s, t) => s + 34 + flow.engine.widthOf(t, small), 0);
  return (w <= flow.width ? 1 : 3) * flow.lineHeight(TYPE.small);
}

/** Height the chart needs at the flow's width. */
export function chartHeight(flow: PdfFlow, data: AbsorbableChartData): number {
  const titleH = flow.measure(
    data.title,
    { sizePt: TYPE.body, weight: 'bold', color: THEME.ink },
    flow.width,
  );
  const targetH = data.target ? flow.lineHeight(TYPE.small) : 0;
  return titleH + 6 + (data.rows.length + 1) * ROW_H + 8 + targetH + legendHeight(flow, data) + 4;
}

/**
 * Draws a horizontal bar chart as vector paths: one bar per eating occasion (absorbable
 * phosphorus, typical value, with a low-high range line), then the whole day (phosphorus in the
 * food, light, with the absorbable part dark) against a dashed target line. Mirrored for
 * right-to-left languages so bars grow from the start side.
 */
export function drawAbsorbableChart(flow: PdfFlow, data: AbsorbableChartData): void {
  flow.ensure(chartHeight(flow, data));
  const doc = flow.doc;
  const small: TextStyle = { sizePt: TYPE.small, weight: 'regular', color: THEME.ink };
  flow.paragraph(
    data.title,
    { sizePt: TYPE.body, weight: 'bold', color: THEME.ink },
    { gapAfter: 6 },
  );

  const labelW = Math.min(150, flow.width * 0.3);
  const valueW = 110;
  const barX = labelW + 8;
  const barW = flow.width - barX - valueW;
  const maxMg =
    Math.max(
      1,
      data.whole.totalMg,
      data.whole.absorbableMg.high,
      data.target?.mg ?? 0,
      ...data.rows.map((r) => r.absorbableMg.high),
    ) * 1.05;
  const scale = (v: number) => (Math.max(0, v) / maxMg) * barW;
  const top = flow.y;

  // Axis line at the start of the bars.
  doc.lineWidth(1).strokeColor(THEME.rule);
  const axisX = flow.phys(barX);
  doc
    .moveTo(axisX, top)
    .lineTo(axisX, top + (data.rows.length + 1) * ROW_H)
    .stroke();

  const range = (y: number, low: number, high: number) => {
    const x1 = flow.phys(barX + scale(low));
    const x2 = flow.phys(barX + scale(high));
    const cy = y + BAR_H / 2;
    doc.lineWidth(1.5).strokeColor(THEME.ink);
    doc.moveTo(x1, cy).lineTo(x2, cy).stroke();
    doc
      .moveTo(x1, cy - 5)
      .lineTo(x1, cy + 5)
      .stroke();
    doc
      .moveTo(x2, cy - 5)
      .lineTo(x2, cy + 5)
      .stroke();
  };
  const label = (text: string, y: number, style = small) => {
    const fitted = flow.engine.wrap(text, style, labelW)[0] ?? '';
    flow.linesAt([fitted], style, 0, y - 2, labelW, 'start');
  };
  const value = (text: string, y: number, afterMg: number, style = small) => {
    flow.linesAt(
      [text],
      style,
      barX + scale(afterMg) + 8,
      y - 2,
      valueW + barW - scale(afterMg) - 8,
      'start',
    );
  };

  data.rows.forEach((row, i) => {
    const y = top + i * ROW_H + 4;
    label(row.label, y);
    const w = scale(row.absorbableMg.typical);
    doc.rect(flow.phys(barX, w), y, w, BAR_H).fill(THEME.brand);
    range(y, row.absorbableMg.low, row.absorbableMg.high);
    value(row.valueText, y, Math.max(row.absorbableMg.high, row.absorbableMg.typical));
  });

  const y = top + data.rows.length * ROW_H + 6;
  const bold: TextStyle = { ...small, weight: 'bold' };
  label(data.whole.label, y, bold);
  const totalW = scale(data.whole.totalMg);
  doc.rect(flow.phys(barX, totalW), y, totalW, BAR_H).fill(THEME.brandLight);
  const absW = scale(data.whole.absorbableMg.typical);
  doc.rect(flow.phys(barX, absW), y, absW, BAR_H).fill(THEME.brand);
  range(y, data.whole.absorbableMg.low, data.whole.absorbableMg.high);
  value(data.whole.valueText, y, Math.max(data.whole.totalMg, data.whole.absorbableMg.high), bold);
  flow.y = top + (data.rows.length + 1) * ROW_H + 8;

  if (data.target) {
    const tx = flow.phys(barX + scale(data.target.mg));
    doc.save().lineWidth(2).strokeColor(THEME.target).dash(4, { space: 3 });
    doc.moveTo(tx, top).lineTo(tx, flow.y).stroke();
    doc.undash().restore();
    flow.paragraph(
      data.target.text,
      { ...small, color: THEME.target, weight: 'bold' },
      { x: barX },
    );
  }

  // Legend in one row when it fits (swatch or range mark, then its words), else one per line.
  const lh = flow.lineHeight(TYPE.small);
  const items = [data.legend.absorbed, data.legend.inFood, data.legend.range];
  const widths = items.map((t) => 20 + flow.engine.widthOf(t, small) + 14);
  const oneRow = widths.reduce((a, b) => a + b, 0) <= flow.width;
  let lx = 0;
  let ly = flow.y;
  items.forEach((text, i) => {
    const mid = ly + lh / 2;
    if (i < 2) {
      doc.rect(flow.phys(lx, 14), mid - 6, 14, 12).fill(i === 0 ? THEME.brand : THEME.brandLight);
    } else {
      doc.lineWidth(1.5).strokeColor(THEME.ink);
      doc
        .moveTo(flow.phys(lx), mid)
        .lineTo(flow.phys(lx + 14), mid)
        .stroke();
      doc
        .moveTo(flow.phys(lx), mid - 4)
        .lineTo(flow.phys(lx), mid + 4)
        .stroke();
      doc
        .moveTo(flow.phys(lx + 14), mid - 4)
        .lineTo(flow.phys(lx + 14), mid + 4)
        .stroke();
    }
    flow.linesAt([text], small, lx + 20, ly, (widths[i] as number) - 20);
    if (oneRow) lx += widths[i] as number;
    else ly += lh;
  });
  flow.y = (oneRow ? ly + lh : ly) + 4;
}
