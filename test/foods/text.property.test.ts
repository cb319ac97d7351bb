import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { foldText, nameWords, searchWords } from '../../src/foods/text.js';

// The fold the FTS5 unicode61 tokenizer applies with remove_diacritics 2 (SQLite FTS5
// documentation, "Unicode61 Tokenizer"): NFKD, marks removed, lower case. The fast paths for
// plain ASCII must give exactly what this general form gives.
const general = (t: string) =>
  t
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase()
    .match(/[\p{L}\p{N}]+/gu) ?? [];

describe('search words (fast ASCII path against the general Unicode fold)', () => {
  it('agree on any text, ASCII or not', () => {
    const ascii = fc.string({ unit: 'binary-ascii', maxLength: 60 });
    const mixed = fc.string({ unit: 'grapheme', maxLength: 30 });
    fc.assert(
      fc.property(fc.oneof(ascii, mixed), (t) => {
        expect(searchWords(t)).toEqual(general(t));
        expect(nameWords(t)).toEqual(general(t));
      }),
      { numRuns: 2000 },
    );
  });

  it('fold food names as the tokenizer does (invented examples)', () => {
    expect(foldText('Crème Fraîche')).toBe('creme fraiche');
    expect(searchWords('Cheese, CHEDDAR (sharp)')).toEqual(['cheese', 'cheddar', 'sharp']);
    expect(searchWords('Jalapeño-peppers ½ cup')).toEqual(['jalapeno', 'peppers', '1', '2', 'cup']);
  });
});
