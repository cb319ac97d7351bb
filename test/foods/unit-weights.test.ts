import { describe, expect, it } from 'vitest';
import { typicalUnit } from '../../src/foods/unit-weights.js';

// Names as grams-only tables write them (invented copies of IFCT 2017 style names); the weights
// are USDA SR28 household measures of the same foods, named in each source.
describe('typical unit weights for foods whose table gives grams only', () => {
  it.each([
    ['Egg, poultry, whole, boiled', 'egg', 50, 'NDB 01123'],
    ['Egg, poultry, white, raw', 'egg white', 33, 'NDB 01124'],
    ['Chapati, whole wheat', 'piece', 68, 'NDB 28306'],
    ['Banana, ripe, robusta', 'banana', 118, 'NDB 09040'],
    ['Bread, white', 'slice', 29, 'NDB 18069'],
  ])('%s: 1 %s = %d g (%s)', (name, unit, grams, source) => {
    const t = typicalUnit(name);
    expect(t).toMatchObject({ unit, grams });
    expect(t?.source).toContain(`USDA SR28 ${source}`);
  });

  it('answers only the kind of unit asked, and nothing for foods it has no weight for', () => {
    expect(typicalUnit('Bread, white', 'count')).toBeNull();
    expect(typicalUnit('Egg noodles, cooked')).toBeNull();
    expect(typicalUnit('Apple juice')).toBeNull();
    expect(typicalUnit('Dal, red gram')).toBeNull();
  });
});
