// Sources: unit definitions per NIST Handbook 44 Appendix C (from memory: 1 lb = 453.59237 g,
// 1 oz = 28.349523125 g, 1 US cup = 236.5882365 ml); gram weights of household measures from
// USDA SR28 WEIGHT; the diary phrases themselves are invented demo data.
import { describe, expect, it } from 'vitest';
import {
  GRAMS_PER_LB,
  GRAMS_PER_OZ,
  ML_PER_CUP,
  parseQuantity,
  quantityToGrams,
  splitQuantity,
  type MeasuredFood,
} from '../../src/diary/quantity.js';

function q(text: string) {
  const r = parseQuantity(text);
  if (!r.ok) throw new Error(`${text}: ${r.issues.join('; ')}`);
  return r.value;
}

describe('parseQuantity: numbers (digits, decimals, fractions, words)', () => {
  it.each([
    ['2', 2, null],
    ['250g', 250, 'g'],
    ['250 g', 250, 'g'],
    ['1.5 cups', 1.5, 'cup'],
    ['1,5 tazas', 1.5, 'cup'], // comma decimal
    ['1,000 ml', 1000, 'ml'], // comma + 3 digits groups thousands (documented rule)
    ['1/2 cup', 0.5, 'cup'],
    ['½ cup', 0.5, 'cup'],
    ['1 ½ cups', 1.5, 'cup'],
    ['1½ cups', 1.5, 'cup'],
    ['1 1/2 cups', 1.5, 'cup'],
    ['¾ cup', 0.75, 'cup'],
    ['two slices', 2, 'slice'],
    ['half a cup', 0.5, 'cup'],
    ['a half cup', 0.5, 'cup'],
    ['one and a half cups', 1.5, 'cup'],
    ['three quarters cup', 0.75, 'cup'],
    ['a dozen', 12, null],
    ['a couple of slices', 2, 'slice'],
    ['dos rebanadas', 2, 'slice'],
    ['media taza', 0.5, 'cup'],
    ['medio vaso', 0.5, 'cup'],
    ['una taza y media', 1.5, 'cup'],
    ['a cup and a half', 1.5, 'cup'],
  ])('%s -> %d %s', (text, amount, unit) => {
    const v = q(text);
    expect(v.amount).toBeCloseTo(amount, 10);
    expect(v.unit).toBe(unit);
  });

  it('Spanish "uno y medio" and "dos y media" are 1.5 and 2.5', () => {
    expect(q('uno y medio vasos').amount).toBe(1.5);
    expect(q('dos y media tazas').amount).toBe(2.5);
  });
});

describe('parseQuantity: ranges are taken at their midpoint (documented rule)', () => {
  it.each([
    ['2-3 slices', 2, 3],
    ['2 - 3 slices', 2, 3],
    ['2–3 slices', 2, 3],
    ['2 to 3 slices', 2, 3],
    ['2 or 3 slices', 2, 3],
    ['2 o 3 rebanadas', 2, 3],
    ['dos a tres rebanadas', 2, 3],
    ['1/2-1 cup', 0.5, 1],
  ])('%s -> range %d-%d, amount the midpoint', (text, low, high) => {
    const v = q(text);
    expect(v.range).toEqual({ low, high });
    // midpoint: (low + high) / 2
    expect(v.amount).toBeCloseTo((low + high) / 2, 10);
  });
});

describe('parseQuantity: units', () => {
  it.each([
    ['1 kg', 'kg'],
    ['3 oz', 'oz'],
    ['1 lb', 'lb'],
    ['200 ml', 'ml'],
    ['1 l', 'l'],
    ['1 litro', 'l'],
    ['8 fl oz', 'fl oz'],
    ['8 fl. oz.', 'fl oz'],
    ['2 fluid ounces', 'fl oz'],
    ['1 cup', 'cup'],
    ['2 tbsp', 'tbsp'],
    ['2 tbsp.', 'tbsp'],
    ['1 cucharada', 'tbsp'],
    ['1 tsp', 'tsp'],
    ['1 cucharadita', 'tsp'],
    ['1 slice', 'slice'],
    ['1 piece', 'piece'],
    ['1 can', 'can'],
    ['1 lata', 'can'],
    ['1 bottle', 'bottle'],
    ['1 packet', 'packet'],
    ['1 bowl', 'bowl'],
    ['1 serving', 'serving'],
    ['1 ración', 'serving'],
  ])('%s -> %s', (text, unit) => {
    expect(q(text).unit).toBe(unit);
  });

  it('"a can (355 ml)" keeps the stated container size', () => {
    const v = q('a can (355 ml)');
    expect(v.amount).toBe(1);
    expect(v.unit).toBe('can');
    expect(v.container).toEqual({ amount: 355, unit: 'ml' });
  });

  it('a word that is not a unit is kept as the food measure ("1 large")', () => {
    const v = q('1 large');
    expect(v.unit).toBeNull();
    expect(v.measureText).toBe('large');
  });

  it.each(['', 'some', 'lots!!', '0 g', '-', '-100 g', '2 cups and a bit more than that'])(
    'flags %j as not understood',
    (text) => {
      const r = parseQuantity(text);
      expect(r.ok).toBe(false);
    },
  );
});

describe('splitQuantity: quantity and food in one line of free text', () => {
  it.each([
    ['2 slices white toast', 2, 'slice', 'white toast'],
    ['a can (355 ml) of cola', 1, 'can', 'cola'],
    ['un vaso de leche', 1, 'cup', 'leche'],
    ['2 large eggs', 2, null, 'large eggs'],
    ['milk 200 ml', 200, 'ml', 'milk'],
    ['toast, 2 slices', 2, 'slice', 'toast'],
    ['yogurt (150 g)', 150, 'g', 'yogurt'],
    ['half a cup of rice', 0.5, 'cup', 'rice'],
  ])('%s', (text, amount, unit, food) => {
    const s = splitQuantity(text);
    expect(s.quantity?.amount).toBe(amount);
    expect(s.quantity?.unit).toBe(unit);
    expect(s.foodText).toBe(food);
  });

  it('leaves a line without a quantity alone ("Milk, 2% fat")', () => {
    expect(splitQuantity('Milk, 2% fat')).toEqual({ quantity: null, foodText: 'Milk, 2% fat' });
    expect(splitQuantity('banana').quantity).toBeNull();
  });
});

// Measures as in USDA SR28 WEIGHT.txt for NDB 18069 (bread, white), 01123 (egg, whole, raw)
// and 01077 (milk, whole): slice 29 g / 25 g, large 50 g, cup 244 g, fl oz 30.5 g.
const bread: MeasuredFood = {
  servingG: null,
  portions: [
    { id: 1, amount: 1, description: 'slice', grams: 29 },
    { id: 2, amount: 1, description: 'oz', grams: 28.35 },
    { id: 3, amount: 1, description: 'cup, crumbs', grams: 45 },
    { id: 4, amount: 1, description: 'slice, large', grams: 30 },
  ],
};
const egg: MeasuredFood = {
  servingG: null,
  portions: [
    { id: 1, amount: 1, description: 'large', grams: 50 },
    { id: 2, amount: 1, description: 'extra large', grams: 56 },
    { id: 3, amount: 1, description: 'cup (4.86 large eggs)', grams: 243 },
    { id: 4, amount: 1, description: 'medium', grams: 44 },
  ],
};
const milk: MeasuredFood = {
  servingG: null,
  portions: [
    { id: 1, amount: 1, description: 'cup', grams: 244 },
    { id: 2, amount: 1, description: 'fl oz', grams: 30.5 },
  ],
};
const noMeasures: MeasuredFood = { servingG: null, portions: [] };

describe('quantityToGrams (measures: USDA SR28 WEIGHT.txt; unit definitions: NIST Handbook 44 App. C)', () => {
  it('mass units convert exactly', () => {
    // 3 oz x 28.349523125 g = 85.05 g -> 85.0 (one decimal)
    expect(quantityToGrams(q('3 oz'), bread).grams).toBe(85);
    // 1 lb = 453.59237 g -> 453.6
    expect(quantityToGrams(q('1 lb'), bread).grams).toBe(453.6);
    expect(GRAMS_PER_OZ * 16).toBeCloseTo(GRAMS_PER_LB, 10);
    expect(quantityToGrams(q('1,5 kg'), bread).grams).toBe(1500);
  });

  it('slices use the food table: 2 slices x 29 g = 58 g', () => {
    const r = quantityToGrams(q('2 slices'), bread);
    expect(r).toMatchObject({ grams: 58, method: 'household-measure', assumed: false });
  });

  it('a named size picks that measure: 2 large eggs x 50 g = 100 g; 1 medium = 44 g', () => {
    expect(quantityToGrams(q('2'), egg, ['large', 'eggs']).grams).toBe(100);
    expect(quantityToGrams(q('1 medium'), egg).grams).toBe(44);
  });

  it('a range counts its midpoint: 2-3 slices = 2.5 x 29 g = 72.5 g', () => {
    expect(quantityToGrams(q('2-3 slices'), bread).grams).toBe(72.5);
  });

  it('cups use the table cup: 1/2 cup milk = 0.5 x 244 g = 122 g', () => {
    expect(quantityToGrams(q('1/2 cup'), milk).grams).toBe(122);
  });

  it('ml use the density of the table measure: 200 ml x (244 g / 236.588 ml) = 206.3 g', () => {
    // 244 / 236.5882365 = 1.03133 g/ml; x 200 = 206.27 -> 206.3
    expect(quantityToGrams(q('200 ml'), milk).grams).toBe(206.3);
  });

  it('"a can (355 ml)" of a food without density is 355 g at 1 g/ml, said in the note', () => {
    const r = quantityToGrams(q('a can (355 ml)'), noMeasures);
    expect(r.grams).toBe(355);
    expect(r.note).toContain('1 g/ml');
  });

  it('a can without a table measure uses the generic 355 ml can, marked assumed', () => {
    const r = quantityToGrams(q('1 can'), noMeasures);
    expect(r).toMatchObject({ grams: 355, method: 'generic-size', assumed: true });
  });

  it('no quantity: the first table measure, marked assumed', () => {
    expect(quantityToGrams(null, bread)).toMatchObject({
      grams: 29,
      method: 'default-portion',
      assumed: true,
    });
    expect(quantityToGrams(null, noMeasures)).toMatchObject({ grams: 100, assumed: true });
  });

  it('a cup of a food with no measures is 236.6 ml at 1 g/ml', () => {
    expect(ML_PER_CUP).toBeCloseTo(236.5882365, 7);
    expect(quantityToGrams(q('1 cup'), noMeasures).grams).toBe(236.6);
  });
});

describe('handfuls, negative amounts, servings in grams and typical unit weights', () => {
  it.each(['2 handfuls', '2 handfulls', '2 handfull', '2 puñados', '2 poignées'])(
    '%s is 2 of the unit "handful"',
    (text) => {
      expect(q(text)).toMatchObject({ amount: 2, unit: 'handful' });
    },
  );

  it('a negative amount is called negative, never "no amount"', () => {
    expect(splitQuantity('-100 g rice')).toEqual({
      quantity: null,
      foodText: 'rice',
      negative: '-100 g',
    });
    const r = parseQuantity('-2 slices');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0]).toContain('negative');
  });

  it('"grams 1 serving" is one serving of that weight, not items of 1 g', () => {
    // USDA SR28 NDB 07029 Ham, sliced, regular: "grams 1 serving" Amount 56, 56 g; "slice" 28 g
    const ham: MeasuredFood = {
      name: 'Ham, sliced, regular (approximately 11% fat)',
      servingG: null,
      portions: [{ id: 1, amount: 56, description: 'grams 1 serving', grams: 56 }],
    };
    // no slice measure in this copy: the typical slice of ham (28 g, NDB 07029) x 2 = 56 g
    expect(quantityToGrams(q('2 slices'), ham)).toMatchObject({
      grams: 56,
      method: 'typical-unit',
      assumed: true,
    });
    // no amount written: one serving of 56 g, not 1 g
    expect(quantityToGrams(null, ham).grams).toBe(56);
  });

  it('a food with grams only gets the typical unit weight, with its source', () => {
    // an IFCT 2017 style food: no household measures (invented copy of the name)
    const egg: MeasuredFood = { name: 'Egg, hen, whole, boiled', servingG: null, portions: [] };
    // USDA SR28 NDB 01123 Egg, whole, raw, fresh: 1 large = 50 g; 2 x 50 = 100 g
    const r = quantityToGrams(q('2'), egg);
    expect(r).toMatchObject({ grams: 100, method: 'typical-unit', assumed: true });
    expect(r.note).toContain('USDA SR28 NDB 01123');
  });
});
