/** Locale-aware formatting of the numbers and dates printed in handouts (Intl only). */

const numberFormats = new Map<string, Intl.NumberFormat>();

/** A number with the locale's digits and grouping (hi-IN lakh grouping, ar-EG Arabic-Indic). */
export function formatNumber(locale: string, value: number, maxFractionDigits = 0): string {
  const key = `${locale}|${maxFractionDigits}`;
  let f = numberFormats.get(key);
  if (!f) {
    f = new Intl.NumberFormat(locale, { maximumFractionDigits: maxFractionDigits });
    numberFormats.set(key, f);
  }
  return f.format(value);
}

/** A calendar date (YYYY-MM-DD, no time zone shift) in the locale's long style. */
export function formatDate(locale: string, isoDate: string): string {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(isoDate)) throw new Error(`not a YYYY-MM-DD date: ${isoDate}`);
  return new Intl.DateTimeFormat(locale, { dateStyle: 'long', timeZone: 'UTC' }).format(
    new Date(`${isoDate}T00:00:00Z`),
  );
}

/** A clock time HH:MM in the locale's short style. */
export function formatTime(locale: string, hhmm: string): string {
  const m = /^(\d{1,2}):(\d{2})$/.exec(hhmm);
  if (!m) return hhmm;
  return new Intl.DateTimeFormat(locale, {
    hour: 'numeric',
    minute: '2-digit',
    timeZone: 'UTC',
  }).format(new Date(Date.UTC(2000, 0, 1, Number(m[1]), Number(m[2]))));
}

/** "a, b and c" in the locale's words. */
export function formatList(locale: string, items: readonly string[]): string {
  return new Intl.ListFormat(locale, { style: 'long', type: 'conjunction' }).format(items);
}

/** The calendar date of an instant in a time zone, as YYYY-MM-DD. */
export function localIsoDate(at: Date, timeZone?: string): string {
  return new Intl.DateTimeFormat('en-CA', {
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    ...(timeZone ? { timeZone } : {}),
  }).format(at);
}
