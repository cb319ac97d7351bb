// Sources: run order per the Unicode Bidirectional Algorithm (UAX #9); the Arabic, Latin and
// number strings are invented demo data.
import { describe, expect, it } from 'vitest';
import { TextEngine, type TextSurface } from '../../src/handouts/pdf/text.js';

/** A drawing surface that records what would be drawn (no PDF needed). */
function recorder() {
  const drawn: { text: string; x: number }[] = [];
  const surface: TextSurface = {
    registerFont: () => surface,
    font: () => surface,
    fontSize: () => surface,
    fillColor: () => surface,
    text: (text, x) => drawn.push({ text, x }),
  };
  return { surface, drawn };
}
const style = { sizePt: 13, weight: 'regular' as const, color: '#000' };

describe('TextEngine: fonts per code point and bidirectional runs (UAX #9)', () => {
  it('orders an Arabic line right to left, keeping numbers and Latin left to right', () => {
    const { surface } = recorder();
    const ar = new TextEngine(surface, 'arabic', 'rtl');
    // logical: "الفطور: ٨٠٠ ملغ (E 339)" = breakfast: 800 mg (E 339)
    const runs = ar.runs('الفطور: ٨٠٠ ملغ (E 339)', style);
    // Visual order, left to right: the closing bracket (drawn mirrored, as "("), the Latin run,
    // the Arabic run holding the opening bracket, the number, the first word.
    expect(runs.map((r) => r.logical)).toEqual([')', 'E 339', ' ملغ (', '٨٠٠', 'الفطور: ']);
    // Arabic runs are handed over in logical order (fontkit reverses them itself), brackets
    // mirrored; the Arabic-Indic number, which fontkit would also reverse, goes in pre-reversed.
    expect(runs.map((r) => r.text)).toEqual(['(', 'E 339', ' ملغ )', '٠٠٨', 'الفطور: ']);
    expect(runs.map((r) => r.rtl)).toEqual([true, false, true, false, true]);
    expect(ar.missing.size).toBe(0);
  });

  it('keeps a left-to-right line in one run per font', () => {
    const { surface } = recorder();
    const zh = new TextEngine(surface, 'han', 'ltr');
    const runs = zh.runs('早餐：约 180 毫克 (E 339)', style);
    expect(runs).toHaveLength(1);
    expect(runs[0]?.family).toBe('sc');
    const hi = new TextEngine(surface, 'devanagari', 'ltr');
    expect(hi.runs('नाश्ता: 78 मि.ग्रा.', style).map((r) => r.family)).toEqual(['devanagari']);
    expect(hi.notdefRuns).toBe(0);
  });

  it('wraps between ideographs and at spaces, never inside "E 339" (no-break space)', () => {
    const { surface } = recorder();
    const zh = new TextEngine(surface, 'han', 'ltr');
    const lines = zh.wrap('请在进餐的第一口时服用磷结合剂，不要自行更改剂量。', style, 100);
    expect(lines.length).toBeGreaterThan(1);
    expect(lines.join('')).toBe('请在进餐的第一口时服用磷结合剂，不要自行更改剂量。');
    expect(lines.every((l) => !l.startsWith('，') && !l.startsWith('。'))).toBe(true);
    const en = new TextEngine(surface, 'latin', 'ltr');
    const w = en.widthOf('look for E\u00a0339', style);
    const wrapped = en.wrap('look for E\u00a0339', style, w - 1);
    expect(wrapped).toEqual(['look for', 'E\u00a0339']);
  });

  it('records code points no embedded font has', () => {
    const { surface } = recorder();
    const en = new TextEngine(surface, 'latin', 'ltr');
    en.runs('แผน', style); // Thai: not in the embedded fonts
    expect([...en.missing].map((c) => c.toString(16))).toEqual(['e41', 'e1c', 'e19']);
  });

  it('draws right-aligned in RTL and left-aligned in LTR', () => {
    const rtl = recorder();
    const ar = new TextEngine(rtl.surface, 'arabic', 'rtl');
    const width = ar.drawLine('اليوم ١', 100, 50, 300, style);
    expect(rtl.drawn[0]!.x).toBeCloseTo(100 + 300 - width, 5);
    const ltr = recorder();
    new TextEngine(ltr.surface, 'latin', 'ltr').drawLine('Day 1', 100, 50, 300, style);
    expect(ltr.drawn[0]!.x).toBe(100);
  });
});
