import { describe, expect, it } from 'vitest';
import { DUTCH_LABEL_NAMES, findByCode } from '../../src/additives/catalogue.js';
import { analyzeIngredients } from '../../src/additives/ingredient-parser.js';

const codes = (text: string) => analyzeIngredients(text).additives.map((a) => a.code);

describe('Dutch label names (Regulation (EC) No 1333/2008 Annex II, Dutch version; from memory)', () => {
  it('every Dutch name in the catalogue is read as its own entry', () => {
    for (const [code, names] of Object.entries(DUTCH_LABEL_NAMES)) {
      expect(findByCode(code), code).toBeDefined();
      for (const name of names) expect(codes(`water, ${name}, zout`), name).toEqual([code]);
    }
  });
});

// Label-style statements, invented (not copied from any product), one per language; the
// expected codes follow the catalogue (EU numbers from Regulation (EC) No 1333/2008 Annex II).
const LABELS: [string, string, string[]][] = [
  [
    'nl',
    'Ingrediënten: varkensvlees (85%), water, zout, stabilisator (difosfaten, trifosfaten), natriumfosfaat, antioxidant (natriumascorbaat).',
    ['E 450', 'E 451', 'E 339'],
  ],
  [
    'nl',
    'Ingrediënten: tarwebloem, suiker, rijsmiddelen (dinatriumdifosfaat, natriumwaterstofcarbonaat), monocalciumfosfaat, zout.',
    ['E 450(i)', 'E 341(i)'],
  ],
  [
    'nl',
    'Ingrediënten: water, suiker, koolzuur, kleurstof E150d, zuurteregelaar: fosforzuur, aroma, cafeïne.',
    ['E 338'],
  ],
  [
    'de',
    'Zutaten: Schweinefleisch, Wasser, Nitritpökelsalz, Stabilisatoren: Diphosphate, Triphosphate; Dinatriumphosphat.',
    ['E 450', 'E 451', 'E 339(ii)'],
  ],
  [
    'fr',
    'Ingrédients : fromages, eau, sels de fusion : polyphosphates de sodium, phosphate disodique.',
    ['E 452(i)', 'E 339(ii)'],
  ],
  [
    'es',
    'Ingredientes: carne de cerdo, agua, sal, estabilizantes (E-450, E-451), fosfato trisódico.',
    ['E 450', 'E 451', 'E 339(iii)'],
  ],
  [
    'it',
    'Ingredienti: acqua, zucchero, anidride carbonica, colorante E150d, acidificante: acido fosforico.',
    ['E 338'],
  ],
  [
    'pt',
    'Ingredientes: farinha de trigo, açúcar, levedantes (difosfato dissódico, carbonato ácido de sódio).',
    ['E 450(i)'],
  ],
  ['en', 'Ingredients: chicken breast, water, salt, sodium tripolyphosphate.', ['E 451(i)']],
];

// Languages without listed names: the stem rule reports "unspecified phosphate" (code "phosphate").
const STEM_LABELS: [string, string, number][] = [
  ['pl', 'Składniki: mięso wieprzowe, woda, sól, stabilizatory: difosforany, trifosforany.', 2],
  ['sv', 'Ingredienser: fläskkött, vatten, salt, stabiliseringsmedel (difosfater).', 1],
  ['fi', 'Ainesosat: sianliha, vesi, suola, stabilointiaine (natriumfosfaatit).', 1],
  ['hu', 'Összetevők: sertéshús, víz, só, stabilizátor (nátrium-foszfátok).', 1],
];

describe('label text in eleven languages (invented label-style statements)', () => {
  it.each(LABELS)('%s: %s', (_lang, text, expected) => {
    expect(codes(text)).toEqual(expected);
  });

  it.each(STEM_LABELS)('%s (no listed names): %s', (_lang, text, n) => {
    const found = analyzeIngredients(text).additives;
    expect(found.map((a) => a.code)).toEqual(new Array(n).fill('phosphate'));
    for (const a of found) {
      expect(a.counted).toBe(true);
      expect(a.reason).toMatch(/stem rule: .* \(unspecified phosphate\)/);
    }
  });

  it('the stem rule leaves the element, enzymes, phospholipids and "phosphate-free" alone', () => {
    expect(codes('Wartość odżywcza: fosfor 120 mg')).toEqual([]);
    expect(codes('Voedingswaarde: fosfor 120 mg. Fosfaatvrij.')).toEqual([]);
    expect(codes('alkaline phosphatase; fosfolipiden van nature aanwezig')).toEqual([]);
  });
});
