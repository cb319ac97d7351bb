import bidiFactory from 'bidi-js';
import {
  familyFor,
  fallbackChain,
  getFont,
  type FontFamily,
  type FontWeight,
  type ScriptFamily,
} from './fonts.js';

const bidi = bidiFactory();

/** How a piece of text looks: size in points, weight, fill colour. */
export interface TextStyle {
  sizePt: number;
  weight: FontWeight;
  color: string;
}

/** One stretch of a line drawn with one font in one direction, in visual (left to right) order. */
export interface VisualRun {
  /** The string handed to PDFKit (already arranged so fontkit's own reversal ends up right). */
  text: string;
  /** The run's characters in logical order (for coverage checks and tests). */
  logical: string;
  family: FontFamily;
  rtl: boolean;
  widthPt: number;
}

/** The minimal drawing surface the engine needs (PDFKit's document satisfies it). */
export interface TextSurface {
  registerFont(name: string, src: any): unknown;
  font(name: string): TextSurface;
  fontSize(size: number): TextSurface;
  fillColor(color: string): TextSurface;
  text(text: string, x: number, y: number, options: Record<string, unknown>): unknown;
  /** Marked content (PDFKit's markContent): a Span carrying the line's ActualText. */
  markContent?(tag: string, options?: Record<string, unknown>): unknown;
  endMarkedContent?(): unknown;
  /** PDFKit's internal one-line drawing step, used when present (see drawLine). */
  _fragment?(text: string, x: number, y: number, options: Record<string, unknown>): unknown;
}

const RTL_SCRIPT = /[\p{Script=Arabic}\p{Script=Hebrew}]/u;
/** Scripts whose glyphs do not map back to the text one to one (joining, reordering, conjuncts). */
const SHAPED_SCRIPT =
  /[\p{Script=Arabic}\p{Script=Hebrew}\p{Script=Syriac}\p{Script=Thaana}\p{Script=Devanagari}\p{Script=Bengali}\p{Script=Gurmukhi}\p{Script=Gujarati}\p{Script=Oriya}\p{Script=Tamil}\p{Script=Telugu}\p{Script=Kannada}\p{Script=Malayalam}\p{Script=Sinhala}\p{Script=Thai}\p{Script=Khmer}\p{Script=Myanmar}]/u;
/** Directional marks and isolates (UAX #9): they steer the bidi levels and are never drawn. */
const BIDI_CONTROL = /[\u200e\u200f\u202a-\u202e\u2066-\u2069]/u;
const BIDI_CONTROLS = /[\u200e\u200f\u202a-\u202e\u2066-\u2069]/gu;

/** The text a reader should get back from a drawn line: logical order, no bidi controls. */
export function actualTextOf(line: string): string {
  return line.replace(BIDI_CONTROLS, '');
}
const STRONG_RTL = /[\u0590-\u08ff\ufb1d-\ufdff\ufe70-\ufefc]/u;
/** Break opportunities: between any two ideographs, and at spaces elsewhere. */
const TOKEN =
  /[ \t\u3000]+|[\p{Script=Han}\p{Script=Hiragana}\p{Script=Katakana}][\u3001-\u303f\uff00-\uffef]*|[^ \t\u3000\p{Script=Han}\p{Script=Hiragana}\p{Script=Katakana}]+/gu;

const widthCache = new Map<string, { advance: number; notdef: boolean }>();
const measureCache = new Map<
  string,
  { runs: VisualRun[]; widthPerPt: number; missing: number[]; notdefRuns: number }
>();

/** Advance width in font units per em (1 pt at size 1) and whether any glyph is .notdef. */
function shapeWidth(family: FontFamily, weight: FontWeight, text: string) {
  const key = `${family}-${weight}|${text}`;
  let hit = widthCache.get(key);
  if (!hit) {
    const f = getFont(family, weight).font;
    const run = f.layout(text, []);
    let advance = 0;
    let notdef = false;
    for (const p of run.positions) advance += p.xAdvance;
    for (const g of run.glyphs) if (g.id === 0) notdef = true;
    hit = { advance: advance / f.unitsPerEm, notdef };
    if (widthCache.size > 200_000) widthCache.clear();
    widthCache.set(key, hit);
  }
  return hit;
}

function mirrorAll(text: string): string {
  return Array.from(text, (c) => bidi.getMirroredCharacter(c) ?? c).join('');
}

function reverseCodePoints(text: string, mirror: boolean): string {
  const cps = Array.from(text).reverse();
  return cps.map((c) => (mirror ? (bidi.getMirroredCharacter(c) ?? c) : c)).join('');
}

/**
 * Lays out and draws text in any of the product's scripts: picks a font per code point from a
 * fallback chain, reorders right-to-left lines with the Unicode bidirectional algorithm, and
 * records code points that no embedded font can draw (so a handout never shows tofu boxes).
 */
export class TextEngine {
  /** Code points that no embedded font covers, and runs that shaped to a .notdef glyph. */
  readonly missing = new Set<number>();
  notdefRuns = 0;
  private readonly registered = new Set<string>();
  private readonly chain: FontFamily[];

  constructor(
    private readonly surface: TextSurface,
    readonly script: ScriptFamily,
    readonly direction: 'ltr' | 'rtl',
  ) {
    this.chain = fallbackChain(script);
  }

  /** Width in points of a single-line string. */
  widthOf(text: string, style: Pick<TextStyle, 'sizePt' | 'weight'>): number {
    return this.cachedRuns(text, style.weight).widthPerPt * style.sizePt;
  }

  /**
   * The visual runs of a string at 1 pt, remembered for the process: widths scale with the
   * size, and the same strings (labels, measures, headings) recur on every page and handout.
   */
  private cachedRuns(text: string, weight: FontWeight) {
    const key = `${this.script}|${this.direction}|${weight}|${text}`;
    let hit = measureCache.get(key);
    if (!hit) {
      const before = new Set(this.missing);
      const notdef = this.notdefRuns;
      const runs = this.runs(text, { sizePt: 1, weight });
      hit = {
        runs,
        widthPerPt: runs.reduce((s, r) => s + r.widthPt, 0),
        missing: [...this.missing].filter((c) => !before.has(c)),
        notdefRuns: this.notdefRuns - notdef,
      };
      if (measureCache.size > 200_000) measureCache.clear();
      measureCache.set(key, hit);
    } else {
      for (const c of hit.missing) this.missing.add(c);
      this.notdefRuns += hit.notdefRuns;
    }
    return hit;
  }

  /** Splits a paragraph into lines no wider than maxWidthPt (logical order). */
  wrap(text: string, style: Pick<TextStyle, 'sizePt' | 'weight'>, maxWidthPt: number): string[] {
    const out: string[] = [];
    for (const para of text.split('\n')) {
      const tokens = para.match(TOKEN) ?? [];
      let line = '';
      let lineWidth = 0;
      for (const token of tokens) {
        const isSpace = /^[ \t\u3000]+$/u.test(token);
        if (isSpace && line === '') continue;
        const w = this.widthOf(token, style);
        if (lineWidth + w <= maxWidthPt || line === '') {
          if (!isSpace && line === '' && w > maxWidthPt) {
            // A single word wider than the box: break it between characters.
            let piece = '';
            for (const ch of Array.from(token)) {
              if (piece && this.widthOf(piece + ch, style) > maxWidthPt) {
                out.push(piece);
                piece = '';
              }
              piece += ch;
            }
            line = piece;
            lineWidth = this.widthOf(piece, style);
            continue;
          }
          line += token;
          lineWidth += w;
        } else if (isSpace) {
          continue;
        } else {
          out.push(line.trimEnd());
          line = token;
          lineWidth = w;
        }
      }
      out.push(line.trimEnd());
    }
    return out;
  }

  /** The visual runs of one line: font per code point, bidi levels, runs reordered (UAX #9 L2). */
  runs(line: string, style: Pick<TextStyle, 'sizePt' | 'weight'>): VisualRun[] {
    const needsBidi = this.direction === 'rtl' || STRONG_RTL.test(line);
    const levels = needsBidi ? bidi.getEmbeddingLevels(line, this.direction).levels : null;
    type Logical = { text: string; family: FontFamily; level: number };
    const logical: Logical[] = [];
    let index = 0;
    for (const ch of line) {
      const cp = ch.codePointAt(0) as number;
      const level = levels ? (levels[index] ?? 0) : 0;
      index += ch.length;
      if (BIDI_CONTROL.test(ch)) continue;
      const prev = logical[logical.length - 1];
      let family: FontFamily | null;
      if (prev && prev.level === level && getFont(prev.family, style.weight).hasGlyph(cp)) {
        // Spaces and punctuation stay with the run they sit in when its font has them.
        const own = familyFor(cp, this.chain, style.weight);
        family = own === prev.family || /[\s\p{P}\p{N}]/u.test(ch) ? prev.family : own;
      } else {
        family = familyFor(cp, this.chain, style.weight);
      }
      if (family === null) {
        this.missing.add(cp);
        family = this.chain[0] as FontFamily;
      }
      if (prev && prev.level === level && prev.family === family) prev.text += ch;
      else logical.push({ text: ch, family, level });
    }
    // UAX #9 rule L2 over whole runs: reverse every maximal sequence at level >= k, for k from
    // the highest level down to the lowest odd level.
    const order = logical.map((_, i) => i);
    const maxLevel = Math.max(0, ...logical.map((r) => r.level));
    const odd = logical.map((r) => r.level).filter((l) => l % 2 === 1);
    const minOdd = odd.length ? Math.min(...odd) : maxLevel + 1;
    for (let k = maxLevel; k >= minOdd; k--) {
      let i = 0;
      while (i < order.length) {
        if ((logical[order[i] as number] as Logical).level >= k) {
          let j = i;
          while (j + 1 < order.length && (logical[order[j + 1] as number] as Logical).level >= k)
            j++;
          const seq = order.slice(i, j + 1).reverse();
          order.splice(i, seq.length, ...seq);
          i = j + 1;
        } else i++;
      }
    }
    return order.map((i) => {
      const r = logical[i] as Logical;
      const rtl = r.level % 2 === 1;
      // fontkit reverses any run whose script is right-to-left; arrange the string so that the
      // glyphs end up in the direction the bidi algorithm resolved.
      const fontkitReverses = RTL_SCRIPT.test(r.text);
      // fontkit does not mirror brackets itself, so a right-to-left run gets mirrored glyphs.
      const text =
        rtl === fontkitReverses
          ? rtl
            ? mirrorAll(r.text)
            : r.text
          : reverseCodePoints(r.text, rtl);
      const shaped = shapeWidth(r.family, style.weight, text);
      if (shaped.notdef) this.notdefRuns++;
      return {
        text,
        logical: r.text,
        family: r.family,
        rtl,
        widthPt: shaped.advance * style.sizePt,
      };
    });
  }

  /**
   * Draws one line with its alphabetic baseline at baselineY. align 'start' follows the
   * engine's direction (left for LTR, right for RTL). Returns the drawn width in points.
   */
  drawLine(
    line: string,
    x: number,
    baselineY: number,
    widthPt: number,
    style: TextStyle,
    align: 'start' | 'end' | 'center' = 'start',
  ): number {
    const cached = this.cachedRuns(line, style.weight);
    const runs = cached.runs.map((r) => ({ ...r, widthPt: r.widthPt * style.sizePt }));
    const total = cached.widthPerPt * style.sizePt;
    const startIsLeft = this.direction === 'ltr';
    let cx: number;
    if (align === 'center') cx = x + (widthPt - total) / 2;
    else if ((align === 'start') === startIsLeft) cx = x;
    else cx = x + widthPt - total;
    // Shaped glyphs (Arabic joining forms, Devanagari reordering, reversed runs) do not map
    // back to the text through the font's ToUnicode map alone: the line's logical text goes
    // along as the span's ActualText (PDF 1.7, 14.9.4), which text extraction and screen
    // readers use instead of the glyphs.
    const actual = actualTextOf(line);
    // Only shaped scripts need it: Latin, Cyrillic and Han glyphs map back one to one, and
    // poppler orders spans by their width, which reorders wrapped Latin lines.
    const marked = this.surface.markContent !== undefined && SHAPED_SCRIPT.test(actual);
    if (marked) this.surface.markContent?.('Span', { actual });
    for (const r of runs) {
      this.drawRun(r.text, r.family, cx, baselineY, style, r.widthPt);
      cx += r.widthPt;
    }
    if (marked) this.surface.endMarkedContent?.();
    return total;
  }

  private drawRun(
    text: string,
    family: FontFamily,
    x: number,
    baselineY: number,
    style: TextStyle,
    widthPt: number,
  ): void {
    const key = this.use(family, style.weight);
    const surface = this.surface.font(key).fontSize(style.sizePt).fillColor(style.color);
    if (surface._fragment) {
      // PDFKit's text() re-measures every string and runs its line wrapper; the line is already
      // laid out, so the single-fragment step is called with the width we measured (about a
      // third of the cost per run). Pinned to pdfkit 0.20.x; text() is the fallback.
      surface._fragment(text, x, baselineY, {
        features: [],
        baseline: 'alphabetic',
        textWidth: widthPt,
        wordCount: 1,
      });
    } else {
      surface.text(text, x, baselineY, { lineBreak: false, features: [], baseline: 'alphabetic' });
    }
  }

  private use(family: FontFamily, weight: FontWeight): string {
    const key = `${family}-${weight}`;
    if (!this.registered.has(key)) {
      this.surface.registerFont(key, getFont(family, weight).font);
      this.registered.add(key);
    }
    return key;
  }
}
