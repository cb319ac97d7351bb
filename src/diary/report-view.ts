/**
 * The clinician report as plain strings (pure): shared by the HTML page and the PDF, so both
 * say the same thing. Amounts are rounded for reading; the JSON report keeps one decimal.
 */
import { withUserWording } from '../i18n/user-wording.js';
import type { DiaryReport } from './findings.js';

export interface DiaryReportView {
  title: string;
  subtitle: string;
  status: string;
  cautions: string[];
  days: {
    heading: string;
    totals: string[];
    checks: string[];
    contributors: string[];
    swaps: string[];
  }[];
  entryColumns: string[];
  entries: { cells: string[]; hidden: boolean; unmatched: boolean; findings: string[] }[];
  hidden: string[];
  /** Entries waiting for review, left out of the totals, with why. */
  review: string[];
  unmatched: string[];
  skipped: string[];
}

const n0 = (x: number | null | undefined) =>
  x === null || x === undefined ? '-' : Math.round(x).toLocaleString('en-US');

/**
 * Builds the report view; `generatedAt` is passed in (no clock here). Every line is in the
 * wording users read ("assumed (no published figure)", never "from memory").
 */
export function diaryReportView(
  report: DiaryReport,
  meta: { id: number; patientLabel: string | null; generatedAt: string },
): DiaryReportView {
  const readStatus =
    report.status === 'complete'
      ? 'Every line of the diary was read.'
      : `Incomplete: ${report.skipped.length} line(s) could not be read (listed at the end); totals leave them out.`;
  const waiting = report.review ?? [];
  const status =
    waiting.length === 0
      ? readStatus
      : `${readStatus} ${waiting.length} entr${waiting.length === 1 ? 'y waits' : 'ies wait'} for review and ${waiting.length === 1 ? 'is' : 'are'} not in the totals (listed under "Waiting for review").`;
  return withUserWording({
    title: `Diary audit ${meta.id}`,
    subtitle: `${meta.patientLabel ? `Patient: ${meta.patientLabel}` : 'Anonymous (no patient linked)'} - generated ${meta.generatedAt.slice(0, 10)}`,
    status,
    cautions: [
      report.caution,
      'Absorbable phosphorus is a range from assumed absorption fractions, not a measurement.',
      'Swaps are suggestions from the food tables for the dietitian to judge; they are not a prescription.',
      ...(report.cautions ?? []).map((c) => `${c.text} (${c.source})`),
    ],
    days: report.days.map((d) => {
      const n = d.nutrients;
      return {
        heading: d.date ?? d.label,
        totals: [
          `Phosphorus ${n0(n.phosphorusMg)} mg (absorbable ${n0(n.absorbablePhosphorusMg.low)}-${n0(n.absorbablePhosphorusMg.high)} mg, typical ${n0(n.absorbablePhosphorusMg.typical)} mg)`,
          `Additive phosphorus ${n0(n.additivePhosphorusMg)} mg; protein ${n0(n.proteinG)} g; potassium ${n0(n.potassiumMg)} mg; sodium ${n0(n.sodiumMg)} mg; energy ${n0(n.energyKcal)} kcal`,
          `${d.entryCount} entries, ${d.unmatchedCount} unmatched${d.reviewCount ? `, ${d.reviewCount} waiting for review (not counted)` : ''}`,
        ],
        checks: [
          ...d.status.checks.map((c) => c.message),
          ...d.status.messages.filter((m) => !d.status.checks.some((c) => c.message === m)),
        ],
        contributors: d.topContributors.map(
          (c) =>
            `${c.name}: ${n0(c.phosphorusMg)} mg (${Math.round(c.share * 100)}% of the day)${c.flags.additive ? ', additive' : ''}`,
        ),
        swaps: d.swaps.map(
          (s) =>
            `Instead of ${s.name}: ${s.swaps.map((x) => `${x.name} (${Math.round(x.shareOfOriginal * 100)}%)`).join('; ')}`,
        ),
      };
    }),
    entryColumns: [
      'Line',
      'Day',
      'Entry',
      'Food matched',
      'g',
      'P mg',
      'Absorbable mg',
      'Additive P mg',
    ],
    entries: report.entries.map((e) => ({
      cells: [
        String(e.line),
        `${e.day}${e.occasion ? ` ${e.occasion}` : ''}`,
        e.text,
        e.match ? `${e.match.name} (${Math.round(e.match.confidence * 100)}%)` : 'not matched',
        e.grams === null ? '-' : `${n0(e.grams)}${e.quantityAssumed ? ' (assumed)' : ''}`,
        n0(e.phosphorusMg),
        e.absorbablePhosphorusMg
          ? `${n0(e.absorbablePhosphorusMg.low)}-${n0(e.absorbablePhosphorusMg.high)}`
          : '-',
        e.additivePhosphorusMg === null
          ? '-'
          : `${n0(e.additivePhosphorusMg)}${e.hidden ? ' hidden' : ''}`,
      ],
      hidden: e.hidden,
      unmatched: e.match === null,
      findings: e.findings,
    })),
    hidden: report.entries
      .filter((e) => e.hidden)
      .map(
        (e) =>
          `Line ${e.line}: ${e.text} -> ${e.match?.name ?? ''}: ${e.findings.filter((f) => /additive|phosphate|E ?\d{3}|rule/i.test(f)).join(' ')}`,
      ),
    review: waiting.map(
      (r) =>
        `Line ${r.line}${r.part > 0 ? ` (food ${r.part + 1})` : ''}: ${r.text}: ${r.reasons.join('; ')}`,
    ),
    unmatched: report.entries
      .filter((e) => e.match === null)
      .map((e) => `Line ${e.line}: ${e.text}`),
    skipped: report.skipped.map((s) => `Line ${s.line}: ${s.message}`),
  });
}
