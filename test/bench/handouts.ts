/**
 * Handouts: a 7-day plan handout (5 occasions x 6 items, invented demo data) rendered to PDF
 * after warm-up (fonts parsed once per process), per script, against a bare PDFKit page with
 * one line of text in the same process; and the size of a 3-day handout in every language.
 * Goals: < 300 ms per 7-day handout, < 1 MB per 3-day PDF.
 */
import os from 'node:os';
import PDFDocument from 'pdfkit';
import { ADDITIVE_CATALOGUE } from '../../src/additives/catalogue.js';
import { selectWatchAdditives } from '../../src/handouts/foods-to-watch.js';
import { renderHandoutPdf } from '../../src/handouts/handout-pdf.js';
import { finishPdf } from '../../src/handouts/pdf/document.js';
import { getFont, preloadFonts } from '../../src/handouts/pdf/fonts.js';
import { buildHandoutViewModel } from '../../src/handouts/view-model.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { demoClinic, demoPatient, demoSummary } from '../handouts/fixtures.js';
import type { BenchSection } from './sections.js';
import { fmt, percentile } from './stats.js';

/** Wall-clock ms per run, and CPU ms of this process per run (less hurt by a busy machine). */
async function time(
  runs: number,
  fn: () => Promise<unknown>,
  cpu: number[] = [],
): Promise<number[]> {
  const out: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    await fn();
    out.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return out;
}

export const handoutsBench: BenchSection = {
  name: 'handouts',
  title: '7-day handout PDF render after warm-up (< 300 ms); 3-day PDF size (< 1 MB)',
  async run() {
    const langs = loadCataloguesOrThrow();
    const additives = selectWatchAdditives(ADDITIVE_CATALOGUE);
    const t0 = performance.now();
    preloadFonts();
    console.log(`   font parse, once per process: ${fmt(performance.now() - t0)} ms`);

    const sans = getFont('sans', 'regular').font;
    const bare = () => {
      const doc = new PDFDocument({ size: 'A4', margin: 0 });
      doc.registerFont('s', sans as never);
      doc.font('s').fontSize(13).text('Phosphorus your body takes up today: about 741 mg', 40, 40);
      return finishPdf(doc);
    };
    await time(5, bare);
    const bareCpu: number[] = [];
    const base = percentile(await time(30, bare, bareCpu), 50);
    console.log(
      `   baseline, bare one-line PDFKit page: median ${fmt(base, 1)} ms, CPU ${fmt(percentile(bareCpu, 50), 1)} ms ` +
        `(load average ${os.loadavg()[0]?.toFixed(1)} on ${os.cpus().length} cores)`,
    );

    const week = demoSummary(7, 6, 5);
    for (const lang of ['es', 'ru', 'zh-Hans', 'ar', 'hi']) {
      const built = buildHandoutViewModel(
        week,
        demoPatient,
        demoClinic,
        lang,
        langs.bundle(lang),
        '2026-03-05',
        {
          additives,
        },
      );
      if (!built.ok) throw new Error(`${lang} catalogue incomplete`);
      let pages = 0;
      const render = async () => {
        const r = await renderHandoutPdf(built.value, 'a4');
        pages = r.pageCount;
      };
      await time(3, render); // warm-up: shaping caches fill
      const cpu: number[] = [];
      const ms = await time(15, render, cpu);
      const median = percentile(ms, 50);
      console.log(
        `   7-day ${lang.padEnd(7)} ${pages} pages: median ${fmt(median, 1)} ms, p95 ${fmt(percentile(ms, 95), 1)} ms, ` +
          `CPU median ${fmt(percentile(cpu, 50), 1)} ms (${fmt(median / base, 1)}x baseline) ` +
          `${median < 300 ? 'meets' : 'MISSES'} < 300 ms`,
      );
    }

    const three = demoSummary(3);
    let largest = { lang: '', bytes: 0 };
    for (const lang of langs.list()) {
      const built = buildHandoutViewModel(
        three,
        demoPatient,
        demoClinic,
        lang,
        langs.bundle(lang),
        '2026-03-05',
        {
          additives,
        },
      );
      if (!built.ok) continue;
      for (const paper of ['a4', 'letter'] as const) {
        const r = await renderHandoutPdf(built.value, paper);
        if (r.bytes.length > largest.bytes)
          largest = { lang: `${lang}/${paper}`, bytes: r.bytes.length };
      }
    }
    console.log(
      `   3-day PDF, largest of ${langs.list().length} languages x 2 papers: ${fmt(largest.bytes / 1024, 1)} KiB (${largest.lang}) ` +
        `${largest.bytes < 1024 * 1024 ? 'meets' : 'MISSES'} < 1 MB`,
    );
  },
};
