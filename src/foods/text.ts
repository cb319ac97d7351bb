// eslint-disable-next-line no-control-regex -- the whole 7-bit range, control characters too
const ASCII = /^[\x00-\x7f]*$/;

/** Plain 7-bit text: no marks or compatibility forms, so lower-casing is the whole fold. */
export function isAscii(text: string): boolean {
  return ASCII.test(text);
}

/** Lower-cases and strips diacritics the way the FTS5 tokenizer does (remove_diacritics 2). */
export function foldText(text: string): string {
  // Plain ASCII has no marks and no compatibility forms: lower-casing is the whole fold.
  if (ASCII.test(text)) return text.toLowerCase();
  return text
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase();
}

/** Words of a text as the search sees them: runs of letters and digits, folded. */
export function searchWords(text: string): string[] {
  const folded = foldText(text);
  // In ASCII the letters and digits are exactly a-z and 0-9 once lower-cased.
  return (ASCII.test(folded) ? folded.match(/[a-z0-9]+/g) : folded.match(/[\p{L}\p{N}]+/gu)) ?? [];
}

/** An FTS5 prefix query for user input: every word quoted (so AND, NEAR, '-' are plain text). */
export function ftsPrefixQuery(words: readonly string[]): string {
  return words.map((w) => `"${w.replaceAll('"', '""')}"*`).join(' ');
}

/**
 * FTS5 expressions for the two candidate tiers of type-ahead: `first` = the main name starts with
 * the first word and every other word appears; `any` = every word appears in a name.
 */
export function ftsTierQueries(words: readonly string[]): { first: string; any: string } {
  const [head, ...rest] = words.map((w) => `"${w.replaceAll('"', '""')}"*`);
  const any = `{name alt_names} : (${words.map((w) => `"${w.replaceAll('"', '""')}"*`).join(' ')})`;
  const first =
    `name : ^ ${head ?? '""'}` + (rest.length ? ` AND {name alt_names} : (${rest.join(' ')})` : '');
  return { first, any };
}

/** Food names seen by the ranking; cleared when full (a bound, not a tuned size). */
const NAME_WORDS_MAX = 50_000;
const nameWordCache = new Map<string, readonly string[]>();

/** `searchWords` of a food name, remembered: the same names come back search after search. */
export function nameWords(name: string): readonly string[] {
  let words = nameWordCache.get(name);
  if (words === undefined) {
    if (nameWordCache.size >= NAME_WORDS_MAX) nameWordCache.clear();
    words = searchWords(name);
    nameWordCache.set(name, words);
  }
  return words;
}
