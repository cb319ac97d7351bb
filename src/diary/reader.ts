/**
 * Pure diary reader: bytes -> text (UTF-8, UTF-16 or Windows-1252, per line), then CSV with the
 * documented columns or free text with day and occasion headings -> entries with line numbers.
 * Bad lines are reported with where and why; nothing here throws on user input.
 */
import { parseQuantity, splitQuantity, type Quantity } from './quantity.js';
import { splitFoodParts } from './split-foods.js';

/** One diary entry as read, before matching. */
export interface DiaryEntryInput {
  /** 1-based line number in the file (the first line of a CSV record). */
  line: number;
  /**
   * Which food of the line (0-based) when the line names several ("toast with cheese"); absent
   * or 0 for the first. `entryKey` names an entry by line and part.
   */
  part?: number;
  /** How many foods the line names, when more than one. */
  partsOnLine?: number;
  /** Written "with" the food before it ("coffee with milk"): a small addition, not a serving. */
  addedTo?: boolean;
  /** ISO date (yyyy-mm-dd) when the diary gave one, else null. */
  date: string | null;
  /** The day as the diary named it ("2024-03-05", "Tuesday", "Day 1"; "" when none). */
  dayLabel: string;
  occasion: string | null;
  /** "HH:MM" when a time was written. */
  time: string | null;
  /** The entry as written (food and quantity). */
  text: string;
  foodText: string;
  quantityText: string | null;
  /** The parsed quantity, or null (none written, or not understood: see flags). */
  quantity: Quantity | null;
  /** True when a quantity was written but could not be read. */
  quantityUnreadable: boolean;
  /** A negative amount as written ("-100 g"): the entry waits for the reviewer's amount. */
  negativeAmount?: string;
  barcode: string | null;
  ingredients: string | null;
  /** Plain-language notes on this line (encoding, date, quantity). */
  flags: string[];
}

export interface DiaryIssue {
  line: number;
  code: string;
  message: string;
}

export type DiaryFormat = 'csv' | 'text';

export interface DiaryRead {
  format: DiaryFormat;
  entries: DiaryEntryInput[];
  /** Lines that could not be read as entries (the audit is then marked incomplete). */
  skipped: DiaryIssue[];
  /** Notes that do not lose anything (ignored columns, encodings). */
  notes: DiaryIssue[];
}

export type DiaryReadResult = { ok: true; value: DiaryRead } | { ok: false; issues: DiaryIssue[] };

export interface ReadOptions {
  format?: DiaryFormat | 'auto';
  /** How slash dates like 04/03/2024 are read when both parts could be a month (default dmy). */
  dateOrder?: 'dmy' | 'mdy';
}

/** The most a diary may hold; larger files are refused whole (nothing is half-read). */
export const DIARY_LIMITS = {
  maxBytes: 5 * 1024 * 1024,
  maxEntries: 20_000,
  /** A line (food text and quantity) longer than this is skipped and reported. */
  maxEntryChars: 500,
  /** Ingredient statements may be long; longer than this is skipped and reported. */
  maxIngredientChars: 5_000,
};

/** CSV columns: canonical name and accepted header spellings (English and Spanish). */
export const DIARY_CSV_COLUMNS = {
  date: ['date', 'day', 'fecha', 'dia'],
  time: ['time', 'hora'],
  occasion: ['occasion', 'meal', 'comida', 'ocasion', 'toma'],
  food: ['food', 'item', 'description', 'alimento', 'descripcion', 'entry'],
  quantity: ['quantity', 'amount', 'portion', 'cantidad', 'porcion', 'qty'],
  barcode: ['barcode', 'gtin', 'ean', 'upc', 'codigo de barras', 'codigo'],
  ingredients: ['ingredients', 'ingredient statement', 'ingredientes'],
} as const;
type Column = keyof typeof DIARY_CSV_COLUMNS;

function fold(text: string): string {
  // eslint-disable-next-line no-control-regex
  if (/^[\x00-\x7f]*$/.test(text)) return text.toLowerCase().trim();
  return text
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase()
    .trim();
}

// ---------------------------------------------------------------------------------------------
// Bytes to text

export type DecodeResult =
  { ok: true; text: string; notes: DiaryIssue[] } | { ok: false; issues: DiaryIssue[] };

const utf8 = new TextDecoder('utf-8', { fatal: true });
const cp1252 = new TextDecoder('windows-1252');

/**
 * Decodes an uploaded diary. UTF-16 with a byte-order mark is decoded whole; otherwise each line
 * is read as UTF-8 and, if it is not valid UTF-8, as Windows-1252 (noted per line), so a file
 * pasted together from two sources loses nothing. Binary data is refused.
 */
export function decodeDiaryBytes(bytes: Uint8Array): DecodeResult {
  if (bytes.length === 0) {
    return {
      ok: false,
      issues: [{ line: 0, code: 'PHL_DIARY_EMPTY', message: 'the diary is empty' }],
    };
  }
  if (bytes.length > DIARY_LIMITS.maxBytes) {
    return {
      ok: false,
      issues: [
        {
          line: 0,
          code: 'PHL_DIARY_TOO_LARGE',
          message: `the diary is ${bytes.length} bytes; the most accepted is ${DIARY_LIMITS.maxBytes}`,
        },
      ],
    };
  }
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    const enc = bytes[0] === 0xff ? 'utf-16le' : 'utf-16be';
    const text = new TextDecoder(enc).decode(bytes.subarray(2));
    return {
      ok: true,
      text,
      notes: [{ line: 0, code: 'PHL_DIARY_UTF16', message: `read as ${enc.toUpperCase()}` }],
    };
  }
  // Binary: NUL bytes or many control characters in the first 8 KB.
  const head = bytes.subarray(0, 8192);
  let control = 0;
  for (const b of head) {
    if (b === 0) {
      control = head.length;
      break;
    }
    if (b < 9 || (b > 13 && b < 32) || b === 127) control++;
  }
  if (control > head.length * 0.05) {
    return {
      ok: false,
      issues: [
        {
          line: 0,
          code: 'PHL_DIARY_BINARY',
          message: 'the file looks like binary data, not a CSV or text diary',
        },
      ],
    };
  }
  let start = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  const parts: string[] = [];
  const notes: DiaryIssue[] = [];
  let line = 1;
  while (start <= bytes.length) {
    let end = bytes.indexOf(0x0a, start);
    if (end < 0) end = bytes.length;
    const chunk = bytes.subarray(start, end);
    try {
      parts.push(utf8.decode(chunk));
    } catch {
      parts.push(cp1252.decode(chunk));
      notes.push({
        line,
        code: 'PHL_DIARY_ENCODING',
        message: 'line is not valid UTF-8; read as Windows-1252 (Latin-1)',
      });
    }
    line++;
    start = end + 1;
  }
  return { ok: true, text: parts.join('\n'), notes };
}

// ---------------------------------------------------------------------------------------------
// Dates, days and occasions

const MONTHS: Record<string, number> = {
  january: 1, jan: 1, enero: 1, ene: 1,
  february: 2, feb: 2, febrero: 2,
  march: 3, mar: 3, marzo: 3,
  april: 4, apr: 4, abril: 4, abr: 4,
  may: 5, mayo: 5,
  june: 6, jun: 6, junio: 6,
  july: 7, jul: 7, julio: 7,
  august: 8, aug: 8, agosto: 8, ago: 8,
  september: 9, sep: 9, sept: 9, septiembre: 9, setiembre: 9,
  october: 10, oct: 10, octubre: 10,
  november: 11, nov: 11, noviembre: 11,
  december: 12, dec: 12, diciembre: 12, dic: 12,
}; // prettier-ignore

const WEEKDAYS: Record<string, string> = {
  monday: 'Monday', mon: 'Monday', lunes: 'Monday', lun: 'Monday',
  tuesday: 'Tuesday', tue: 'Tuesday', tues: 'Tuesday', martes: 'Tuesday',
  wednesday: 'Wednesday', wed: 'Wednesday', miercoles: 'Wednesday', mie: 'Wednesday',
  thursday: 'Thursday', thu: 'Thursday', thur: 'Thursday', thurs: 'Thursday', jueves: 'Thursday', jue: 'Thursday',
  friday: 'Friday', fri: 'Friday', viernes: 'Friday', vie: 'Friday',
  saturday: 'Saturday', sat: 'Saturday', sabado: 'Saturday', sab: 'Saturday',
  sunday: 'Sunday', sun: 'Sunday', domingo: 'Sunday', dom: 'Sunday',
}; // prettier-ignore

/** Occasion words (folded) and the name the report uses. */
const OCCASIONS: [string, string][] = (
  [
    ['early morning', 'early morning'],
    ['morning snack', 'morning snack'],
    ['mid-morning snack', 'morning snack'],
    ['mid morning snack', 'morning snack'],
    ['afternoon snack', 'afternoon snack'],
    ['afternoon tea', 'afternoon snack'],
    ['evening snack', 'evening snack'],
    ['bedtime snack', 'evening snack'],
    ['media manana', 'morning snack'],
    ['breakfast', 'breakfast'],
    ['brunch', 'brunch'],
    ['lunch', 'lunch'],
    ['dinner', 'dinner'],
    ['supper', 'dinner'],
    ['snacks', 'snack'],
    ['snack', 'snack'],
    ['tea', 'tea'],
    ['desayuno', 'breakfast'],
    ['almuerzo', 'lunch'],
    ['comida', 'lunch'],
    ['merienda', 'afternoon snack'],
    ['cena', 'dinner'],
    ['tentempie', 'snack'],
    ['colacion', 'snack'],
  ] as [string, string][]
).sort((a, b) => b[0].length - a[0].length);
/** Occasion words that are also foods or drinks: a heading only when followed by ':'. */
const AMBIGUOUS_OCCASIONS = new Set(['tea', 'comida', 'snack', 'snacks']);

export interface DayRead {
  date: string | null;
  label: string;
}

function isoDate(y: number, m: number, d: number): string | null {
  if (m < 1 || m > 12 || d < 1 || d > 31 || y < 1900 || y > 2200) return null;
  const dt = new Date(Date.UTC(y, m - 1, d));
  if (dt.getUTCMonth() !== m - 1) return null;
  return `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
}

function year4(y: string): number {
  const n = Number(y);
  return y.length === 2 ? 2000 + n : n;
}

/**
 * Reads a day as diaries write it: 2024-03-05, 2024/03/05, 05/03/2024, 5.3.24, 5-3-2024,
 * "5 March 2024", "March 5, 2024", "5 de marzo de 2024", "Tue 5 Mar 2024", "Tuesday", "martes",
 * "Day 2". Slash dates are day-first unless `order` is 'mdy' or only the other reading is valid.
 * Returns the length consumed, or null when the text does not start with a day.
 */
export function readDay(
  text: string,
  order: 'dmy' | 'mdy' = 'dmy',
): { day: DayRead; length: number; problem: string | null } | null {
  const f = fold(text);
  let m = /^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})(?![\d])/.exec(f);
  if (m) {
    const iso = isoDate(Number(m[1]), Number(m[2]), Number(m[3]));
    return {
      day: { date: iso, label: iso ?? m[0] },
      length: m[0].length,
      problem: iso ? null : `'${m[0]}' is not a calendar date`,
    };
  }
  m = /^(\d{1,2})[-/.](\d{1,2})[-/.](\d{4}|\d{2})(?![\d])/.exec(f);
  if (m) {
    const a = Number(m[1]);
    const b = Number(m[2]);
    const y = year4(m[3] as string);
    const dmy = isoDate(y, b, a);
    const mdy = isoDate(y, a, b);
    const iso = order === 'mdy' ? (mdy ?? dmy) : (dmy ?? mdy);
    return {
      day: { date: iso, label: iso ?? m[0] },
      length: m[0].length,
      problem: iso ? null : `'${m[0]}' is not a calendar date`,
    };
  }
  // Optional weekday, then "5 March 2024" / "5 de marzo de 2024" / "March 5, 2024".
  const wd = /^([a-z]+)(?=$|[\s.,:])\.?,?\s*/.exec(f);
  let weekday: string | null = null;
  let pos = 0;
  if (wd && WEEKDAYS[wd[1] as string]) {
    weekday = WEEKDAYS[wd[1] as string] as string;
    pos = wd[0].length;
  }
  const rest = f.slice(pos);
  m =
    /^(\d{1,2})(?:st|nd|rd|th)?\s+(?:de\s+)?([a-z]+)\.?,?\s+(?:de\s+|del\s+)?(\d{4})(?![\d])/.exec(
      rest,
    );
  if (m && MONTHS[m[2] as string]) {
    const iso = isoDate(Number(m[3]), MONTHS[m[2] as string] as number, Number(m[1]));
    return {
      day: { date: iso, label: iso ?? text.slice(0, pos + m[0].length).trim() },
      length: pos + m[0].length,
      problem: iso ? null : `'${text.slice(0, pos + m[0].length).trim()}' is not a calendar date`,
    };
  }
  m = /^([a-z]+)\.?\s+(\d{1,2})(?:st|nd|rd|th)?,?\s+(\d{4})(?![\d])/.exec(rest);
  if (m && MONTHS[m[1] as string]) {
    const iso = isoDate(Number(m[3]), MONTHS[m[1] as string] as number, Number(m[2]));
    return {
      day: { date: iso, label: iso ?? text.slice(0, pos + m[0].length).trim() },
      length: pos + m[0].length,
      problem: iso ? null : `'${text.slice(0, pos + m[0].length).trim()}' is not a calendar date`,
    };
  }
  if (weekday) {
    // "Tuesday", "Tue", "martes" (optionally followed by ':' or '-').
    return {
      day: { date: null, label: weekday },
      length: wd?.[0].trimEnd().length ?? 0,
      problem: null,
    };
  }
  // "Day 1" to "Day 999": a diary kept for a year numbers its days past 99.
  m = /^(day|dia)\s*(\d{1,3})(?![\d])/.exec(f);
  if (m)
    return {
      day: { date: null, label: `Day ${Number(m[2])}` },
      length: m[0].length,
      problem: null,
    };
  return null;
}

/** Reads "8:00", "08h30", "8am", "7.30 pm" at the start; returns "HH:MM" and length. */
export function readTime(text: string): { time: string; length: number } | null {
  const f = fold(text);
  const m =
    /^(?:at\s+|a las\s+)?(\d{1,2})(?:[:h.](\d{2}))?\s*(am|pm|a\.m\.|p\.m\.|h)?(?![\p{L}\d])/u.exec(
      f,
    );
  if (!m) return null;
  if (m[2] === undefined && m[3] === undefined) return null; // a bare number is a quantity
  let h = Number(m[1]);
  const min = m[2] === undefined ? 0 : Number(m[2]);
  const suffix = m[3]?.replaceAll('.', '');
  if (suffix === 'pm' && h < 12) h += 12;
  if (suffix === 'am' && h === 12) h = 0;
  if (h > 23 || min > 59) return null;
  return {
    time: `${String(h).padStart(2, '0')}:${String(min).padStart(2, '0')}`,
    length: m[0].length,
  };
}

function readOccasion(text: string): { occasion: string; length: number; word: string } | null {
  const f = fold(text);
  for (const [w, name] of OCCASIONS) {
    if (f.startsWith(w) && !/[\p{L}\d]/u.test(f[w.length] ?? ' ')) {
      return { occasion: name, length: w.length, word: w };
    }
  }
  return null;
}

/** Normalises an occasion cell ("Breakfast", "desayuno", "8:00"): name and time. */
export function readOccasionCell(text: string): { occasion: string | null; time: string | null } {
  const t = text.trim();
  if (!t) return { occasion: null, time: null };
  const time = readTime(t);
  if (time && time.length >= fold(t).length - 1) return { occasion: null, time: time.time };
  const occ = readOccasion(t);
  if (occ && occ.length >= fold(t).replace(/[:\s]+$/, '').length)
    return { occasion: occ.occasion, time: time?.time ?? null };
  return { occasion: t.toLowerCase(), time: time?.time ?? null };
}

// ---------------------------------------------------------------------------------------------
// CSV

interface CsvRecord {
  line: number;
  fields: string[];
}

/** RFC 4180 records with the given delimiter; an unterminated quote is an issue, not a throw. */
function parseCsv(
  text: string,
  delimiter: string,
): { records: CsvRecord[]; issue: DiaryIssue | null } {
  const records: CsvRecord[] = [];
  let fields: string[] = [];
  let field = '';
  let line = 1;
  let recordLine = 1;
  let inQuotes = false;
  let quoteLine = 0;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i] as string;
    if (inQuotes) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i++;
        } else inQuotes = false;
      } else {
        if (ch === '\n') line++;
        field += ch;
      }
      continue;
    }
    if (ch === '"' && field.trim() === '') {
      inQuotes = true;
      quoteLine = line;
      field = '';
    } else if (ch === delimiter) {
      fields.push(field);
      field = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      fields.push(field);
      records.push({ line: recordLine, fields });
      fields = [];
      field = '';
      line++;
      recordLine = line;
    } else field += ch;
  }
  if (inQuotes) {
    return {
      records,
      issue: {
        line: quoteLine,
        code: 'PHL_DIARY_CSV_QUOTE',
        message: `a quoted field opened on line ${quoteLine} is never closed; lines from ${recordLine} on were not read`,
      },
    };
  }
  if (field !== '' || fields.length > 0) {
    fields.push(field);
    records.push({ line: recordLine, fields });
  }
  return { records, issue: null };
}

function detectDelimiter(firstLine: string): string {
  const counts = [',', ';', '\t'].map((d) => [d, firstLine.split(d).length - 1] as const);
  counts.sort((a, b) => b[1] - a[1]);
  return counts[0]?.[1] ? counts[0][0] : ',';
}

function headerColumns(fields: string[]): {
  map: Partial<Record<Column, number>>;
  unknown: string[];
} {
  const map: Partial<Record<Column, number>> = {};
  const unknown: string[] = [];
  fields.forEach((raw, i) => {
    const h = fold(raw).replace(/[_-]+/g, ' ').replace(/\s+/g, ' ');
    const col = (Object.keys(DIARY_CSV_COLUMNS) as Column[]).find((c) =>
      (DIARY_CSV_COLUMNS[c] as readonly string[]).includes(h),
    );
    if (col && map[col] === undefined) map[col] = i;
    else if (h) unknown.push(raw.trim());
  });
  return { map, unknown };
}

function looksLikeCsv(text: string): boolean {
  const first = text.split('\n', 1)[0] ?? '';
  const delimiter = detectDelimiter(first);
  const { map } = headerColumns(first.split(delimiter));
  // A header with a food column, or with two other diary columns (then the reader says what is missing).
  return map.food !== undefined || Object.keys(map).length >= 2;
}

// ---------------------------------------------------------------------------------------------
// Entries

/** Diaries repeat their lines: the split of a line's text is kept (it is pure). */
const splitCache = new Map<string, ReturnType<typeof splitQuantity>>();

/** The name of one entry: its line, and its place on the line when the line names several foods. */
export function entryKey(e: Pick<DiaryEntryInput, 'line' | 'part'>): string {
  return e.part ? `${e.line}.${e.part}` : String(e.line);
}

type EntryBase = Omit<
  DiaryEntryInput,
  'text' | 'foodText' | 'quantityText' | 'quantity' | 'quantityUnreadable' | 'flags'
>;

/** One food of a line: its quantity is the CSV cell (first food only) or read from its words. */
function partEntry(
  base: EntryBase,
  foodCell: string,
  quantityCell: string,
  flags: string[],
): DiaryEntryInput {
  if (quantityCell.trim()) {
    const q = parseQuantity(quantityCell);
    if (!q.ok)
      flags.push(`quantity '${quantityCell.trim()}' not understood: ${q.issues.join('; ')}`);
    return {
      ...base,
      text: `${foodCell.trim()} (${quantityCell.trim()})`,
      foodText: foodCell.trim(),
      quantityText: quantityCell.trim(),
      quantity: q.ok ? q.value : null,
      quantityUnreadable: !q.ok,
      flags,
    };
  }
  let split = splitCache.get(foodCell);
  if (!split) {
    split = splitQuantity(foodCell);
    if (splitCache.size > 50_000) splitCache.clear();
    splitCache.set(foodCell, split);
  }
  if (split.vague) flags.push(`quantity '${split.vague}' gives no size`);
  if (split.negative)
    flags.push(
      `the amount '${split.negative}' is negative: not counted until the reviewer enters the amount`,
    );
  return {
    ...base,
    text: foodCell.trim(),
    foodText: split.foodText,
    quantityText: split.quantity?.text ?? split.vague ?? split.negative ?? null,
    quantity: split.quantity,
    quantityUnreadable: split.vague !== undefined || split.negative !== undefined,
    ...(split.negative ? { negativeAmount: split.negative } : {}),
    flags,
  };
}

/**
 * The entries of one line: one per food the line names (see split-foods.ts), each with its own
 * quantity. A CSV quantity cell belongs to the first food; the others read their own words.
 */
function entriesFromText(
  base: EntryBase,
  foodCell: string,
  quantityCell: string,
  flags: string[],
): DiaryEntryInput[] {
  const foods = splitFoodParts(foodCell);
  if (foods.length === 1) return [partEntry(base, foodCell, quantityCell, flags)];
  return foods.map(({ text: food, added }, part) => {
    const own = [
      ...flags,
      `food ${part + 1} of ${foods.length} on line ${base.line} ('${foodCell.trim().slice(0, 120)}')`,
    ];
    // The barcode and ingredient cells describe one product: the first food's.
    const first = part === 0;
    return partEntry(
      {
        ...base,
        part,
        partsOnLine: foods.length,
        ...(added ? { addedTo: true } : {}),
        barcode: first ? base.barcode : null,
        ingredients: first ? base.ingredients : null,
      },
      food,
      part === 0 ? quantityCell : '',
      own,
    );
  });
}

function readCsv(text: string, opts: ReadOptions): DiaryReadResult {
  const firstLine = text.split('\n', 1)[0] ?? '';
  const delimiter = detectDelimiter(firstLine);
  const { records, issue } = parseCsv(text, delimiter);
  const header = records[0];
  if (!header)
    return {
      ok: false,
      issues: [{ line: 1, code: 'PHL_DIARY_EMPTY', message: 'the diary is empty' }],
    };
  const { map, unknown } = headerColumns(header.fields);
  if (map.food === undefined) {
    return {
      ok: false,
      issues: [
        {
          line: 1,
          code: 'PHL_DIARY_COLUMNS',
          message:
            `no food column in the header (found: ${header.fields.map((f) => `'${f.trim()}'`).join(', ')}); ` +
            'expected columns: date, time, occasion, food, quantity, barcode, ingredients (only food is required)',
        },
      ],
    };
  }
  const notes: DiaryIssue[] = unknown.map((u) => ({
    line: 1,
    code: 'PHL_DIARY_COLUMN_IGNORED',
    message: `column '${u.slice(0, 60)}' is not a diary column and was ignored`,
  }));
  const skipped: DiaryIssue[] = issue ? [issue] : [];
  const entries: DiaryEntryInput[] = [];
  let day: DayRead = { date: null, label: '' };
  let occasion: string | null = null;
  const cell = (r: CsvRecord, c: Column) => {
    const i = map[c];
    return i === undefined ? '' : (r.fields[i] ?? '').trim();
  };
  for (const r of records.slice(1)) {
    if (r.fields.every((f) => f.trim() === '')) continue;
    const flags: string[] = [];
    const food = cell(r, 'food');
    const dateCell = cell(r, 'date');
    if (dateCell) {
      const d = readDay(dateCell, opts.dateOrder);
      if (d && d.length >= fold(dateCell).length - 1) {
        day = d.day;
        if (d.problem) flags.push(d.problem);
      } else {
        day = { date: null, label: dateCell.slice(0, 40) };
        flags.push(`date '${dateCell.slice(0, 40)}' not understood; kept as the day's name`);
      }
      occasion = null;
    }
    const occ = readOccasionCell(cell(r, 'occasion'));
    const timeCell = readTime(cell(r, 'time'));
    if (occ.occasion) occasion = occ.occasion;
    if (!food) {
      skipped.push({
        line: r.line,
        code: 'PHL_DIARY_NO_FOOD',
        message: 'the food column is empty',
      });
      continue;
    }
    const quantityCell = cell(r, 'quantity');
    const ingredients = cell(r, 'ingredients');
    if (food.length + quantityCell.length > DIARY_LIMITS.maxEntryChars) {
      skipped.push({
        line: r.line,
        code: 'PHL_DIARY_LINE_TOO_LONG',
        message: `the entry is ${food.length + quantityCell.length} characters long; the most read is ${DIARY_LIMITS.maxEntryChars}`,
      });
      continue;
    }
    if (ingredients.length > DIARY_LIMITS.maxIngredientChars) {
      skipped.push({
        line: r.line,
        code: 'PHL_DIARY_LINE_TOO_LONG',
        message: `the ingredient statement is ${ingredients.length} characters long; the most read is ${DIARY_LIMITS.maxIngredientChars}`,
      });
      continue;
    }
    if (entries.length >= DIARY_LIMITS.maxEntries) {
      return tooMany();
    }
    const barcode = cell(r, 'barcode').replace(/[\s-]/g, '');
    if (barcode && !/^\d{6,14}$/.test(barcode))
      flags.push(`barcode '${barcode.slice(0, 30)}' is not 6-14 digits; ignored`);
    entries.push(
      ...entriesFromText(
        {
          line: r.line,
          date: day.date,
          dayLabel: day.label,
          occasion,
          time: timeCell?.time ?? occ.time,
          barcode: /^\d{6,14}$/.test(barcode) ? barcode : null,
          ingredients: ingredients || null,
        },
        food,
        quantityCell,
        flags,
      ),
    );
  }
  if (entries.length === 0 && skipped.length === 0) {
    return {
      ok: false,
      issues: [
        { line: 1, code: 'PHL_DIARY_EMPTY', message: 'the diary has a header but no entries' },
      ],
    };
  }
  return { ok: true, value: { format: 'csv', entries, skipped, notes } };
}

function tooMany(): DiaryReadResult {
  return {
    ok: false,
    issues: [
      {
        line: 0,
        code: 'PHL_DIARY_TOO_MANY_ENTRIES',
        message: `the diary has more than ${DIARY_LIMITS.maxEntries} entries; split it into smaller files`,
      },
    ],
  };
}

/** Reads one free-text line's leading day, time and occasion; what is left is the entry. */
function readHeadings(
  raw: string,
  order: 'dmy' | 'mdy',
): {
  day: DayRead | null;
  dayProblem: string | null;
  occasion: string | null;
  time: string | null;
  rest: string;
  heading: boolean;
} {
  let s = raw.trim();
  let day: DayRead | null = null;
  let dayProblem: string | null = null;
  let occasion: string | null = null;
  let time: string | null = null;
  let sawSeparator = false;
  const eatSep = () => {
    const m = /^\s*([:\-–—,|>]|\.(?!\d))\s*/.exec(s);
    if (m) {
      sawSeparator = true;
      s = s.slice(m[0].length);
    } else s = s.trimStart();
  };
  const d = readDay(s, order);
  if (d) {
    // A weekday alone is a heading only when nothing but an occasion, time or separator follows
    // or an entry follows after a separator ("Tuesday: toast"), not "Sunday roast".
    day = d.day;
    dayProblem = d.problem;
    s = s.slice(d.length);
    eatSep();
  }
  const t = readTime(s);
  if (t) {
    time = t.time;
    s = s.slice(t.length);
    eatSep();
  }
  const o = readOccasion(s);
  if (o) {
    const after = s.slice(o.length);
    const sep =
      /^\s*[:\-–—|>]/.test(after) || (after.trim() === '' && !AMBIGUOUS_OCCASIONS.has(o.word));
    if (sep || /^\s*[(\d]/.test(after)) {
      occasion = o.occasion;
      s = after;
      eatSep();
      const t2 = readTime(s.replace(/^\(/, ''));
      if (t2) {
        time = t2.time;
        s = s.replace(/^\(/, '').slice(t2.length).replace(/^\)/, '');
        eatSep();
      }
    }
  }
  const rest = s.trim();
  if (day && day.date === null && rest && !sawSeparator && occasion === null && time === null) {
    // "Sunday roast" is food, not a heading.
    return {
      day: null,
      dayProblem: null,
      occasion: null,
      time: null,
      rest: raw.trim(),
      heading: false,
    };
  }
  return { day, dayProblem, occasion, time, rest, heading: rest === '' };
}

/** A free-text line holding an ingredient statement, in the languages of the CSV headers. */
const INGREDIENTS_LINE =
  /^(?:ingredients?|ingredientes|ingr[ée]dients|zutaten|ingredienti)\s*[:：]\s*(.*)$/i;

/** Gives the entry above its ingredient statement; an issue when there is none to give it to. */
function attachIngredients(
  entry: DiaryEntryInput | undefined,
  text: string,
  line: number,
): DiaryIssue | null {
  const statement = text.trim();
  if (!entry) {
    return {
      line,
      code: 'PHL_DIARY_INGREDIENTS_ALONE',
      message: 'an ingredient statement needs the food it belongs to on the line above',
    };
  }
  const joined = entry.ingredients ? `${entry.ingredients} ${statement}` : statement;
  if (joined.length > DIARY_LIMITS.maxIngredientChars) {
    return {
      line,
      code: 'PHL_DIARY_INGREDIENTS_TOO_LONG',
      message: `the ingredient statement is ${joined.length} characters long; the most read is ${DIARY_LIMITS.maxIngredientChars}`,
    };
  }
  if (statement) entry.ingredients = joined;
  return null;
}

function readText(text: string, opts: ReadOptions): DiaryReadResult {
  const lines = text.split(/\r\n|\n|\r/);
  const entries: DiaryEntryInput[] = [];
  const skipped: DiaryIssue[] = [];
  let day: DayRead = { date: null, label: '' };
  let occasion: string | null = null;
  let time: string | null = null;
  // The entry an ingredient statement on the next line belongs to (none after a heading).
  let above: DiaryEntryInput | undefined;
  for (const [i, rawLine] of lines.entries()) {
    const line = i + 1;
    const stripped = rawLine.replace(/^\s*(?:[-*•·]|\d{1,3}[.)](?!\d))\s+/, '').trim();
    if (!stripped || stripped.startsWith('#')) continue;
    // "ingredients: ..." under an entry is that entry's ingredient statement (a label typed in or
    // transcribed from a photo), as the CSV's ingredients column.
    const statement = INGREDIENTS_LINE.exec(stripped);
    if (statement) {
      const issue = attachIngredients(above, statement[1] as string, line);
      if (issue) skipped.push(issue);
      continue;
    }
    if (stripped.length > DIARY_LIMITS.maxEntryChars) {
      above = undefined;
      skipped.push({
        line,
        code: 'PHL_DIARY_LINE_TOO_LONG',
        message: `the line is ${stripped.length} characters long; the most read is ${DIARY_LIMITS.maxEntryChars}`,
      });
      continue;
    }
    const h = readHeadings(stripped, opts.dateOrder ?? 'dmy');
    const flags: string[] = [];
    if (h.day) {
      day = h.day;
      occasion = null;
      time = null;
      if (h.dayProblem) flags.push(h.dayProblem);
    }
    if (h.occasion) {
      occasion = h.occasion;
      time = null;
    }
    if (h.time) time = h.time;
    if (h.heading) {
      above = undefined;
      if (flags.length > 0)
        skipped.push({ line, code: 'PHL_DIARY_DATE', message: flags.join('; ') });
      continue;
    }
    if (entries.length >= DIARY_LIMITS.maxEntries) return tooMany();
    const parts = entriesFromText(
      {
        line,
        date: day.date,
        dayLabel: day.label,
        occasion,
        time,
        barcode: null,
        ingredients: null,
      },
      h.rest,
      '',
      flags,
    );
    entries.push(...parts);
    above = parts[parts.length - 1];
  }
  if (entries.length === 0) {
    return {
      ok: false,
      issues: [
        {
          line: 0,
          code: 'PHL_DIARY_EMPTY',
          message:
            skipped.length > 0
              ? 'no line of the diary could be read as an entry'
              : 'the diary has no entries',
        },
      ],
    };
  }
  return { ok: true, value: { format: 'text', entries, skipped, notes: [] } };
}

/** Reads a decoded diary as CSV (when the first line is a header with a food column) or text. */
export function readDiary(text: string, opts: ReadOptions = {}): DiaryReadResult {
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') {
    return {
      ok: false,
      issues: [{ line: 0, code: 'PHL_DIARY_EMPTY', message: 'the diary is empty' }],
    };
  }
  if (body.length > DIARY_LIMITS.maxBytes) {
    return {
      ok: false,
      issues: [
        {
          line: 0,
          code: 'PHL_DIARY_TOO_LARGE',
          message: `the diary is ${body.length} characters; the most accepted is ${DIARY_LIMITS.maxBytes}`,
        },
      ],
    };
  }
  const format =
    opts.format && opts.format !== 'auto' ? opts.format : looksLikeCsv(body) ? 'csv' : 'text';
  return format === 'csv' ? readCsv(body, opts) : readText(body, opts);
}
