/**
 * Coarse food classes used by the phosphorus split: whether the food's protein and phosphorus
 * are animal or plant, and which natural phosphorus-to-protein ratio applies.
 * Read from the table's food group (USDA SR28 group names first, keywords for other tables),
 * then from the food's own name.
 */
import type { Food } from '../foods/food.js';

export type FoodClass =
  | 'meat'
  | 'fish'
  | 'egg'
  | 'cheese'
  | 'milk'
  | 'legume'
  | 'grain-whole'
  | 'grain-refined'
  | 'nut-seed'
  | 'vegetable'
  | 'fruit'
  | 'beverage'
  | 'fat-oil-plant'
  | 'fat-oil-animal'
  | 'spice'
  | 'sweet'
  | 'mixed';

export type Origin = 'animal' | 'plant' | 'mixed';

export const CLASS_ORIGIN: Record<FoodClass, Origin> = {
  meat: 'animal',
  fish: 'animal',
  egg: 'animal',
  cheese: 'animal',
  milk: 'animal',
  'fat-oil-animal': 'animal',
  legume: 'plant',
  'grain-whole': 'plant',
  'grain-refined': 'plant',
  'nut-seed': 'plant',
  vegetable: 'plant',
  fruit: 'plant',
  beverage: 'plant',
  'fat-oil-plant': 'plant',
  spice: 'plant',
  sweet: 'mixed',
  mixed: 'mixed',
};

const WHOLE_GRAIN_RE =
  /whole[- ]?(grain|wheat|meal)|\bbran\b|\boats?\b|oatmeal|brown rice|rice, brown|\brye\b|buckwheat|bulgur|millet|quinoa|barley|sorghum|amaranth|germ\b|integral|complet|vollkorn|integrale/i;
const ANIMAL_FAT_RE =
  /\b(butter|lard|tallow|suet|fish oil|oil, fish|cod liver|ghee|chicken fat|beef fat|duck fat|schmaltz)\b/i;
const MILKY_DRINK_RE = /\b(milk|whey|protein|eggnog|yogurt|kefir|latte|cocoa.*milk|with milk)\b/i;

/** SR28 food group names (FD_GROUP.txt) -> class, or a function of the name. */
const SR28_GROUPS: Record<string, FoodClass | ((name: string) => FoodClass)> = {
  'Dairy and Egg Products': (n) =>
    /^egg|\begg(s)?\b.*(white|yolk|whole|substitute)|^eggs?,/i.test(n)
      ? 'egg'
      : /^cheese|cheese,|cheese spread|cheese food|cheese product/i.test(n)
        ? 'cheese'
        : /^butter/i.test(n)
          ? 'fat-oil-animal'
          : 'milk',
  'Spices and Herbs': 'spice',
  'Baby Foods': 'mixed',
  'Fats and Oils': (n) => (ANIMAL_FAT_RE.test(n) ? 'fat-oil-animal' : 'fat-oil-plant'),
  'Poultry Products': 'meat',
  'Soups, Sauces, and Gravies': 'mixed',
  'Sausages and Luncheon Meats': 'meat',
  'Breakfast Cereals': (n) => (WHOLE_GRAIN_RE.test(n) ? 'grain-whole' : 'grain-refined'),
  'Fruits and Fruit Juices': 'fruit',
  'Pork Products': 'meat',
  'Vegetables and Vegetable Products': 'vegetable',
  'Nut and Seed Products': 'nut-seed',
  'Beef Products': 'meat',
  Beverages: (n) => (MILKY_DRINK_RE.test(n) ? 'mixed' : 'beverage'),
  'Finfish and Shellfish Products': 'fish',
  'Legumes and Legume Products': 'legume',
  'Lamb, Veal, and Game Products': 'meat',
  'Baked Products': (n) => (WHOLE_GRAIN_RE.test(n) ? 'grain-whole' : 'grain-refined'),
  Sweets: 'sweet',
  'Cereal Grains and Pasta': (n) => (WHOLE_GRAIN_RE.test(n) ? 'grain-whole' : 'grain-refined'),
  'Fast Foods': 'mixed',
  'Meals, Entrees, and Side Dishes': 'mixed',
  Snacks: 'mixed',
  'American Indian/Alaska Native Foods': 'mixed',
  'Restaurant Foods': 'mixed',
};

// Keyword fallback for other tables' group names and for foods without a group (checked in order).
const KEYWORDS: [RegExp, FoodClass | ((name: string) => FoodClass)][] = [
  [
    /dish|meal|mixed|fast food|restaurant|soup|sauce|baby|infant|snack|entree|recipe|composite/i,
    'mixed',
  ],
  [/cheese|fromage|queso|formaggio|k[äa]se|queijo/i, 'cheese'],
  [/\begg|oeuf|huevo|uovo|\bei(er)?\b|ovo/i, 'egg'],
  [/milk|dairy|yog|cream|lait|leche|latte|milch|leite/i, 'milk'],
  [/fish|seafood|shellfish|poisson|pescado|pesce|fisch|peixe|mollus|crustac/i, 'fish'],
  [
    /meat|beef|pork|lamb|mutton|veal|poultry|chicken|turkey|game|sausage|viande|carne|fleisch|offal/i,
    'meat',
  ],
  [/legume|pulse|bean|lentil|pea\b|peas\b|soy|l[ée]gum|legum/i, 'legume'],
  [/nut|seed|noix|nuez|frutta secca|n[üu]sse/i, 'nut-seed'],
  [
    /cereal|grain|bread|bak|pasta|rice|flour|c[ée]r[ée]al|pan\b|pain\b|brot|millet/i,
    (n) => (WHOLE_GRAIN_RE.test(n) ? 'grain-whole' : 'grain-refined'),
  ],
  [/vegetable|l[ée]gume|verdura|gem[üu]se|hortali|tuber|root|leafy/i, 'vegetable'],
  [/fruit|fruta|frutta|obst/i, 'fruit'],
  [
    /beverage|drink|boisson|bebida|bevand|getr[äa]nk|juice|water/i,
    (n) => (MILKY_DRINK_RE.test(n) ? 'mixed' : 'beverage'),
  ],
  [
    /fat|oil|graisse|grasa|grassi|fett|[óo]leo/i,
    (n) => (ANIMAL_FAT_RE.test(n) ? 'fat-oil-animal' : 'fat-oil-plant'),
  ],
  [/spice|herb|condiment|[ée]pice|especia|spezie|gew[üu]rz/i, 'spice'],
  [/sweet|sugar|confection|sucre|az[úu]car|zucchero|zucker|candy|chocolate/i, 'sweet'],
];

function resolve(c: FoodClass | ((name: string) => FoodClass), name: string): FoodClass {
  return typeof c === 'function' ? c(name) : c;
}

export interface FoodClassResult {
  foodClass: FoodClass;
  /** How the class was found, for the evidence list. */
  basis: string;
}

/** The food's class from its table group, or its name when the group says nothing. */
export function classifyFood(food: Pick<Food, 'group' | 'name'>): FoodClassResult {
  const group = food.group ?? '';
  const sr = SR28_GROUPS[group];
  if (sr) return { foodClass: resolve(sr, food.name), basis: `food group "${group}"` };
  if (group) {
    for (const [re, c] of KEYWORDS)
      if (re.test(group))
        return { foodClass: resolve(c, food.name), basis: `food group "${group}"` };
  }
  for (const [re, c] of KEYWORDS)
    if (re.test(food.name))
      return { foodClass: resolve(c, food.name), basis: `food name "${food.name}"` };
  return {
    foodClass: 'mixed',
    basis: group ? `food group "${group}" (not recognised)` : 'no food group',
  };
}
