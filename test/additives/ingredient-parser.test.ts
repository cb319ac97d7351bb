/**
 * Ingredient statements below are invented test data written in the style of real labels,
 * not copied from any product.
 */
import { describe, expect, it } from 'vitest';
import { analyzeIngredients, type AdditiveFinding } from '../../src/additives/ingredient-parser.js';

const codes = (text: string, lang?: string): string[] =>
  analyzeIngredients(text, lang).additives.map((a) => a.code);
const counted = (text: string): string[] =>
  analyzeIngredients(text)
    .additives.filter((a) => a.counted)
    .map((a) => a.code);

function expectSpans(text: string, found: AdditiveFinding[]): void {
  for (const a of found) {
    expect(a.start).toBeGreaterThanOrEqual(0);
    expect(a.end).toBeLessThanOrEqual(text.length);
    expect(text.slice(a.start, a.end)).toBe(a.matchedText);
  }
}

describe('number forms (invented statements)', () => {
  it.each([
    ['emulsifying salts: E339', ['E 339']],
    ['emulsifying salts: E 339', ['E 339']],
    ['emulsifying salt: E-339', ['E 339']],
    ['acidity regulator E339(ii)', ['E 339(ii)']],
    ['acidity regulator E 339 (ii)', ['E 339(ii)']],
    ['raising agent: E 450 i', ['E 450(i)']],
    ['raising agent: E450iii, salt', ['E 450(iii)']],
    ['stabiliser INS 451', ['E 451']],
    ['mineral salts (451, 452)', ['E 451', 'E 452']],
    ['emulsifying salts: E 339, E 452', ['E 339', 'E 452']],
    ['raising agents (E450, E500)', ['E 450']],
    ['INS 451, 452(i)', ['E 451', 'E 452(i)']],
    ['E 450(iv)', ['INS 450(iv)']],
    ['E 452(vi)', ['E 452']], // sub-number not in the catalogue: read as the family
    ['thickener (E1412), E 1442', ['E 1412', 'E 1442']],
    ['E 541, E 542', ['E 541', 'E 542']],
  ])('%s', (text, expected) => {
    const r = analyzeIngredients(text);
    expect(r.additives.map((a) => a.code)).toEqual(expected);
    expectSpans(text, r.additives);
  });

  it('gives the offsets of the number as written', () => {
    const text = 'Pork, water, salt, stabiliser: E 451(i), spices';
    const [a] = analyzeIngredients(text).additives;
    expect(a).toMatchObject({
      code: 'E 451(i)',
      family: '451',
      matchedText: 'E 451(i)',
      start: 31,
      end: 39,
      counted: true,
    });
  });

  it('does not read amounts or other numbers as additives', () => {
    expect(codes('vitamin E 450 mg')).toEqual([]);
    expect(codes('Nutrition: energy 450 kcal, phosphorus 120 mg, protein 3,39 g')).toEqual([]);
    expect(codes('salt 339,5 g')).toEqual([]);
    expect(codes('best before 12.2027, lot 4521')).toEqual([]);
    expect(codes('sugar (450 g), flour')).toEqual([]);
    expect(codes('wheat flour 45%, E 300')).toEqual([]);
    expect(codes('emulsifier: E 471, E 322')).toEqual(['E 322']);
  });
});

describe('names, plurals and word order in six languages (invented statements)', () => {
  it.each([
    // English
    ['en', 'Cultured milk, cheese, water, sodium phosphates, salt', ['E 339']],
    ['en', 'Chicken, water, salt, sodium tripolyphosphate', ['E 451(i)']],
    [
      'en',
      'Carbonated water, sugar, colour (caramel E150d), phosphoric acid, natural flavourings, caffeine',
      ['E 338'],
    ],
    [
      'en',
      'Enriched flour, leavening (baking soda, sodium acid pyrophosphate, monocalcium phosphate)',
      ['E 450(i)', 'E 341(i)'],
    ],
    [
      'en',
      'Turkey, contains 2% or less of: salt, sodium and/or potassium phosphates, dextrose',
      ['E 339', 'E 340'],
    ],
    [
      'en',
      'Creamer: corn syrup solids, vegetable oil, dipotassium phosphate, mono- and diglycerides',
      ['E 340(ii)'],
    ],
    [
      'en',
      'Cheese, water, emulsifying salts (trisodium phosphate, sodium hexametaphosphate)',
      ['E 339(iii)', 'E 452(i)'],
    ],
    [
      'en',
      'Cake mix: sugar, flour, leavening [sodium aluminum phosphate, baking soda], egg',
      ['E 541'],
    ],
    [
      'en',
      'Cereal, tricalcium phosphate, ferric orthophosphate, ferric pyrophosphate',
      ['E 341(iii)', 'ferric orthophosphate', 'ferric pyrophosphate'],
    ],
    // Spanish
    [
      'es',
      'Carne de cerdo, agua, sal, estabilizantes (difosfatos, trifosfatos), dextrosa',
      ['E 450', 'E 451'],
    ],
    ['es', 'Queso, agua, sales fundentes: fosfatos de sodio y polifosfatos', ['E 339', 'E 452']],
    ['es', 'Agua carbonatada, azúcar, acidulante: ácido fosfórico, aromas', ['E 338']],
    [
      'es',
      'Harina, gasificantes (fosfato monocálcico, bicarbonato sódico), fosfato disódico',
      ['E 341(i)', 'E 339(ii)'],
    ],
    // French
    [
      'fr',
      'Jambon de porc, eau, sel, stabilisant : triphosphates, conservateur : nitrite de sodium',
      ['E 451'],
    ],
    [
      'fr',
      'Fromages, eau, sels de fonte : phosphates de sodium, diphosphate disodique',
      ['E 339', 'E 450(i)'],
    ],
    [
      'fr',
      'Farine de blé, poudre à lever (phosphate monocalcique), lécithine de soja',
      ['E 341(i)', 'E 322'],
    ],
    [
      'fr',
      "Eau, sucre, acide phosphorique, arômes, phosphate d'aluminium sodique",
      ['E 338', 'E 541'],
    ],
    // German
    [
      'de',
      'Schweinefleisch, Wasser, Kochsalz, Stabilisatoren: Diphosphate, Natriumphosphate',
      ['E 450', 'E 339'],
    ],
    ['de', 'Käse, Schmelzsalze: Natriumpolyphosphat, Dinatriumphosphat', ['E 452(i)', 'E 339(ii)']],
    ['de', 'Wasser, Zucker, Säuerungsmittel Phosphorsäure, Farbstoff Zuckerkulör', ['E 338']],
    [
      'de',
      'Weizenmehl, Backtriebmittel: Dinatriumdiphosphat, Natriumcarbonate, Emulgator Sojalecithin',
      ['E 450(i)', 'E 322'],
    ],
    // Italian
    [
      'it',
      'Carne di suino, acqua, sale, stabilizzanti: polifosfati, difosfati',
      ['E 452', 'E 450'],
    ],
    ['it', 'Formaggio, acqua, sali di fusione: fosfati di sodio, citrati di sodio', ['E 339']],
    [
      'it',
      'Acqua, zucchero, acidificante: acido fosforico; agenti lievitanti: difosfato disodico',
      ['E 338', 'E 450(i)'],
    ],
    // Portuguese
    [
      'pt',
      'Carne de frango, água, sal, estabilizantes: trifosfatos, fosfato dissódico',
      ['E 451', 'E 339(ii)'],
    ],
    [
      'pt',
      'Queijo, água, sais de fusão (polifosfato de sódio, fosfato trissódico)',
      ['E 452(i)', 'E 339(iii)'],
    ],
    ['pt', 'Água gaseificada, açúcar, acidulante ácido fosfórico, aroma natural', ['E 338']],
  ])('[%s] %s', (lang, text, expected) => {
    const r = analyzeIngredients(text, lang);
    expect(r.additives.map((a) => a.code)).toEqual(expected);
    expectSpans(text, r.additives);
  });

  it('names the finding in the statement language when asked', () => {
    const [a] = analyzeIngredients('fosfato disódico', 'es').additives;
    expect(a?.name).toBe('fosfato disódico');
    expect(analyzeIngredients('fosfato disódico').additives[0]?.name).toMatch(/Disodium phosphate/);
  });
});

describe('label quirks (invented statements)', () => {
  it('handles case, diacritics, hyphenation and line breaks from copied labels', () => {
    expect(codes('SODIUM PHOSPHATES')).toEqual(['E 339']);
    expect(codes('Acido Fosfórico')).toEqual(['E 338']);
    expect(codes('ACIDE PHOSPHORIQUE')).toEqual(['E 338']);
    const broken = 'water, sodium phos-\nphate, salt';
    const r = analyzeIngredients(broken);
    expect(r.additives.map((a) => a.code)).toEqual(['E 339']);
    expect(r.additives[0]?.matchedText).toBe('sodium phos-\nphate');
    expect(codes('water, sodium\r\nphosphate')).toEqual(['E 339']);
    expect(codes('sodium phos\u00adphate')).toEqual(['E 339']);
    expect(codes('E\u2011339, E\u2013450')).toEqual(['E 339', 'E 450']);
  });

  it('handles nested parentheses and brackets', () => {
    const text =
      'Seasoning [salt, spices, (flavour enhancers (disodium inosinate, disodium guanylate)), acidity regulator (E 339(iii))], pork';
    expect(codes(text)).toEqual(['E 631', 'E 627', 'E 339(iii)']);
    expect(counted(text)).toEqual(['E 339(iii)']);
  });

  it('reads hyphenated multiplicity and pharmacopoeia "dibasic" names', () => {
    expect(codes('tri-calcium phosphate, di-sodium phosphate')).toEqual([
      'E 341(iii)',
      'E 339(ii)',
    ]);
    expect(codes('sodium phosphate, dibasic; potassium phosphate monobasic')).toEqual([
      'E 339(ii)',
      'E 340(i)',
    ]);
  });

  it('merges a name with its number written beside it', () => {
    const text = 'disodium phosphate (E339), salt';
    const r = analyzeIngredients(text).additives;
    expect(r.map((a) => a.code)).toEqual(['E 339(ii)']);
    expect(r[0]?.matchedText).toBe('disodium phosphate (E339');
  });

  it('reads the misspelling "phosphorous acid" as phosphoric acid, saying so', () => {
    const [a] = analyzeIngredients('water, phosphorous acid, caffeine').additives;
    expect(a?.code).toBe('E 338');
    expect(a?.reason).toMatch(/misspelt/);
    expect(codes('phosporic acid')).toEqual(['E 338']);
  });

  it('notes but does not count lecithins, starch phosphates and ribonucleotides, with the reason', () => {
    const r = analyzeIngredients(
      "soy lecithin, hydroxypropyl distarch phosphate, disodium 5'-ribonucleotides",
    ).additives;
    expect(r.map((a) => [a.code, a.counted])).toEqual([
      ['E 322', false],
      ['E 1442', false],
      ['E 635', false],
    ]);
    for (const a of r) expect(a.reason).toMatch(/not counted/);
  });

  it('counts unnamed phosphates as an unspecified phosphate', () => {
    const [a] = analyzeIngredients('pork, water, phosphates, salt').additives;
    expect(a).toMatchObject({ code: 'phosphate', family: 'phosphate', counted: true });
  });
});

describe('traps that must not fire (invented statements)', () => {
  it.each([
    'phosphate-free',
    'Phosphate free ham',
    'no added phosphates',
    'No added phosphate or nitrite',
    'without phosphates',
    'free from phosphates and artificial colours',
    'sans phosphates ajoutés',
    'sin fosfatos añadidos',
    'senza polifosfati aggiunti',
    'sem fosfatos adicionados',
    'ohne zugesetzte Phosphate',
    'phosphatfrei',
    'frei von Phosphaten',
    'Nutrition facts: phosphorus 120 mg, potassium 300 mg',
    'Phosphorus: 120 mg (17% NRV)',
    'Phosphate 120 mg per 100 g',
    'alkaline phosphatase negative',
    'phosphorescent ink, phospholipids naturally present',
    'phosphatidylserine',
    "pyridoxal 5'-phosphate",
    'sodium ascorbyl phosphate',
    'Philosophy of flavour: fossil-free, foster farms',
    'E number list: E 300, E 330, E 471',
    'emulsifying salts: sodium citrates',
  ])('%s', (text) => {
    expect(codes(text)).toEqual([]);
  });

  it('"no more than 2%" is an amount, not a denial; a claim far before the additive does not hide it', () => {
    expect(codes('Pork, water, contains no more than 2% of salt, sodium phosphate')).toEqual([
      'E 339',
    ]);
    expect(codes('Cerdo, agua, sin más de 2% de sal, fosfatos de sodio')).toEqual(['E 339']);
    expect(codes('No added sugar, salt, sodium phosphate')).toEqual(['E 339']);
  });

  it('a negation covers its own clause only', () => {
    expect(codes('No added sugar. Ingredients: pork, salt, sodium phosphate')).toEqual(['E 339']);
    expect(codes('no preservatives; stabiliser: diphosphates')).toEqual(['E 450']);
  });

  it('returns empty results for empty and odd input', () => {
    expect(analyzeIngredients('').additives).toEqual([]);
    expect(analyzeIngredients('   \n\t ').additives).toEqual([]);
    expect(analyzeIngredients(undefined as unknown as string).additives).toEqual([]);
    expect(analyzeIngredients('🥩 pork, E339 💧').additives.map((a) => a.code)).toEqual(['E 339']);
  });
});
