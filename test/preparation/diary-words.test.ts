import { describe, expect, it } from 'vitest';
import { DEFAULT_ABSORPTION_FRACTIONS as F } from '../../src/phosphorus/absorption.js';
import { profileFood } from '../../src/phosphorus/profile.js';
import { cookingWordIn, diaryPreparation } from '../../src/preparation/diary-words.js';
import { testFood } from '../helpers/food.js';

describe('cooking words in diary lines (invented diary lines)', () => {
  it('finds "boiled" in the handout languages', () => {
    const lines: [string, string][] = [
      ['2 boiled potatoes', 'boiled'],
      ['pollo hervido', 'hervido'],
      ['pommes de terre bouillies', 'bouillies'],
      ['batata cozida', 'cozida'],
      ['nilagang baka', 'nilagang'],
      ['thịt gà luộc', 'luộc'],
      ['отварной картофель', 'отварной'],
      ['水煮鸡肉', '水煮'],
      ['उबला आलू', 'उबला'],
      ['البطاطس المسلوقة', 'المسلوقة'],
    ];
    for (const [text, word] of lines) expect(cookingWordIn(text), text).toBe(word);
  });
  it('never counts soup or broth as drained, and ignores other words', () => {
    expect(cookingWordIn('boiled chicken soup')).toBeNull();
    expect(cookingWordIn('caldo de pollo hervido')).toBeNull();
    expect(cookingWordIn('鸡汤 水煮')).toBeNull();
    expect(cookingWordIn('roast chicken')).toBeNull();
    expect(cookingWordIn('broiled fish')).toBeNull();
  });
  it('applies boiled and drained to a raw entry only', () => {
    // invented demo food: raw chicken, P 200 mg, protein 20 g per 100 g
    const raw = testFood({
      name: 'Chicken, breast, raw',
      group: 'Poultry Products',
      per100g: { phosphorusMg: 200, proteinG: 20 },
    });
    const r = diaryPreparation('pollo hervido', raw, profileFood(raw, F), F, 100);
    // poultry shrinks, so the diary's 100 g are taken as cooked: 100 / 0.77 g raw x 2 mg/g x 0.63
    // (Cupisti 2006) = 163.6 mg
    expect(r?.item).toEqual({ preparation: 'boil-drain', weightBasis: 'plate' });
    expect(Math.round((r?.amounts?.phosphorusMg?.typical ?? 0) * 10) / 10).toBe(163.6);
    const cooked = testFood({
      name: 'Chicken, breast, cooked, stewed',
      group: 'Poultry Products',
      per100g: { phosphorusMg: 180 },
    });
    const c = diaryPreparation('boiled chicken', cooked, profileFood(cooked, F), F, 100);
    expect(c?.item).toBeNull();
    expect(c?.finding).toMatch(/already cooked: no second factor/);
    const egg = testFood({
      name: 'Egg, whole, raw',
      group: 'Dairy and Egg Products',
      per100g: { phosphorusMg: 198 },
    });
    expect(diaryPreparation('boiled egg', egg, profileFood(egg, F), F, 50)).toBeNull();
  });
});
