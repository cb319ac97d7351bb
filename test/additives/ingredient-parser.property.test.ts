import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ADDITIVE_CATALOGUE } from '../../src/additives/catalogue.js';
import {
  analyzeIngredients,
  analyzeIngredientsStrict,
} from '../../src/additives/ingredient-parser.js';

// Pieces of real-looking label text (invented) for the generators.
const PIECES = [
  'E',
  'E ',
  'E-',
  'INS ',
  '339',
  '450',
  '452',
  '(ii)',
  'iii',
  ' i',
  '(',
  ')',
  '[',
  ']',
  ',',
  ';',
  ':',
  ' ',
  '\n',
  '-\n',
  'sodium',
  'phosphate',
  'phosphates',
  'fosfato',
  'de',
  'di',
  'sodio',
  'disódico',
  'acid',
  'phosphoric',
  'ácido',
  'fosfórico',
  'Natrium',
  'phosphat',
  'no added',
  'free',
  'phosphate-free',
  'mg',
  '120',
  '%',
  'and/or',
  'y',
  'et',
  'lecithin',
  'starch',
  'distarch',
  'guanylate',
  'I+G',
  'ß',
  'é',
  '\u00ad',
  '\u2011',
  '🥩',
  '\ud800',
  "'",
  '5',
  'riboflavin',
];

const labelish = fc.array(fc.constantFrom(...PIECES), { maxLength: 40 }).map((xs) => xs.join(''));
const anyText = fc.oneof(
  fc.string({ maxLength: 300 }),
  fc.string({ unit: 'grapheme', maxLength: 200 }),
  labelish,
);

describe('ingredient analyser properties (fast-check)', () => {
  it('never throws, and every span is inside the text and equals matchedText', () => {
    fc.assert(
      fc.property(
        anyText,
        fc.option(fc.constantFrom('en', 'es', 'fr', 'de', 'it', 'pt', 'xx', ''), {
          nil: undefined,
        }),
        (text, lang) => {
          const r = analyzeIngredientsStrict(text, lang);
          let lastStart = -1;
          for (const a of r.additives) {
            expect(a.start).toBeGreaterThanOrEqual(0);
            expect(a.end).toBeGreaterThan(a.start);
            expect(a.end).toBeLessThanOrEqual(text.length);
            expect(text.slice(a.start, a.end)).toBe(a.matchedText);
            expect(a.start).toBeGreaterThanOrEqual(lastStart);
            lastStart = a.start;
            expect(typeof a.counted).toBe('boolean');
          }
        },
      ),
      { numRuns: 3000 },
    );
  });

  it('is total over non-string input', () => {
    for (const x of [null, undefined, 42, {}, [], Symbol.iterator]) {
      expect(analyzeIngredients(x as unknown as string).additives).toEqual([]);
    }
  });

  const names = ADDITIVE_CATALOGUE.filter((e) => e.counted && e.level === 'substance').flatMap(
    (e) => e.labelNames.en.map((n) => ({ name: n, family: e.family })),
  );
  const filler = fc.array(
    fc.constantFrom('water', 'salt', 'sugar', 'wheat flour', 'spices', 'yeast', 'vinegar'),
    {
      maxLength: 6,
    },
  );

  it('finds a counted additive named anywhere in a list of ordinary ingredients', () => {
    fc.assert(
      fc.property(filler, fc.constantFrom(...names), filler, (before, item, after) => {
        const text = [...before, item.name, ...after].join(', ');
        const found = analyzeIngredientsStrict(text).additives;
        expect(found.some((a) => a.family === item.family && a.counted)).toBe(true);
      }),
      { numRuns: 500 },
    );
  });

  it('finds nothing once the same additive is negated ("no added ...")', () => {
    fc.assert(
      fc.property(filler, fc.constantFrom(...names), (before, item) => {
        const text = `${before.join(', ')}${before.length ? '. ' : ''}No added ${item.name}`;
        expect(analyzeIngredientsStrict(text).additives).toEqual([]);
      }),
      { numRuns: 300 },
    );
  });

  it('finds nothing in statements made only of ordinary ingredients', () => {
    fc.assert(
      fc.property(filler, (items) => {
        expect(analyzeIngredientsStrict(items.join(', ')).additives).toEqual([]);
      }),
    );
  });
});
