/**
 * Whether a food-table entry is raw, already cooked, or unknown, read from the table's own
 * description, and its preparation class. The one place that holds the rule and its
 * exceptions: an entry already cooked ("cooked, boiled", "simmered", "drained", canned) gets no
 * second preparation factor.
 */
import type { Food } from '../foods/food.js';
import { classifyFood } from '../phosphorus/food-class.js';
import type { PrepClass } from './methods.js';

export type CookedState = 'raw' | 'cooked' | 'unknown';

export interface CookedStateResult {
  state: CookedState;
  /** Why, in a sentence (shown with the food). */
  basis: string;
}

// Cooking words in the table languages the importers read (English, Spanish, French, German,
// Italian, Portuguese): any of them makes the entry cooked.
const COOKED_RE =
  /\b(cooked|boiled|simmered|stewed|braised|poached|steamed|drained|roasted|baked|fried|grilled|broiled|microwaved|blanched|canned|heated|cocid[oa]s?|hervid[oa]s?|cuit[es]?|bouilli[es]?|gekocht|gegart|cott[oa]|bollit[oa]|cozid[oa]s?)\b/i;
const RAW_RE = /\b(raw|uncooked|unprepared|fresh|crud[oa]s?|cru[es]?|roh|frisch|fresc[oa]s?)\b/i;
// Dry pulses, pasta and grains are bought uncooked: "Pasta, dry", "Lentils, raw", "Rice, ... raw".
const DRY_RE = /\b(dry|dried|mature seeds|seco|sec|sèche|trocken|secc[oa])\b/i;

/**
 * Exceptions to the word rule, checked first, each with its reason:
 * - cured, smoked or dried meat and fish are processed, not raw: their state for boiling is
 *   unknown (and their additive phosphorus would not leach anyway);
 * - "frozen, unprepared" vegetables were blanched but count as raw: blanching is brief and the
 *   studies (Vrdoljak 2015) boiled frozen vegetables as bought.
 */
const EXCEPTIONS: { re: RegExp; state: CookedState; reason: string }[] = [
  {
    re: /\b(cured|smoked|jerky|salted and dried|dried and salted|pickled)\b/i,
    state: 'unknown',
    reason: 'cured, smoked or pickled: processed, not raw',
  },
  {
    re: /\bfrozen\b.*\bunprepared\b/i,
    state: 'raw',
    reason: 'frozen and unprepared: blanched only, counted as raw',
  },
];

/**
 * Tables whose entries are all raw edible portions unless the name says otherwise (Indian Food
 * Composition Tables 2017 analyse raw foods: from memory).
 */
const RAW_TABLES = new Set(['ifct2017']);

/** Raw, cooked or unknown from the table's description (see the module comment). */
export function cookedStateOf(food: Pick<Food, 'name' | 'source' | 'group'>): CookedStateResult {
  const text = food.name;
  for (const e of EXCEPTIONS)
    if (e.re.test(text)) return { state: e.state, basis: `the table says "${text}": ${e.reason}` };
  const cooked = COOKED_RE.exec(text);
  if (cooked) return { state: 'cooked', basis: `the table's description says "${cooked[0]}"` };
  const raw = RAW_RE.exec(text) ?? DRY_RE.exec(text);
  if (raw) return { state: 'raw', basis: `the table's description says "${raw[0]}"` };
  if (RAW_TABLES.has(food.source))
    return { state: 'raw', basis: `${food.source} lists raw edible portions` };
  return { state: 'unknown', basis: 'the table does not say whether it is raw or cooked' };
}

const POULTRY_RE = /\b(chicken|turkey|duck|goose|hen|poultry|quail|pollo|poulet|frango|huhn)\b/i;
const TUBER_RE =
  /\b(potato(es)?|sweet ?potato(es)?|yams?|cassava|yuca|taro|dasheen|eddo|malanga|yautia|batata|papa|patata|pomme de terre|kartoffel)\b/i;
const PASTA_RE = /\b(pasta|spaghetti|macaroni|noodles?|lasagna|vermicelli|fideos?|nouilles?)\b/i;
const BOILED_GRAIN_RE =
  /\b(rice|barley|bulgur|millet|quinoa|buckwheat|sorghum|couscous|arroz|riz|reis|riso)\b/i;
const NOT_BOILED_RE =
  /\b(bread|flour|meal|cereal|cracker|cookie|cake|crisp|chips|snack|bran|germ|flakes|puffed|milk|oil|butter|flour|starch|sausage|frankfurter|bologna|salami|pat[eé]|luncheon|juice|sauce|soup)\b/i;

/**
 * The food's preparation class, or null when the table has no factors for it (fruit, dairy,
 * eggs, fats, breads, mixed dishes, sausages and luncheon meats...).
 */
export function prepClassOf(food: Pick<Food, 'name' | 'group'>): PrepClass | null {
  if (food.group === 'Sausages and Luncheon Meats') return null;
  if (NOT_BOILED_RE.test(food.name)) return null;
  const { foodClass } = classifyFood(food);
  switch (foodClass) {
    case 'meat':
      return food.group === 'Poultry Products' || POULTRY_RE.test(food.name) ? 'poultry' : 'meat';
    case 'fish':
      return 'fish';
    case 'legume':
      return 'pulse';
    case 'vegetable':
      return TUBER_RE.test(food.name) ? 'tuber' : 'vegetable';
    case 'grain-whole':
    case 'grain-refined':
      return PASTA_RE.test(food.name) ? 'pasta' : BOILED_GRAIN_RE.test(food.name) ? 'grain' : null;
    default:
      return null;
  }
}
