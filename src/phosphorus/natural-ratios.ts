/**
 * Natural phosphorus-to-protein ratios (mg P per g protein) of additive-free foods, by class.
 * Used by the excess method: natural P = protein x ratio; additive P = total - natural.
 * Each value names where it comes from; "computed here" means the median of the named
 * USDA SR28 foods (release 28, 2015/2016), recomputed in test/phosphorus/natural-ratios.test.ts.
 */
import type { FoodClass } from './food-class.js';

export interface NaturalRatio {
  ratioMgPerG: number;
  source: string;
}

export const NATURAL_RATIOS_MG_PER_G: Record<FoodClass, NaturalRatio> = {
  meat: {
    ratioMgPerG: 9.3,
    source:
      'additive-free cooked ham, roast turkey and chicken breast, 9.3 +/- 0.7 mg/g (Benini O et al., J Ren Nutr 2011;21:303-308)',
  },
  fish: {
    ratioMgPerG: 9.9,
    source:
      'mean of cod 9.7, halibut 10.7, sockeye salmon 10.1, rainbow trout 11.0, yellowfin tuna 8.2 mg/g ' +
      '(Kalantar-Zadeh K et al., CJASN 2010;5:519-530, Table 1; mean computed here)',
  },
  egg: {
    ratioMgPerG: 15.8,
    source: 'whole egg, raw: 198 mg P / 12.56 g protein (USDA SR28 NDB 01123)',
  },
  cheese: {
    ratioMgPerG: 21.4,
    source:
      'median of natural cheeses cheddar 19.9, Swiss 21.3, mozzarella 16.0, parmesan 22.1, edam 21.4, feta 23.7 mg/g ' +
      '(USDA SR28 NDB 01009, 01040, 01026, 01032, 01018, 01019; computed here)',
  },
  milk: {
    ratioMgPerG: 27.0,
    source:
      'whole milk 26.7 and plain whole-milk yogurt 27.4 mg/g (USDA SR28 NDB 01077, 01116; mean computed here)',
  },
  legume: {
    ratioMgPerG: 19.1,
    source:
      'median of cooked lentils 20.0, chickpeas 19.0, kidney beans 15.9 and raw soybeans 19.3 mg/g (median 19.1) ' +
      '(USDA SR28 NDB 16070, 16057, 16028, 16108; computed here)',
  },
  'grain-whole': {
    ratioMgPerG: 31.2,
    source:
      'median of whole-grain wheat flour 27.0, oats 31.2, brown rice 41.2 mg/g (USDA SR28 NDB 20080, 08120, 20036; computed here)',
  },
  'grain-refined': {
    ratioMgPerG: 13.2,
    source:
      'mean of white flour 10.5 and cooked white rice 16.0 mg/g (USDA SR28 NDB 20081, 20445; computed here)',
  },
  'nut-seed': {
    ratioMgPerG: 22.7,
    source: 'almonds: 481 mg P / 21.15 g protein (USDA SR28 NDB 12061)',
  },
  vegetable: {
    ratioMgPerG: 23.4,
    source: 'raw broccoli: 66 mg P / 2.82 g protein (USDA SR28 NDB 11090)',
  },
  fruit: {
    ratioMgPerG: 42.3,
    source: 'raw apple with skin: 11 mg P / 0.26 g protein (USDA SR28 NDB 09003)',
  },
  beverage: {
    ratioMgPerG: 24.3,
    source: 'raw orange juice: 17 mg P / 0.7 g protein (USDA SR28 NDB 09206)',
  },
  'fat-oil-plant': {
    ratioMgPerG: 20.1,
    source: 'upper end of tissue P, 0.65 mmol (20.1 mg) per g protein (IOM 1997 DRI report, ch. 5)',
  },
  'fat-oil-animal': {
    ratioMgPerG: 20.1,
    source: 'upper end of tissue P, 0.65 mmol (20.1 mg) per g protein (IOM 1997 DRI report, ch. 5)',
  },
  spice: {
    ratioMgPerG: 20.1,
    source: 'upper end of tissue P, 0.65 mmol (20.1 mg) per g protein (IOM 1997 DRI report, ch. 5)',
  },
  sweet: {
    ratioMgPerG: 20.1,
    source: 'upper end of tissue P, 0.65 mmol (20.1 mg) per g protein (IOM 1997 DRI report, ch. 5)',
  },
  mixed: {
    ratioMgPerG: 20.1,
    source:
      'upper end of tissue P in most plant and animal tissues, 0.65 mmol (20.1 mg) per g protein (IOM 1997 DRI report, ch. 5); ' +
      'a ceiling, so the additive share of mixed foods is not overstated',
  },
};

/**
 * Share of a plant food's phosphorus that is phytate-bound, assumed when the table gives no
 * phytate. Used only for the absorbable estimate, never shown as a phytate amount.
 */
export const ASSUMED_PHYTATE_SHARE: Partial<Record<FoodClass, { share: number; source: string }>> =
  {
    legume: {
      share: 0.6,
      source: '46-73% of legume-seed P is phytate (Matyka 1993, quoted secondhand); middle taken',
    },
    'grain-whole': {
      share: 0.67,
      source: '62-73% of cereal-grain P is phytate (Matyka 1993, quoted secondhand); middle taken',
    },
    'grain-refined': {
      share: 0.3,
      source: 'milling removes most bran phytate; 30% assumed (from memory, no source)',
    },
    'nut-seed': {
      share: 0.6,
      source:
        'oilseeds and nuts are phytate-rich (Gupta RK et al., J Food Sci Technol 2015); 60% assumed (from memory)',
    },
    vegetable: { share: 0, source: 'little phytate in most vegetables (from memory)' },
    fruit: { share: 0, source: 'little phytate in fruit (from memory)' },
    beverage: { share: 0, source: 'no phytate assumed in drinks (from memory)' },
    spice: {
      share: 0.3,
      source: 'seeds among spices hold phytate; 30% assumed (from memory, no source)',
    },
    'fat-oil-plant': { share: 0, source: 'refined oils hold no phytate (from memory)' },
  };
