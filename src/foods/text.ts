/** Lower-cases and strips diacritics the way the FTS5 tokenizer does (remove_diacritics 2). */
export function foldText(text: string): string {
  return text
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase();
}

/** Words of a text as the search sees them: runs of letters and digits, folded. */
export function searchWords(text: string): string[] {
  return foldText(text).match(/[\p{L}\p{N}]+/gu) ?? [];
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
