import { describe, expect, it } from 'vitest';
import { editDistance, SpellingIndex } from '../../src/foods/spelling.js';

// Invented vocabulary with invented document counts (invented demo data): "white" is carried by
// more foods than "wine", as in a food table.
const index = new SpellingIndex([
  { term: 'white', docs: 120 },
  { term: 'wine', docs: 8 },
  { term: 'with', docs: 900 },
  { term: 'bread', docs: 60 },
  { term: 'cheese', docs: 97 },
  { term: 'process', docs: 20 },
  { term: 'processed', docs: 3 },
  { term: 'chestnuts', docs: 6 },
]);

describe("spelling tolerance over the tables' own vocabulary", () => {
  it('edit distance counts a swap of two neighbours as one edit', () => {
    expect(editDistance('wite', 'white', 2)).toBe(1); // one letter left out
    expect(editDistance('chese', 'cheese', 2)).toBe(1);
    expect(editDistance('cheees', 'cheese', 2)).toBe(1); // e and s swapped
    expect(editDistance('bread', 'bread', 2)).toBe(0);
    expect(editDistance('apple', 'banana', 2)).toBe(3); // stops once over the bound
  });

  it('reads an unknown word as the nearest word, the commoner one on a tie', () => {
    // "wite": "white" (1 edit, 120 foods) and "wine" (1 edit, 8 foods); "with" is a function word
    expect(index.correct('wite')).toEqual({ from: 'wite', to: 'white', distance: 1 });
    expect(index.correct('chese')?.to).toBe('cheese');
    expect(index.correct('procesed')?.to).toBe('processed');
  });

  it('leaves known words, prefixes being typed, short words and numbers alone', () => {
    expect(index.correct('white')).toBeNull();
    expect(index.correct('whi')).toBeNull(); // a prefix of "white"
    expect(index.correct('ches')).toBeNull(); // a prefix of "cheese" and "chestnuts"
    expect(index.correct('xyz')).toBeNull(); // under 4 letters
    expect(index.correct('2000')).toBeNull();
    expect(index.correct('zzzzzz')).toBeNull(); // nothing near
  });

  it('corrects every unknown word of a query and says what it changed', () => {
    expect(index.correctWords(['wite', 'bread'])).toEqual({
      words: ['white', 'bread'],
      corrections: [{ from: 'wite', to: 'white', distance: 1 }],
    });
  });
});
