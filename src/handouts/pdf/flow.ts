import type { ScriptFamily } from './fonts.js';
import { TextEngine, type TextStyle, type TextSurface } from './text.js';

/** The PDFKit calls the page flow uses besides text (PDFKit's document satisfies this). */
export interface FlowSurface extends TextSurface {
  addPage(options?: Record<string, unknown>): unknown;
  page: { width: number; height: number };
  save(): FlowSurface;
  restore(): FlowSurface;
  rect(x: number, y: number, w: number, h: number): FlowSurface;
  roundedRect(x: number, y: number, w: number, h: number, r: number): FlowSurface;
  moveTo(x: number, y: number): FlowSurface;
  lineTo(x: number, y: number): FlowSurface;
  closePath(): FlowSurface;
  circle(x: number, y: number, r: number): FlowSurface;
  lineWidth(w: number): FlowSurface;
  dash(length: number, options?: Record<string, unknown>): FlowSurface;
  undash(): FlowSurface;
  fill(color?: string): FlowSurface;
  stroke(color?: string): FlowSurface;
  fillAndStroke(fill?: string, stroke?: string): FlowSurface;
  strokeColor(color: string): FlowSurface;
}

export interface FlowOptions {
  marginPt: number;
  /** Space reserved at the top of every page for the running header. */
  headerPt: number;
  /** Space reserved at the bottom of every page for the footer. */
  footerPt: number;
  /** Draws the running header of a new page (called for every page, the first included). */
  onNewPage?: (flow: PdfFlow, pageIndex: number) => void;
}

/**
 * A top-to-bottom page flow in logical coordinates: `x` is measured from the start side (left in
 * left-to-right languages, right in right-to-left ones) and `phys()` mirrors it onto the page.
 */
export class PdfFlow {
  y = 0;
  pageIndex = -1;
  readonly engine: TextEngine;
  readonly left: number;
  readonly width: number;
  readonly top: number;
  readonly bottom: number;

  constructor(
    readonly doc: FlowSurface,
    readonly script: ScriptFamily,
    readonly direction: 'ltr' | 'rtl',
    readonly options: FlowOptions,
  ) {
    this.engine = new TextEngine(doc, script, direction);
    this.left = options.marginPt;
    this.width = doc.page.width - 2 * options.marginPt;
    this.top = options.marginPt + options.headerPt;
    this.bottom = doc.page.height - options.marginPt - options.footerPt;
  }

  /** Starts the first page (PDFKit opens it itself) or adds one. */
  newPage(): void {
    if (this.pageIndex >= 0) this.doc.addPage();
    this.pageIndex++;
    this.y = this.top;
    this.options.onNewPage?.(this, this.pageIndex);
  }

  /** Moves to a new page unless heightPt still fits on this one. */
  ensure(heightPt: number): void {
    if (this.y + heightPt > this.bottom && this.y > this.top) this.newPage();
  }

  /** The page x of a box that starts logicalX points from the start side and is w wide. */
  phys(logicalX: number, w = 0): number {
    return this.direction === 'ltr' ? this.left + logicalX : this.left + this.width - logicalX - w;
  }

  /** Line height for a size: scripts with tall stacks (Devanagari, Arabic) get more room. */
  lineHeight(sizePt: number): number {
    const factor = this.script === 'devanagari' || this.script === 'arabic' ? 1.5 : 1.36;
    return sizePt * factor;
  }

  /** Baseline offset from the top of a line box. */
  ascent(sizePt: number): number {
    return sizePt * (this.script === 'devanagari' || this.script === 'arabic' ? 1.1 : 1.02);
  }

  wrap(text: string, style: TextStyle, widthPt: number): string[] {
    return this.engine.wrap(text, style, widthPt);
  }

  /** Height of a wrapped paragraph. */
  measure(text: string, style: TextStyle, widthPt: number): number {
    return this.wrap(text, style, widthPt).length * this.lineHeight(style.sizePt);
  }

  /** Draws wrapped lines at (logical x, current y), breaking pages between lines if needed. */
  paragraph(
    text: string,
    style: TextStyle,
    opts: {
      x?: number;
      width?: number;
      align?: 'start' | 'end' | 'center';
      gapAfter?: number;
    } = {},
  ): void {
    const x = opts.x ?? 0;
    const width = opts.width ?? this.width - x;
    const lh = this.lineHeight(style.sizePt);
    for (const line of this.wrap(text, style, width)) {
      this.ensure(lh);
      this.engine.drawLine(
        line,
        this.phys(x, width),
        this.y + this.ascent(style.sizePt),
        width,
        style,
        opts.align,
      );
      this.y += lh;
    }
    this.y += opts.gapAfter ?? 0;
  }

  /** Draws already wrapped lines inside a box at a fixed position (no page breaks). */
  linesAt(
    lines: string[],
    style: TextStyle,
    logicalX: number,
    topY: number,
    width: number,
    align: 'start' | 'end' | 'center' = 'start',
  ): number {
    const lh = this.lineHeight(style.sizePt);
    lines.forEach((line, i) => {
      this.engine.drawLine(
        line,
        this.phys(logicalX, width),
        topY + i * lh + this.ascent(style.sizePt),
        width,
        style,
        align,
      );
    });
    return lines.length * lh;
  }
}
