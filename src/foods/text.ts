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
