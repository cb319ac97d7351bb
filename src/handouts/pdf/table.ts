import type { PdfFlow } from './flow.js';
import type { TextStyle } from './text.js';
import { THEME } from './theme.js';

export interface TableColumn {
  /** Share of the table width (the shares add up to 1). */
  share: number;
  align?: 'start' | 'end';
  style: TextStyle;
}

/**
 * Draws rows of wrapped cells in columns laid out from the start side, with a thin rule under
 * each row and zebra shading; a row never splits across pages.
 */
export function drawTable(
  flow: PdfFlow,
  columns: readonly TableColumn[],
  rows: readonly (readonly string[])[],
  opts: { x?: number; width?: number; padPt?: number; zebra?: boolean } = {},
): void {
  const x0 = opts.x ?? 0;
  const width = opts.width ?? flow.width - x0;
  const pad = opts.padPt ?? 4;
  const widths = columns.map((c) => c.share * width);
  rows.forEach((row, r) => {
    const cells = row.map((text, i) => {
      const col = columns[i] as TableColumn;
      return flow.wrap(text, col.style, (widths[i] as number) - 2 * pad);
    });
    const h =
      Math.max(
        ...cells.map(
          (lines, i) => lines.length * flow.lineHeight((columns[i] as TableColumn).style.sizePt),
        ),
      ) +
      2 * pad;
    flow.ensure(h);
    if (opts.zebra && r % 2 === 1) {
      flow.doc.rect(flow.phys(x0, width), flow.y, width, h).fill(THEME.brandPale);
    }
    let cx = x0;
    cells.forEach((lines, i) => {
      const col = columns[i] as TableColumn;
      const w = widths[i] as number;
      flow.linesAt(lines, col.style, cx + pad, flow.y + pad, w - 2 * pad, col.align ?? 'start');
      cx += w;
    });
    flow.doc
      .lineWidth(0.75)
      .strokeColor(THEME.rule)
      .moveTo(flow.phys(x0), flow.y + h)
      .lineTo(flow.phys(x0 + width), flow.y + h)
      .stroke();
    flow.y += h;
  });
}
