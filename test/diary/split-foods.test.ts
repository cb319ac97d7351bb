import { describe, expect, it } from 'vitest';
import { splitFoodParts, splitFoods } from '../../src/diary/split-foods.js';

// Invented diary lines (invented demo data).
describe('one diary line, several foods: split on connectors in the ten handout languages', () => {
  it.each([
    [
      '2 slices white bread with 1 slice of cheese singles',
      ['2 slices white bread', '1 slice of cheese singles'],
    ],
    ['coffee with non-dairy creamer', ['coffee', 'non-dairy creamer']],
    ['eggs, bacon and toast', ['eggs', 'bacon', 'toast']],
    ['rice + dal', ['rice', 'dal']],
    ['toast & jam', ['toast', 'jam']],
    ['2 eggs, 1 slice toast', ['2 eggs', '1 slice toast']],
    ['pan con queso', ['pan', 'queso']], // es
    ['arroz y frijoles', ['arroz', 'frijoles']], // es
    ['pain et fromage', ['pain', 'fromage']], // fr
    ['arroz com feijão e ovo', ['arroz', 'feijão', 'ovo']], // pt
    ['хлеб с сыром', ['хлеб', 'сыром']], // ru
    ['kanin at itlog', ['kanin', 'itlog']], // tl
    ['cơm với trứng', ['cơm', 'trứng']], // vi
    ['米饭和鸡蛋', ['米饭', '鸡蛋']], // zh
    ['दाल और चावल', ['दाल', 'चावल']], // hi
    ['خبز مع جبن', ['خبز', 'جبن']], // ar
  ])('%s', (line, foods) => {
    expect(splitFoods(line)).toEqual(foods);
  });

  it.each([
    'macaroni and cheese 1 cup',
    'mac and cheese',
    'café con leche',
    'galletas con chispas de chocolate',
    'oatmeal made with water',
    'chicken with skin',
    'big burger with cheese',
    '1 and a half cups rice',
    '2 y 3 galletas',
    'chicken breast, roasted, 120 g',
    'Cheese, cheddar',
    'Milk, 2% fat',
    '1,5 kg rice',
    'pizza at home',
  ])('keeps one food whole: %s', (line) => {
    expect(splitFoods(line)).toEqual([line]);
  });

  it('marks a food written "with" another as added to it', () => {
    expect(splitFoodParts('toast with butter and jam')).toEqual([
      { text: 'toast', added: false },
      { text: 'butter', added: true },
      { text: 'jam', added: false },
    ]);
  });
});
