import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import * as fontkit from 'fontkit';

const require = createRequire(import.meta.url);

/** The font families the PDFs use; every one is a full Noto TTF (SIL Open Font License). */
export const FONT_FAMILIES = ['sans', 'sc', 'arabic', 'devanagari'] as const;
export type FontFamily = (typeof FONT_FAMILIES)[number];
export type FontWeight = 'regular' | 'bold';

const FILES: Record<FontFamily, Record<FontWeight, string>> = {
  sans: {
    regular: '@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf',
    bold: '@expo-google-fonts/noto-sans/700Bold/NotoSans_700Bold.ttf',
  },
  sc: {
    regular: '@expo-google-fonts/noto-sans-sc/400Regular/NotoSansSC_400Regular.ttf',
    bold: '@expo-google-fonts/noto-sans-sc/700Bold/NotoSansSC_700Bold.ttf',
  },
  arabic: {
    regular: '@expo-google-fonts/noto-sans-arabic/400Regular/NotoSansArabic_400Regular.ttf',
    bold: '@expo-google-fonts/noto-sans-arabic/700Bold/NotoSansArabic_700Bold.ttf',
  },
  devanagari: {
    regular: '@expo-google-fonts/noto-sans-devanagari/400Regular/NotoSansDevanagari_400Regular.ttf',
    bold: '@expo-google-fonts/noto-sans-devanagari/700Bold/NotoSansDevanagari_700Bold.ttf',
  },
};

/** The TTF file of a family and weight (the HTML view serves the same files the PDF embeds). */
export function fontFile(family: FontFamily, weight: FontWeight): string {
  return require.resolve(FILES[family][weight]);
}

/** The part of a fontkit font the layout code needs (PDFKit accepts the object itself). */
export interface LoadedFont {
  readonly key: string;
  readonly family: FontFamily;
  readonly weight: FontWeight;
  /** The parsed font, handed to PDFKit's registerFont so no document parses it again. */
  readonly font: fontkit.Font;
  hasGlyph(codePoint: number): boolean;
}

const loaded = new Map<string, LoadedFont>();

const LAYOUT_CACHE_LIMIT = 50_000;

/**
 * fontkit builds a new shaping plan on every layout call (milliseconds per word for Devanagari),
 * and PDFKit lays out again for every document. This proxy remembers each string's glyph run for
 * the process. PDFKit scales the positions it gets in place, so every caller receives fresh
 * copies of the position records; the glyph objects themselves are shared, as fontkit shares them.
 */
function memoizeLayout(font: fontkit.Font): fontkit.Font {
  const cache = new Map<string, fontkit.GlyphRun>();
  const layout = (text: string, features?: unknown, ...rest: unknown[]) => {
    const key = `${JSON.stringify(features ?? null)}|${rest.join('|')}|${text}`;
    let run = cache.get(key);
    if (!run) {
      run = (font.layout as (...a: unknown[]) => fontkit.GlyphRun).call(
        font,
        text,
        features,
        ...rest,
      );
      if (cache.size >= LAYOUT_CACHE_LIMIT) cache.clear();
      cache.set(key, run);
    }
    return {
      ...run,
      glyphs: run.glyphs,
      positions: run.positions.map((p) => ({ ...p })),
      advanceWidth: run.advanceWidth,
    } as fontkit.GlyphRun;
  };
  return new Proxy(font, {
    get(target, prop, receiver) {
      if (prop === 'layout') return layout;
      const value = Reflect.get(target, prop, receiver);
      return typeof value === 'function' ? value.bind(target) : value;
    },
  });
}

/** The parsed font for a family and weight: read and parsed once per process, then reused. */
export function getFont(family: FontFamily, weight: FontWeight): LoadedFont {
  const key = `${family}-${weight}`;
  const cached = loaded.get(key);
  if (cached) return cached;
  const buffer = readFileSync(fontFile(family, weight));
  const font = memoizeLayout(fontkit.create(buffer) as fontkit.Font);
  const coverage = new Map<number, boolean>();
  const entry: LoadedFont = {
    key,
    family,
    weight,
    font,
    hasGlyph(cp) {
      let has = coverage.get(cp);
      if (has === undefined) {
        has = font.hasGlyphForCodePoint(cp);
        coverage.set(cp, has);
      }
      return has;
    },
  };
  loaded.set(key, entry);
  return entry;
}

/** Parses every font now (at start-up or in a benchmark warm-up) instead of on first use. */
export function preloadFonts(): void {
  for (const family of FONT_FAMILIES) {
    for (const weight of ['regular', 'bold'] as const) {
      // A first layout loads the shaping tables, which is most of the first-use cost.
      getFont(family, weight).font.layout('0', []);
    }
  }
}

/** Which family carries a script best; the first family of the chain is tried first. */
export type ScriptFamily = 'latin' | 'cyrillic' | 'han' | 'arabic' | 'devanagari';

export function fallbackChain(primary: ScriptFamily): FontFamily[] {
  switch (primary) {
    case 'han':
      return ['sc', 'sans', 'arabic', 'devanagari'];
    case 'arabic':
      return ['arabic', 'sans', 'sc', 'devanagari'];
    case 'devanagari':
      return ['devanagari', 'sans', 'sc', 'arabic'];
    default:
      return ['sans', 'sc', 'arabic', 'devanagari'];
  }
}

/**
 * The family that draws one code point: the first of the chain that has a glyph for it, or
 * null when no embedded font has one (the caller reports it instead of drawing a .notdef box).
 */
export function familyFor(cp: number, chain: readonly FontFamily[], weight: FontWeight) {
  for (const family of chain) {
    if (getFont(family, weight).hasGlyph(cp)) return family;
  }
  return null;
}
