import { execFileSync } from 'node:child_process';
import { inflateSync } from 'node:zlib';
import bidiFactory from 'bidi-js';
import { describe, expect, it } from 'vitest';
import { ADDITIVE_CATALOGUE } from '../../src/additives/catalogue.js';
import { selectWatchAdditives } from '../../src/handouts/foods-to-watch.js';
import { renderHandoutPdf } from '../../src/handouts/handout-pdf.js';
import { TextEngine, type TextSurface } from '../../src/handouts/pdf/text.js';
import { buildHandoutViewModel, isolateInRtl } from '../../src/handouts/view-model.js';
import { loadCataloguesOrThrow } from '../../src/i18n/loader.js';
import { demoClinic, demoPatient, oneDaySummary } from './fixtures.js';
import { hasPoppler, POPPLER_MISSING } from './poppler.js';

const langs = loadCataloguesOrThrow();
const additives = selectWatchAdditives(ADDITIVE_CATALOGUE);
const bidi = bidiFactory();
const BIDI_CONTROLS = /[\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;
const squash = (s: string) => s.replace(BIDI_CONTROLS, '').replace(/\s+/g, ' ').trim();

// Under CI a missing poppler must fail, elsewhere the text checks skip with the reason.

async function render(lang: string, paper: 'a4' | 'letter' = 'a4') {
  // Invented demo data: one day of 4 occasions (4, 4, 1, 5 items).
  const built = buildHandoutViewModel(
    oneDaySummary(),
    demoPatient,
    demoClinic,
    lang,
    langs.bundle(lang),
    '2026-03-05',
    { additives },
  );
  if (!built.ok) throw new Error(`${lang} incomplete`);
  return { vm: built.value, pdf: await renderHandoutPdf(built.value, paper) };
}

/** The ActualText strings of a PDF's content streams (UTF-16BE with BOM, or PDFDocEncoding). */
function actualTexts(pdf: Buffer): string[] {
  const out: string[] = [];
  const raw = pdf.toString('latin1');
  const streams = /stream\r?\n([\s\S]*?)\r?\nendstream/g;
  for (let m = streams.exec(raw); m; m = streams.exec(raw)) {
    let content: string;
    try {
      content = inflateSync(Buffer.from(m[1] as string, 'latin1')).toString('latin1');
    } catch {
      continue;
    }
    const re = /\/ActualText \(((?:\\[\s\S]|[^\\)])*)\)/g;
    for (let a = re.exec(content); a; a = re.exec(content)) {
      const bytes: number[] = [];
      const s = a[1] as string;
      for (let i = 0; i < s.length; i++) {
        const c = s[i] as string;
        if (c !== '\\') {
          bytes.push(c.charCodeAt(0));
          continue;
        }
        const next = s[++i] as string;
        const octal = /^[0-7]{1,3}/.exec(s.slice(i));
        if (octal) {
          bytes.push(parseInt(octal[0], 8));
          i += octal[0].length - 1;
        } else
          bytes.push(
            ({ n: 10, r: 13, t: 9, b: 8, f: 12 } as Record<string, number>)[next] ??
              next.charCodeAt(0),
          );
      }
      const b = Buffer.from(bytes);
      out.push(
        b[0] === 0xfe && b[1] === 0xff
          ? b.subarray(2).swap16().toString('utf16le')
          : b.toString('latin1'),
      );
    }
  }
  return out;
}

/** The order a left-to-right reader sees a right-to-left paragraph in (UAX #9 rule L2). */
function displayOrder(text: string): string {
  const levels = bidi.getEmbeddingLevels(text, 'rtl');
  const chars = Array.from(text);
  const idx = chars.map((_, i) => i);
  for (const [start, end] of bidi.getReorderSegments(text, levels)) {
    const seg = idx.slice(start, end + 1).reverse();
    idx.splice(start, seg.length, ...seg);
  }
  return idx.map((i) => chars[i]).join('');
}

describe('handout text extraction (PDF 1.7 ActualText per line of a shaped script)', () => {
  it('Latin and Han lines carry no ActualText (their glyphs map back one to one)', async () => {
    for (const lang of ['es', 'zh-Hans']) {
      const { pdf } = await render(lang);
      expect(actualTexts(pdf.bytes), lang).toEqual([]);
    }
  });

  it.each(['ar', 'hi'])('%s: every drawn line carries its logical text, exactly', async (lang) => {
    const { vm, pdf } = await render(lang);
    const texts = actualTexts(pdf.bytes);
    expect(texts.length).toBeGreaterThan(40);
    // The title, the caution lines (one PDF line each or wrapped: compare joined) and the
    // binder heading, as the catalogue writes them.
    // Lines wrap between ideographs with no space, so the joined text is compared unspaced.
    const noSpace = (x: string) => x.replace(BIDI_CONTROLS, '').replace(/\s+/g, '');
    const joined = noSpace(texts.join(''));
    expect(texts).toContain(vm.strings.title);
    expect(texts).toContain(vm.binder.heading);
    for (const line of vm.cautions.lines) expect(joined).toContain(noSpace(line));
    for (const occ of vm.days[0]!.occasions) expect(joined).toContain(noSpace(occ.absorbedLine));
    // No bidi controls reach the text a screen reader gets.
    expect(texts.join('')).not.toMatch(BIDI_CONTROLS);
  });

  it.skipIf(!hasPoppler)(
    `pdftotext reads Hindi and Chinese back exactly, and Arabic letter for letter${hasPoppler ? '' : ` (${POPPLER_MISSING})`}`,
    async () => {
      for (const lang of ['hi', 'zh-Hans', 'ar']) {
        const { vm, pdf } = await render(lang);
        const text = execFileSync('pdftotext', ['-', '-'], { input: pdf.bytes, encoding: 'utf8' });
        const lines = text.split('\n').map(squash);
        if (lang === 'ar') {
          // pdftotext 22.12 prints right-to-left lines in display order (it takes the stored
          // order for visual order), so each line is compared with the logical text's display
          // order: every letter must be the one the catalogue wrote (without ActualText,
          // shared glyph shapes gave "الغذائتة" for "الغذائية").
          expect(lines).toContain(squash(displayOrder(vm.strings.title)));
          expect(lines).toContain(squash(displayOrder(vm.binder.heading)));
        } else {
          // Devanagari matras come back in logical order (without ActualText "िलए" for "लिए").
          expect(lines).toContain(squash(vm.strings.title));
          expect(lines).toContain(squash(vm.binder.heading));
          expect(squash(text)).toContain(squash(vm.cautions.lines[0] as string));
        }
      }
    },
  );

  it('a one-day plan (4 meals, 14 items) takes at most 3 pages; 2 on A4 in three languages', async () => {
    // Measured: A4 two pages for ar, hi, zh-Hans; the other languages' longer lines, the three
    // clinical caution lines and US Letter's shorter page need a third (was 4 before the
    // one-day layout).
    const twoPagesOnA4 = ['ar', 'hi', 'zh-Hans'];
    for (const lang of langs.list()) {
      for (const paper of ['a4', 'letter'] as const) {
        const { pdf } = await render(lang, paper);
        expect(pdf.pageCount, `${lang} ${paper}`).toBeLessThanOrEqual(3);
        if (paper === 'a4' && twoPagesOnA4.includes(lang)) expect(pdf.pageCount, lang).toBe(2);
      }
    }
  });
});

describe('bidi isolation of Latin names in right-to-left text (UAX #9 X5c)', () => {
  const surface = {} as TextSurface;
  const engine = new TextEngine(surface, 'arabic', 'rtl');
  const style = { sizePt: 12, weight: 'regular' as const };

  it('keeps a Latin name and its own punctuation together; the isolates are never drawn', () => {
    const name = 'Milk (2%)!';
    const plain = engine.runs(`اشرب ${name}.`, style);
    const isolated = engine.runs(`اشرب ${isolateInRtl(name, 'rtl')}.`, style);
    // Without isolation the "!" resolves right-to-left and leaves the name's run.
    expect(plain.some((r) => r.logical.includes(name))).toBe(false);
    expect(isolated.some((r) => r.logical === name && !r.rtl)).toBe(true);
    expect(isolated.map((r) => r.logical).join('')).not.toMatch(BIDI_CONTROLS);
    expect(engine.missing.size).toBe(0);
  });

  it('isolates only text with left-to-right letters, only in right-to-left handouts', () => {
    expect(isolateInRtl('Cola', 'rtl')).toBe('\u2068Cola\u2069');
    expect(isolateInRtl('كولا', 'rtl')).toBe('كولا');
    expect(isolateInRtl('Cola', 'ltr')).toBe('Cola');
  });
});
