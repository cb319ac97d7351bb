import { drawCautionBox } from '../handouts/pdf/caution.js';
import { createPdfDocument, finishPdf } from '../handouts/pdf/document.js';
import { PdfFlow, type FlowSurface } from '../handouts/pdf/flow.js';
import { drawTable } from '../handouts/pdf/table.js';
import type { TextStyle } from '../handouts/pdf/text.js';
import { THEME } from '../handouts/pdf/theme.js';
import type { DiaryReportView } from './report-view.js';

const MARGIN = 32;
const style = (
  sizePt: number,
  weight: 'regular' | 'bold' = 'regular',
  color: string = THEME.ink,
): TextStyle => ({
  sizePt,
  weight,
  color,
});

/** The clinician PDF of a diary audit (A4 landscape-free portrait, small type: for the care team). */
export async function renderDiaryReportPdf(
  view: DiaryReportView,
  createdAt: Date,
): Promise<Buffer> {
  const doc = createPdfDocument('a4', { title: view.title, language: 'en', createdAt });
  const flow = new PdfFlow(doc as unknown as FlowSurface, 'latin', 'ltr', {
    marginPt: MARGIN,
    headerPt: 0,
    footerPt: 20,
  });
  flow.newPage();
  const h = (t: string, size = 14) => {
    flow.ensure(40);
    flow.y += 6;
    flow.paragraph(t, style(size, 'bold', THEME.brand), { gapAfter: 4 });
  };
  const p = (t: string, size = 10) => flow.paragraph(t, style(size), { gapAfter: 2 });
  h(view.title, 20);
  p(view.subtitle, 11);
  p(view.status, 11);
  flow.y += 6;
  drawCautionBox(flow, 'Read before use', view.cautions);
  for (const d of view.days) {
    h(d.heading, 13);
    for (const t of d.totals) p(t);
    for (const c of d.checks) p(c);
    if (d.contributors.length > 0) {
      p('Top contributors:', 10);
      for (const c of d.contributors) p(`  ${c}`, 9);
    }
    if (d.swaps.length > 0) {
      p('Swaps to consider:', 10);
      for (const s of d.swaps) p(`  ${s}`, 9);
    }
  }
  if (view.hidden.length > 0) {
    h('Hidden phosphate additives');
    for (const t of view.hidden) p(t, 9);
  }
  h('Entries');
  const shares = [0.06, 0.13, 0.22, 0.25, 0.08, 0.07, 0.1, 0.09];
  const cols = shares.map((share, i) => ({
    share,
    style: style(8, 'regular'),
    ...(i >= 4 ? { align: 'end' as const } : {}),
  }));
  drawTable(
    flow,
    cols.map((c) => ({ ...c, style: style(8, 'bold') })),
    [view.entryColumns],
  );
  drawTable(
    flow,
    cols,
    view.entries.map((e) => e.cells),
    { zebra: true, padPt: 3 },
  );
  if (view.review.length > 0) {
    h('Waiting for review (not in the totals)');
    for (const t of view.review) p(t, 9);
  }
  if (view.unmatched.length > 0) {
    h('Not matched (not in the totals)');
    for (const t of view.unmatched) p(t, 9);
  }
  if (view.skipped.length > 0) {
    h('Lines that could not be read');
    for (const t of view.skipped) p(t, 9);
  }
  return finishPdf(doc);
}
