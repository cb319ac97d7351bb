/**
 * What users read for a figure with no published source. Reference tables say "from memory"
 * for the developers; screens, API answers and printouts say this instead.
 */
export const ASSUMED_WORDING = 'assumed (no published figure)';

const BRACKETED = /\s*[([](?:([^()[\]]*?)[;,]\s*)?from memory(?:,\s*no source)?[)\]]/gi;
const BARE = /\bfrom memory(?:,\s*no source)?/gi;

/** One text with "from memory" wording turned into the wording users see. Pure. */
export function userWording(text: string): string {
  if (!/from memory/i.test(text)) return text;
  return text
    .replace(BRACKETED, (_m, before: string | undefined) =>
      before && before.trim() ? ` (${before.trim()}; ${ASSUMED_WORDING})` : ` [${ASSUMED_WORDING}]`,
    )
    .replace(BARE, ASSUMED_WORDING);
}

/**
 * A JSON-like value with every string passed through `userWording`. Returns the same object
 * when nothing needed changing (no copy on the common path). Pure.
 */
export function withUserWording<T>(value: T): T {
  if (typeof value === 'string') return userWording(value) as T;
  if (Array.isArray(value)) {
    let out: unknown[] | null = null;
    value.forEach((v, i) => {
      const w = withUserWording(v);
      if (w !== v) (out ??= [...value])[i] = w;
    });
    return (out ?? value) as T;
  }
  if (value && typeof value === 'object' && Object.getPrototypeOf(value) === Object.prototype) {
    let out: Record<string, unknown> | null = null;
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
      const w = withUserWording(v);
      if (w !== v) (out ??= { ...(value as Record<string, unknown>) })[k] = w;
    }
    return (out ?? value) as T;
  }
  return value;
}
