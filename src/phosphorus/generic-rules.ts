/**
 * Rules for generic (table) foods that typically contain phosphate additives although the table
 * gives no ingredient statement. A rule that fires marks the food "additive likely" and the
 * split uses the excess method. Each rule names its source.
 */
import type { Food } from '../foods/food.js';
import type { FoodClass } from './food-class.js';

export interface GenericAdditiveRule {
  id: string;
  /** Plain words for the evidence list. */
  description: string;
  source: string;
  /** Class whose natural ratio the excess method uses when the food's own class is not apt. */
  classOverride?: FoodClass;
  /** The whole of the phosphorus is additive (no natural phosphorus expected). */
  allAdditive?: boolean;
  matches(food: Pick<Food, 'name' | 'group'>): boolean;
}

const EU_ANNEX_II = 'Regulation (EC) No 1333/2008 Annex II';

export const GENERIC_ADDITIVE_RULES: readonly GenericAdditiveRule[] = Object.freeze([
  {
    id: 'cola-phosphoric-acid',
    description: 'cola and pepper-type soft drinks are acidified with phosphoric acid (E 338)',
    source:
      `E 338 as the acidulant of colas (${EU_ANNEX_II}, flavoured drinks); soft drinks among the top sources of added P ` +
      '(Fulgoni K, Fulgoni VL, Nutrients 2021;13:2249); Kalantar-Zadeh K et al., CJASN 2010;5:519-530',
    classOverride: 'beverage',
    // A trace protein value (0.07 g in USDA SR28 NDB 14400) would otherwise keep some of the
    // phosphorus "natural": the acid is the source, so all of it is taken as additive.
    allAdditive: true,
    matches: (f) => {
      // The maker's name ("THE COCA-COLA COMPANY, ...") is not the drink.
      const name = f.name.replace(/(the )?coca-cola( company| compan\w*)?,?/gi, ' ');
      return (
        /\bcolas?\b|pepper-type|pepper type|\bdr\.? pepper/i.test(name) &&
        !/other than cola|kola nut/i.test(name)
      );
    },
  },
  {
    id: 'processed-cheese',
    description:
      'processed cheese, cheese spreads and cheese foods are made with emulsifying salts (phosphates, citrates)',
    source:
      `emulsifying salts E 339, E 340, E 450-452 in processed cheese (${EU_ANNEX_II}, food category 01.7.5); ` +
      'cheese the top source of added P in US adults (Fulgoni 2021)',
    classOverride: 'cheese',
    matches: (f) =>
      /pasteuri[sz]ed process|process(ed)? cheese|cheese (food|spread|product|sauce|dip)|cheese,? (food|spread|product)|imitation cheese|american cheese|cheese, american/i.test(
        f.name,
      ) && !/from recipe|homemade|crackers?/i.test(f.name),
  },
  {
    id: 'enhanced-meat',
    description: 'enhanced (injected) meat and poultry carry phosphate brines',
    source:
      'Sherman RA, Mehta O, CJASN 2009;4:1370-1373 (enhanced meat and poultry: mean P:protein 28% higher, up to ~100%); ' +
      'Benini O et al., J Ren Nutr 2011;21:303-308',
    classOverride: 'meat',
    matches: (f) =>
      /with added solution|added solution|\benhanced\b|injected|self-basting|\bbasted\b|water added|solution added|\bbrined?\b|marinated|\btumbled\b/i.test(
        f.name,
      ),
  },
  {
    id: 'cured-processed-meat',
    description:
      'cured and processed meats (ham, luncheon meats, sausages) usually contain phosphates',
    source:
      'packaged meat: 65% of best-selling items had P additives (Leon JB et al., J Ren Nutr 2013;23:265-270); ' +
      'cooked ham, turkey and chicken breast with declared phosphates (Benini 2011)',
    classOverride: 'meat',
    matches: (f) =>
      (f.group === 'Sausages and Luncheon Meats' ||
        /\bcured\b|luncheon|bologna|frankfurter|hot ?dog|bratwurst|kielbasa|knackwurst|sausage|\bdeli\b|\bspam\b|turkey roll|chicken roll|\bham,? (sliced|chopped|minced|canned)|pastrami|corned beef|liverwurst|braunschweiger|(chicken|turkey|fish|meat)\b.*\bnuggets?\b|\bsurimi\b|imitation crab/i.test(
          f.name,
        )) &&
      !/\bfresh\b/i.test(f.name) &&
      f.group !== 'Legumes and Legume Products',
  },
  {
    id: 'baking-powder',
    description:
      'baking powder is made of leavening acids such as monocalcium phosphate and sodium acid pyrophosphate',
    source: `E 341(i), E 450(i), E 541 as raising agents (${EU_ANNEX_II}); composition of double-acting baking powder from memory`,
    allAdditive: true,
    matches: (f) => /baking powder/i.test(f.name),
  },
  {
    id: 'leavened-mix-dough',
    description:
      'baking mixes, refrigerated doughs and chemically leavened baked goods use phosphate leavening acids',
    source:
      'dry mixes 70% and bread/bakery 57% of items with P additives (Leon 2013); cakes, pies, rolls, cookies among top ' +
      'sources of added P (Fulgoni 2021)',
    classOverride: 'grain-refined',
    matches: (f) =>
      /\bmix\b|\bmixes\b|\bdough\b|refrigerated|biscuits?\b|pancakes?|waffles?|muffins?|\bcakes?\b|cornbread|doughnuts?|scones?|brownies?|cookies?|quick bread|sweet rolls?|danish/i.test(
        f.name,
      ) &&
      /Baked Products|Sweets|Snacks/i.test(f.group ?? 'Baked Products') &&
      !/\byeast\b|rice cakes?/i.test(f.name),
  },
  {
    id: 'frozen-prepared',
    description:
      'frozen prepared meals, pizzas and breaded products often contain phosphate additives',
    source: 'frozen prepared foods: 72% of best-selling items had P additives (Leon 2013)',
    matches: (f) =>
      /\bfrozen\b/i.test(f.name) &&
      /Fast Foods|Meals, Entrees, and Side Dishes|Restaurant Foods|Poultry Products|Finfish and Shellfish Products|Baked Products/i.test(
        f.group ?? '',
      ) &&
      /meal|entree|dinner|pizza|breaded|nuggets|patties|patty|sticks|lasagna|burrito|pot pie|waffle|pancake/i.test(
        f.name,
      ),
  },
  {
    id: 'instant-pudding-creamer',
    description: 'instant puddings and non-dairy creamers are set or stabilised with phosphates',
    source:
      'disodium phosphate / tetrasodium diphosphate in instant puddings and dipotassium phosphate in creamers (from memory)',
    matches: (f) =>
      /pudding.*instant|instant.*pudding|creamer|whitener/i.test(f.name) &&
      f.group !== 'Fats and Oils',
  },
]);

/** Rules that fire for a food, in the order above. */
export function matchingGenericRules(food: Pick<Food, 'name' | 'group'>): GenericAdditiveRule[] {
  return GENERIC_ADDITIVE_RULES.filter((r) => r.matches(food));
}
