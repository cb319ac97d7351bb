/**
 * Phosphorus model: the ingredient analyser in statements per second on one core, against a bare
 * regular-expression scan of the same statements; and the source split for every USDA SR28
 * food, against a bare loop computing only the P:protein ratio. Goals: >= 20,000 typical
 * statements/s; split of all SR28 foods < 1 s.
 */
import { analyzeIngredients } from '../../src/additives/ingredient-parser.js';
import type { Food } from '../../src/foods/food.js';
import { profileFood } from '../../src/phosphorus/profile.js';
import { hasSr28 } from '../helpers/shared.js';
import { loadAllSr28Foods } from '../helpers/sr28.js';
import type { BenchSection } from './sections.js';
import { fmt } from './stats.js';

// Invented label pieces; a statement is 8-16 of them, about one in three carries phosphates.
const PLAIN = [
  'water',
  'sugar',
  'wheat flour (wheat flour, calcium carbonate, iron, niacin, thiamin)',
  'salt',
  'rapeseed oil',
  'glucose syrup',
  'skimmed milk powder',
  'yeast',
  'natural flavouring',
  'spices (paprika, pepper, nutmeg)',
  'modified maize starch',
  'emulsifier: mono- and diglycerides of fatty acids',
  'acidity regulator: citric acid',
  'preservative: potassium sorbate',
  'colour: paprika extract',
  'cocoa butter',
  'whey powder (milk)',
  'dextrose',
  'pork (72%)',
  'vinegar',
  'garlic powder',
  'contains 2% or less of: salt, sugar',
  'antioxidant: sodium ascorbate',
  'agua',
  'azúcar',
  'harina de trigo',
  'sal',
  'Wasser',
  'Zucker',
  'Speisesalz',
  'farine de blé',
  'sel',
  'eau',
];
const PHOS = [
  'emulsifying salts: E 339, E 452',
  'raising agents (E450, E500)',
  'stabiliser: sodium triphosphate',
  'phosphoric acid',
  'disodium phosphate',
  'Diphosphate',
  'fosfatos de sodio',
  'polifosfati',
  'E 341(i)',
  'sodium acid pyrophosphate',
  'sels de fonte : phosphates de sodium',
  'no added phosphates',
];

function makeStatements(n: number): string[] {
  let seed = 12345;
  const rnd = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return seed / 2147483648;
  };
  const out: string[] = [];
  for (let i = 0; i < n; i++) {
    const k = 8 + Math.floor(rnd() * 9);
    const parts: string[] = [];
    for (let j = 0; j < k; j++) parts.push(PLAIN[Math.floor(rnd() * PLAIN.length)] as string);
    if (rnd() < 0.35)
      parts.splice(
        Math.floor(rnd() * parts.length),
        0,
        PHOS[Math.floor(rnd() * PHOS.length)] as string,
      );
    out.push(parts.join(', '));
  }
  return out;
}

function rate(fn: (s: string) => unknown, statements: string[], minMs = 1500): number {
  let count = 0;
  let sink = 0;
  const t0 = performance.now();
  while (performance.now() - t0 < minMs) {
    for (const s of statements) {
      const r = fn(s);
      if (r) sink++;
    }
    count += statements.length;
  }
  const seconds = (performance.now() - t0) / 1000;
  if (sink < 0) console.log(sink);
  return count / seconds;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] as number;
}

export const phosphorusBench: BenchSection = {
  name: 'phosphorus',
  title: 'ingredient analyser statements/s (goal >= 20,000) and the SR28 source split (goal < 1 s)',
  async run() {
    const statements = makeStatements(2000);
    const avgChars = statements.reduce((a, s) => a + s.length, 0) / statements.length;
    const bare = /phosph|fosf|\bE\s?-?\d{3}/gi;
    rate((s) => analyzeIngredients(s).additives.length, statements, 300); // warm-up
    const baseline = rate((s) => s.match(bare)?.length ?? 0, statements);
    const analyser = rate((s) => analyzeIngredients(s).additives.length, statements);
    console.log(`   statements: ${statements.length} invented, mean ${fmt(avgChars)} characters`);
    console.log(
      `   analyser:   ${fmt(analyser)} statements/s (goal >= 20,000: ${analyser >= 20000 ? 'met' : 'NOT met'})`,
    );
    console.log(
      `   bare regex: ${fmt(baseline)} statements/s; analyser takes ${fmt(baseline / analyser, 1)}x the regex time`,
    );

    if (!hasSr28) {
      console.log('   USDA SR28 not found beside the checkout: split benchmark skipped');
      return;
    }
    const foods: Food[] = [...loadAllSr28Foods().values()];
    const splitMs: number[] = [];
    const bareMs: number[] = [];
    let sink = 0;
    for (let round = 0; round < 5; round++) {
      let t0 = performance.now();
      for (const f of foods)
        sink += f.per100g.proteinG ? (f.per100g.phosphorusMg ?? 0) / f.per100g.proteinG : 0;
      bareMs.push(performance.now() - t0);
      t0 = performance.now();
      for (const f of foods) sink += profileFood(f).absorbableMg?.typical ?? 0;
      splitMs.push(performance.now() - t0);
    }
    if (sink < 0) console.log(sink);
    const s = median(splitMs);
    console.log(
      `   split of ${fmt(foods.length)} SR28 foods: median ${fmt(s, 1)} ms of 5 (goal < 1,000 ms: ${s < 1000 ? 'met' : 'NOT met'})`,
    );
    console.log(
      `   bare ratio loop: ${fmt(median(bareMs), 2)} ms; the split costs ${fmt((s / foods.length) * 1000, 1)} us per food`,
    );
  },
};
