import type { Food, Portion } from '../foods/food.js';
import { classifyFood } from '../phosphorus/food-class.js';
import { ML_PER_CUP, ML_PER_FL_OZ, ML_PER_TBSP, ML_PER_TSP } from '../diary/quantity.js';

/** How a drink's grams turn into millilitres on a handout. */
export interface DrinkVolume {
  /** Density, g per ml. */
  gPerMl: number;
  /** true when the table has no volume measure and 1 g/ml is assumed (water). */
  assumed: boolean;
}

// US customary volumes (NIST Handbook 44 App. C), as the diary's quantity parser uses them.
const VOLUME_WORDS: [RegExp, number][] = [
  [/\bfl oz\b/, ML_PER_FL_OZ],
  [/^cups?\b/, ML_PER_CUP],
  [/^(tbsp|tablespoons?)\b/, ML_PER_TBSP],
  [/^(tsp|teaspoons?)\b/, ML_PER_TSP],
  [/^ml\b/, 1],
  [/^(l|liter|litre)\b/, 1000],
];

const LIQUID_NAME =
  /\b(milk|juice|drink|beverage|fluid|shake|smoothie|soda|tea|coffee|water|beer|wine|lemonade|cocktail|soymilk|nectar|lassi|buttermilk)\b/i;
const NOT_LIQUID =
  /\b(powder|dry|dried|dehydrated|condensed|cheese|solids|concentrate, frozen|bar)\b/i;

/** Whether the food is drunk (a handout gives it in ml rather than grams). */
export function isDrink(food: Pick<Food, 'group' | 'name'>): boolean {
  if (NOT_LIQUID.test(food.name) && !/prepared with/i.test(food.name)) return false;
  const cls = classifyFood(food).foodClass;
  if (cls === 'beverage') return true;
  // Elsewhere only when the name's head says so ("Milk, whole", "Orange juice"; not "Yogurt, ... milk").
  const head = food.name.split(',')[0] ?? food.name;
  return (cls === 'milk' || cls === 'mixed' || cls === 'fruit') && LIQUID_NAME.test(head);
}

/** The volume in ml of one unit of a household measure, when the measure is a volume. */
export function portionMl(p: Pick<Portion, 'description'>): number | null {
  const d = p.description.toLowerCase();
  const fl = /\((\d+(?:\.\d+)?)\s*fl oz\)/.exec(d);
  if (fl) return Number(fl[1]) * ML_PER_FL_OZ;
  for (const [re, ml] of VOLUME_WORDS) if (re.test(d)) return ml;
  return null;
}

/** A drink's density from its own volume measures, else 1 g/ml marked assumed; null if not a drink. */
export function drinkVolume(food: Pick<Food, 'group' | 'name' | 'portions'>): DrinkVolume | null {
  if (!isDrink(food)) return null;
  for (const p of food.portions) {
    const ml = portionMl(p);
    if (ml === null || ml <= 0) continue;
    const gramsPerUnit = p.amount > 0 ? p.grams / p.amount : p.grams;
    return { gPerMl: gramsPerUnit / ml, assumed: false };
  }
  return { gPerMl: 1, assumed: true };
}
