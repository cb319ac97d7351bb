import { describe, expect, it } from 'vitest';
import { glossaryToCsv, parseGlossaryCsv, patientFacingName } from '../../src/glossary/glossary.js';
import { drinkVolume, isDrink, portionMl } from '../../src/handouts/drinks.js';
import { testFood } from '../helpers/food.js';
import { localNames } from '../../data-import/off-csv.js';

const LANGS = ['en', 'es', 'ar', 'zh-Hans'];

describe('patient-facing food names: which name a handout prints', () => {
  const sources = {
    foodName: 'Beverages, carbonated, cola, regular',
    clinic: { name: 'Refresco de cola', status: 'reviewed' as const },
    tableLanguage: 'Coca-Cola Original',
    starter: 'Refresco de cola (borrador)',
  };
  it('the patient words typed on the row come first', () => {
    expect(patientFacingName('mi refresco', sources, 'es')).toEqual({
      text: 'mi refresco',
      origin: 'patient',
      drafted: false,
      fromTable: false,
    });
  });
  it('then the clinic glossary, the table in the language, the starter (drafted), the table', () => {
    const label = sources.foodName; // the summary's label when no words were typed
    expect(patientFacingName(label, sources, 'es').origin).toBe('clinic');
    expect(patientFacingName(label, { ...sources, clinic: null }, 'es').origin).toBe(
      'table-language',
    );
    const starter = patientFacingName(label, { foodName: label, starter: 'Refresco' }, 'es');
    expect(starter).toMatchObject({ origin: 'starter', drafted: true });
    expect(patientFacingName(label, { foodName: label }, 'es')).toMatchObject({
      origin: 'table',
      fromTable: true,
    });
    // English handouts print the table's English name without the "no name yet" mark.
    expect(patientFacingName(label, { foodName: label }, 'en').fromTable).toBe(false);
    expect(
      patientFacingName(
        label,
        { foodName: label, clinic: { name: 'Cola', status: 'drafted' } },
        'en',
      ).drafted,
    ).toBe(true);
  });
});

describe('food-name CSV (food_source, food_code, language, name, status)', () => {
  it('round-trips quotes, commas and right-to-left names', () => {
    const csv = glossaryToCsv([
      {
        foodId: 1,
        foodSource: 'usda-sr28',
        foodCode: '07008',
        tableName: 'Bologna, beef and pork',
        language: 'ar',
        name: 'مرتديلا "بولونيا", شرائح',
        status: 'drafted',
        origin: 'clinic',
      },
    ]);
    const parsed = parseGlossaryCsv(csv, LANGS);
    expect(parsed).toEqual({
      ok: true,
      value: [
        {
          line: 2,
          foodSource: 'usda-sr28',
          foodCode: '07008',
          language: 'ar',
          name: 'مرتديلا "بولونيا", شرائح',
          status: 'drafted',
        },
      ],
    });
  });

  it('names every bad line and returns nothing from a file with one', () => {
    const r = parseGlossaryCsv(
      [
        'food_source,food_code,language,name,status',
        'usda-sr28,14148,es,Cola,reviewed',
        'usda-sr28,14148,xx,Cola,drafted',
        'usda-sr28,,es,,maybe',
        'usda-sr28,14148,ES,Cola otra vez,drafted',
      ].join('\n'),
      LANGS,
    );
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.issues.map((i) => i.line)).toEqual([3, 4, 5]);
    expect(r.issues[0]?.message).toContain("language 'xx' is not a handout language");
    expect(r.issues[1]?.message).toContain('name is empty');
    expect(r.issues[1]?.message).toContain("status 'maybe'");
    expect(r.issues[2]?.message).toContain('the same food and language as line 2');
  });

  it('refuses a file without the required columns', () => {
    const r = parseGlossaryCsv('code,name\n1,x\n', LANGS);
    expect(r).toEqual({
      ok: false,
      issues: [
        {
          line: 1,
          message: 'the header line lacks the column(s) food_source, food_code, language',
        },
      ],
    });
  });
});

describe('drinks in ml (US customary volumes, NIST Handbook 44 App. C)', () => {
  it('finds drinks by table group or the name head, not foods made from them', () => {
    expect(isDrink({ group: 'Beverages', name: 'Beverages, carbonated, cola, regular' })).toBe(
      true,
    );
    expect(isDrink({ group: 'Dairy and Egg Products', name: 'Milk, whole, 3.25% milkfat' })).toBe(
      true,
    );
    expect(isDrink({ group: 'Dairy and Egg Products', name: 'Yogurt, plain, whole milk' })).toBe(
      false,
    );
    expect(isDrink({ group: 'Dairy and Egg Products', name: 'Cheese, cheddar' })).toBe(false);
    expect(isDrink({ group: 'Fruits and Fruit Juices', name: 'Orange juice, chilled' })).toBe(true);
    expect(isDrink({ group: 'Fruits and Fruit Juices', name: 'Oranges, raw' })).toBe(false);
  });

  it('takes the density from the table: USDA SR28 NDB 14148 cola, 1 fl oz = 30.8 g', () => {
    const cola = testFood({
      group: 'Beverages',
      name: 'Beverages, carbonated, cola, regular',
      portions: [
        { id: 1, description: 'can or bottle (12 fl oz)', amount: 1, grams: 370 },
        { id: 2, description: 'fl oz', amount: 1, grams: 30.8 },
      ],
    });
    // 12 fl oz = 12 x 29.5735 = 354.88 ml; 370 g / 354.88 ml = 1.0426 g/ml (the first volume measure).
    expect(portionMl({ description: 'can or bottle (12 fl oz)' })).toBeCloseTo(354.88, 2);
    const v = drinkVolume(cola);
    expect(v?.assumed).toBe(false);
    expect(v?.gPerMl).toBeCloseTo(1.0426, 4);
    // No volume measure: 1 g/ml assumed (water; common practice, no source) and said so.
    expect(
      drinkVolume(testFood({ group: 'Beverages', name: 'Beverages, tea', portions: [] })),
    ).toEqual({
      gPerMl: 1,
      assumed: true,
    });
  });
});

describe("a table's own names in other languages (Open Food Facts product_name_<lc>)", () => {
  // Invented product row in the export's column layout.
  const cells: Record<string, string> = {
    code: '3000000000001',
    product_name: 'Cola drink',
    product_name_es: 'Refresco de cola',
    product_name_fr: '',
    generic_name_fr: 'Boisson gazeuse',
    product_name_de: 'Cola drink',
    product_name_zh: '可乐',
  };
  const row = {
    header: Object.keys(cells),
    rawHeader: Object.keys(cells),
    fields: Object.values(cells),
    line: 2,
    get: (c: string) => cells[c] ?? '',
  };
  it('keeps the product name per language, the generic name when it is empty, not copies of the main name', () => {
    expect(localNames(row, 'Cola drink')).toEqual([
      ['es', 'Refresco de cola'],
      ['fr', 'Boisson gazeuse'],
      ['zh', '可乐'],
    ]);
  });
});
