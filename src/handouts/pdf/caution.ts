import type { PdfFlow } from './flow.js';
import { THEME, TYPE } from './theme.js';

/**
 * A boxed list of cautions with a warning mark: pale red ground, dark red frame and heading,
 * body text in the ink colour. Kept on one page.
 */
export function drawCautionBox(flow: PdfFlow, heading: string, lines: readonly string[]): void {
  const pad = 12;
  const icon = 26;
  const innerW = flow.width - 2 * pad - icon - 10;
  const head = { sizePt: TYPE.subheading, weight: 'bold' as const, color: THEME.caution };
  const body = { sizePt: TYPE.body, weight: 'regular' as const, color: THEME.ink };
  const bullet = '\u2022 ';
  const wrapped = lines.map((l) => flow.wrap(l, body, innerW - 14));
  const headLines = flow.wrap(heading, head, innerW);
  const h =
    pad * 2 +
    headLines.length * flow.lineHeight(head.sizePt) +
    4 +
    wrapped.reduce((s, w) => s + w.length * flow.lineHeight(body.sizePt) + 4, 0);
  flow.ensure(h);
  const doc = flow.doc;
  const top = flow.y;
  doc.save();
  doc
    .lineWidth(2)
    .roundedRect(flow.left, top, flow.width, h, 8)
    .fillAndStroke(THEME.cautionPale, THEME.caution);
  doc.restore();
  // Warning triangle with an exclamation mark, drawn as paths.
  const ix = flow.phys(pad, icon);
  const iy = top + pad;
  doc
    .moveTo(ix + icon / 2, iy)
    .lineTo(ix + icon, iy + icon - 2)
    .lineTo(ix, iy + icon - 2)
    .closePath()
    .fill(THEME.caution);
  doc.rect(ix + icon / 2 - 1.5, iy + 8, 3, 9).fill(THEME.onBrand);
  doc.circle(ix + icon / 2, iy + icon - 6.5, 1.8).fill(THEME.onBrand);

  const x = pad + icon + 10;
  let y = top + pad;
  y += flow.linesAt(headLines, head, x, y, innerW) + 4;
  for (const w of wrapped) {
    flow.linesAt([bullet.trim()], body, x, y, 12);
    y += flow.linesAt(w, body, x + 14, y, innerW - 14) + 4;
  }
  flow.y = top + h + 12;
}
