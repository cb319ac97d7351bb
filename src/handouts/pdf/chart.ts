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
    absorbableText: string;
    totalText: string;
  };
  target: { mg: number; text: string } | null;
  legend: { absorbed: string; inFood: string; range: string };
}

const BAR_H = 12;
const ROW_H = 21;

/** Height the chart needs at the flow's width. */
export function chartHeight(flow: PdfFlow, data: AbsorbableChartData): number {
  const titleH = flow.measure(
    data.title,
    { sizePt: TYPE.body, weight: 'bold', color: THEME.ink },
    flow.width,
  );
  const targetH = data.target ? flow.lineHeight(TYPE.small) : 0;
  return (
    titleH + 6 + (data.rows.length + 1) * ROW_H + 8 + targetH + flow.lineHeight(TYPE.small) * 2 + 4
  );
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
    value(`${row.valueText} mg`, y, Math.max(row.absorbableMg.high, row.absorbableMg.typical));
  });

  const y = top + data.rows.length * ROW_H + 6;
  const bold: TextStyle = { ...small, weight: 'bold' };
  label(data.whole.label, y, bold);
  const totalW = scale(data.whole.totalMg);
  doc.rect(flow.phys(barX, totalW), y, totalW, BAR_H).fill(THEME.brandLight);
  const absW = scale(data.whole.absorbableMg.typical);
  doc.rect(flow.phys(barX, absW), y, absW, BAR_H).fill(THEME.brand);
  range(y, data.whole.absorbableMg.low, data.whole.absorbableMg.high);
  value(
    `${data.whole.absorbableText} / ${data.whole.totalText} mg`,
    y,
    Math.max(data.whole.totalMg, data.whole.absorbableMg.high),
    bold,
  );
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

  // Legend: swatches then words.
  const lh = flow.lineHeight(TYPE.small);
  const swatch = (color: string, dy: number) =>
    doc.rect(flow.phys(barX, 14), flow.y + dy + lh / 2 - 6, 14, 12).fill(color);
  swatch(THEME.brand, 0);
  swatch(THEME.brandLight, lh);
  const legend = `${data.legend.absorbed}\n${data.legend.inFood}`;
  flow.linesAt(legend.split('\n'), small, barX + 20, flow.y, barW + valueW - 20);
  flow.y += 2 * lh + 4;
}
