import { describe, expect, it } from 'vitest';
import {
  decodeDiaryBytes,
  DIARY_LIMITS,
  readDay,
  readDiary,
  type DiaryRead,
} from '../../src/diary/reader.js';

function read(text: string, opts = {}): DiaryRead {
  const r = readDiary(text, opts);
  if (!r.ok) throw new Error(r.issues.map((i) => i.message).join('; '));
  return r.value;
}

describe('readDay: dates in several formats (invented demo dates)', () => {
  it.each([
    ['2024-03-05', '2024-03-05'],
    ['2024/03/05', '2024-03-05'],
    ['05/03/2024', '2024-03-05'], // day-first by default
    ['5.3.2024', '2024-03-05'],
    ['5-3-24', '2024-03-05'],
    ['13/03/2024', '2024-03-13'],
    ['03/13/2024', '2024-03-13'], // only the month-first reading is a date
    ['5 March 2024', '2024-03-05'],
    ['March 5, 2024', '2024-03-05'],
    ['Tue 5 Mar 2024', '2024-03-05'],
    ['5 de marzo de 2024', '2024-03-05'],
    ['martes 5 de marzo de 2024', '2024-03-05'],
  ])('%s -> %s', (text, iso) => {
    expect(readDay(text)?.day.date).toBe(iso);
  });

  it('month-first on request: 04/03/2024 is 3 April with dateOrder mdy', () => {
    expect(readDay('04/03/2024', 'mdy')?.day.date).toBe('2024-04-03');
    expect(readDay('04/03/2024')?.day.date).toBe('2024-03-04');
  });

  it('weekdays and day numbers give a label without a date', () => {
    expect(readDay('Tuesday')?.day).toEqual({ date: null, label: 'Tuesday' });
    expect(readDay('miércoles')?.day).toEqual({ date: null, label: 'Wednesday' });
    expect(readDay('Day 3')?.day).toEqual({ date: null, label: 'Day 3' });
  });

  it('an impossible date is reported, not guessed', () => {
    expect(readDay('2024-02-30')?.problem).toContain('not a calendar date');
    expect(readDay('31/31/2024')?.problem).toContain('not a calendar date');
    expect(readDay('sun-dried tomatoes')).toBeNull();
  });
});

describe('readDiary: free text with day and occasion headings (invented demo diary)', () => {
  const text = [
    'Tuesday',
    'breakfast:',
    '2 slices white toast',
    '- 1 tbsp margarine',
    'lunch: ham sandwich',
    '',
    '# a comment line',
    '2024-03-05 breakfast - 2 slices toast with margarine',
    'cena (20:30)',
    '* 1 cup rice',
    'Sunday roast',
    'tea: 1 mug tea with milk',
  ].join('\n');
  const d = read(text);

  it('reads entries with their day, occasion and line numbers', () => {
    expect(d.format).toBe('text');
    expect(
      d.entries.map((e) => [
        e.line,
        e.dayLabel,
        e.occasion,
        e.time,
        e.foodText,
        e.quantity?.amount,
      ]),
    ).toEqual([
      [3, 'Tuesday', 'breakfast', null, 'white toast', 2],
      [4, 'Tuesday', 'breakfast', null, 'margarine', 1],
      [5, 'Tuesday', 'lunch', null, 'ham sandwich', undefined],
      // one entry per food of the line, each with its own amount
      [8, '2024-03-05', 'breakfast', null, 'toast', 2],
      [8, '2024-03-05', 'breakfast', null, 'margarine', undefined],
      [10, '2024-03-05', 'dinner', '20:30', 'rice', 1],
      [11, '2024-03-05', 'dinner', '20:30', 'Sunday roast', undefined],
      [12, '2024-03-05', 'tea', null, 'tea', 1],
      [12, '2024-03-05', 'tea', null, 'milk', undefined],
    ]);
    expect(d.entries[3]?.date).toBe('2024-03-05');
    expect(d.entries.filter((e) => e.line === 8).map((e) => [e.part, e.addedTo])).toEqual([
      [0, undefined],
      [1, true],
    ]);
    expect(d.skipped).toEqual([]);
  });
});

describe('readDiary: CSV with the documented columns', () => {
  it('reads the template columns, quoted fields and carries the date down', () => {
    const csv = [
      'date,time,occasion,food,quantity,barcode,ingredients',
      '2024-03-05,07:30,breakfast,"Toast, white",2 slices,,',
      ',,breakfast,Cola,a can (355 ml),,',
      ',12:15,lunch,Snack cakes,1 packet,0000000000017,"Flour, sugar, sodium aluminum phosphate"',
      '06/03/2024,,cena,Rice,handful,,',
    ].join('\r\n');
    const d = read(csv);
    expect(d.format).toBe('csv');
    expect(d.entries.map((e) => [e.line, e.date, e.time, e.occasion, e.foodText])).toEqual([
      [2, '2024-03-05', '07:30', 'breakfast', 'Toast, white'],
      [3, '2024-03-05', null, 'breakfast', 'Cola'],
      [4, '2024-03-05', '12:15', 'lunch', 'Snack cakes'],
      [5, '2024-03-06', null, 'dinner', 'Rice'],
    ]);
    expect(d.entries[1]?.quantity?.container).toEqual({ amount: 355, unit: 'ml' });
    expect(d.entries[2]?.barcode).toBe('0000000000017');
    expect(d.entries[2]?.ingredients).toContain('sodium aluminum phosphate');
    // "handful" is read as a unit; its grams come from the food class (handful.ts)
    expect(d.entries[3]?.quantityUnreadable).toBe(false);
    expect(d.entries[3]?.quantity?.unit).toBe('handful');
  });

  it('accepts semicolons and Spanish headers', () => {
    const d = read('fecha;comida;alimento;cantidad\n5/3/2024;desayuno;pan;2 rebanadas\n');
    expect(d.entries[0]).toMatchObject({
      date: '2024-03-05',
      occasion: 'breakfast',
      foodText: 'pan',
    });
  });

  it('wrong columns: a clear error naming the expected columns', () => {
    const r = readDiary('name,amount,kcal\nbread,2,160\n', { format: 'csv' });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.issues[0]?.code).toBe('PHL_DIARY_COLUMNS');
      expect(r.issues[0]?.message).toContain('expected columns: date, time, occasion, food');
    }
    // auto-detected as CSV too when two diary columns are present
    const auto = readDiary('date,amount,kcal\n2024-03-05,2,160\n');
    expect(auto.ok).toBe(false);
  });

  it('an unterminated quote is reported with its line', () => {
    const d = read('food,quantity\nbread,1 slice\n"milk,1 cup\ncheese,1 oz\n');
    expect(d.entries).toHaveLength(1);
    expect(d.skipped[0]).toMatchObject({ line: 3, code: 'PHL_DIARY_CSV_QUOTE' });
  });

  it('an empty food cell is skipped and reported', () => {
    const d = read('food,quantity\n,1 slice\nbread,1 slice\n');
    expect(d.skipped).toEqual([
      { line: 2, code: 'PHL_DIARY_NO_FOOD', message: 'the food column is empty' },
    ]);
  });
});

describe('readDiary: ingredient statements in free text (invented demo products)', () => {
  it('an "ingredients:" line is the statement of the entry above it', () => {
    const d = read(
      [
        'Monday',
        'snack: Crunchy oat bites (invented brand) 1 bar',
        'ingredients: oats, sugar, sodium tripolyphosphate, salt',
        'lunch: 2 slices white bread',
        'Ingredientes: harina de trigo, agua, levadura',
        'Ingredientes: fosfato monocálcico',
      ].join('\n'),
    );
    expect(d.entries.map((e) => [e.line, e.foodText, e.ingredients])).toEqual([
      [
        2,
        expect.stringContaining('Crunchy oat bites'),
        'oats, sugar, sodium tripolyphosphate, salt',
      ],
      [4, 'white bread', 'harina de trigo, agua, levadura fosfato monocálcico'],
    ]);
    expect(d.skipped).toEqual([]);
  });

  it('a statement with no entry above it (first line, or after a heading) is reported', () => {
    const d = read('ingredients: sugar\nbread\nTuesday\nIngredients: salt\nmilk\n');
    expect(d.entries.map((e) => [e.foodText, e.ingredients])).toEqual([
      ['bread', null],
      ['milk', null],
    ]);
    expect(d.skipped.map((s) => [s.line, s.code])).toEqual([
      [1, 'PHL_DIARY_INGREDIENTS_ALONE'],
      [4, 'PHL_DIARY_INGREDIENTS_ALONE'],
    ]);
  });

  it('a statement longer than a line may be, up to the ingredient limit, is read', () => {
    // 900 characters: over the 500 of an entry line, under the 5,000 of a statement.
    const long = Array.from({ length: 100 }, (_, i) => `item${String(i).padStart(3, '0')}`).join(
      ', ',
    );
    expect(long.length).toBe(898);
    const d = read(`cake 1 slice\ningredients: ${long}\ningredients: ${'x'.repeat(5_000)}\n`);
    expect(d.entries[0]?.ingredients).toBe(long);
    expect(d.skipped[0]).toMatchObject({ line: 3, code: 'PHL_DIARY_INGREDIENTS_TOO_LONG' });
  });
});

describe('bad input: clear errors or flagged lines, never a throw', () => {
  it('empty file and empty text', () => {
    expect(decodeDiaryBytes(new Uint8Array())).toMatchObject({ ok: false });
    expect(readDiary('   \n\n')).toMatchObject({
      ok: false,
      issues: [{ code: 'PHL_DIARY_EMPTY' }],
    });
    expect(readDiary('food,quantity\n')).toMatchObject({ ok: false });
  });

  it('binary data is refused', () => {
    const bytes = new Uint8Array(4096).map((_, i) => (i * 37) % 256);
    const r = decodeDiaryBytes(bytes);
    expect(r).toMatchObject({ ok: false, issues: [{ code: 'PHL_DIARY_BINARY' }] });
  });

  it('a file larger than the limit is refused whole', () => {
    const r = decodeDiaryBytes(new Uint8Array(DIARY_LIMITS.maxBytes + 1).fill(0x61));
    expect(r).toMatchObject({ ok: false, issues: [{ code: 'PHL_DIARY_TOO_LARGE' }] });
  });

  it('a 10,000-character line is skipped and reported; other lines are read', () => {
    const d = read(`bread\n${'x'.repeat(10_000)}\nmilk\n`);
    expect(d.entries.map((e) => e.foodText)).toEqual(['bread', 'milk']);
    expect(d.skipped[0]).toMatchObject({ line: 2, code: 'PHL_DIARY_LINE_TOO_LONG' });
  });

  it('mixed encodings: a Windows-1252 line inside UTF-8 is read and noted', () => {
    const utf8 = new TextEncoder().encode('jamón serrano\n');
    const latin1 = Uint8Array.from(
      [...'jam', 0xf3, ...'n york\n'].map((c) => (typeof c === 'number' ? c : c.charCodeAt(0))),
    );
    const bytes = new Uint8Array([...utf8, ...latin1]);
    const r = decodeDiaryBytes(bytes);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.text.split('\n').slice(0, 2)).toEqual(['jamón serrano', 'jamón york']);
      expect(r.notes).toEqual([
        {
          line: 2,
          code: 'PHL_DIARY_ENCODING',
          message: 'line is not valid UTF-8; read as Windows-1252 (Latin-1)',
        },
      ]);
    }
  });

  it('UTF-16 with a byte-order mark is decoded', () => {
    const body = 'food\ncafé\n';
    const bytes = new Uint8Array(2 + body.length * 2);
    bytes[0] = 0xff;
    bytes[1] = 0xfe;
    for (let i = 0; i < body.length; i++) bytes[2 + i * 2] = body.charCodeAt(i);
    const r = decodeDiaryBytes(bytes);
    expect(r.ok && r.text).toBe(body);
  });

  it('too many entries is refused whole', () => {
    const r = readDiary('bread\n'.repeat(DIARY_LIMITS.maxEntries + 1));
    expect(r).toMatchObject({ ok: false, issues: [{ code: 'PHL_DIARY_TOO_MANY_ENTRIES' }] });
  });

  it('random junk never throws', () => {
    let seed = 7;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    const alphabet = 'ab1/2½,;"\n\r\t:-()de la 3 cups ,,,""';
    for (let n = 0; n < 300; n++) {
      let s = '';
      for (let i = 0; i < 80; i++) s += alphabet[Math.floor(rnd() * alphabet.length)];
      expect(() => readDiary(s)).not.toThrow();
      expect(() => readDiary(`food,quantity\n${s}`)).not.toThrow();
    }
  });
});
