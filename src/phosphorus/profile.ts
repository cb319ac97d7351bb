/**
 * Where a food's phosphorus comes from (organic animal, organic plant with phytate, additive),
 * how much of it is absorbable, and its phosphorus-to-protein ratio. Pure: plain data in and out.
 *
 * Methods, strongest first:
 *  (a) 'ingredient-statement': the food's statement names counted phosphate additives; additive P
 *      is the excess of total P over the natural P expected from its protein and class;
 *  (b) 'generic-rule': a table food whose name and group match a rule for typically
 *      additive-containing foods; same excess method, the rule is the evidence;
 *  (c) 'food-group': all organic, animal or plant by the food's class;
 *  'unknown': mixed dishes and foods whose class cannot be read, said plainly.
 */
import { analyzeIngredients, type IngredientAnalysis } from '../additives/ingredient-parser.js';
import type { Food } from '../foods/food.js';
import {
  absorbableMg,
  DEFAULT_ABSORPTION_FRACTIONS,
  type AbsorptionFractions,
  type PhosphorusBySourceMg,
} from './absorption.js';
import { CLASS_ORIGIN, classifyFood, type FoodClass } from './food-class.js';
import { matchingGenericRules, type GenericAdditiveRule } from './generic-rules.js';
import { ASSUMED_PHYTATE_SHARE, NATURAL_RATIOS_MG_PER_G } from './natural-ratios.js';
import { PHYTIC_ACID_P_FRACTION } from './phytate.js';
import {
  MIN_PROTEIN_FOR_RATIO_G,
  NO_PROTEIN_BAND,
  phosphorusProteinRatioMgPerG,
  ratioBandFor,
} from './ratio.js';

export type SplitMethod = 'ingredient-statement' | 'generic-rule' | 'food-group' | 'unknown';

export interface PhosphorusProfile {
  // all amounts mg per 100 g edible portion
  totalMg: number | null;
  organicAnimalMg: number | null;
  organicPlantMg: number | null;
  phytateMg: number | null;
  additiveMg: number | null; // null = unknown
  method: SplitMethod;
  evidence: string[];
  absorbableMg: { low: number; typical: number; high: number } | null; // null only if totalMg null
  ratioMgPerG: number | null;
  ratioBand: string | null;
  additiveLikely: boolean; // counted phosphate additives found or a generic-food rule fired
  additiveEvidentFromName: boolean; // the food's own name says so (e.g. "with phosphate", "processed cheese")
}

export interface ProfileOptions {
  /**
   * The stored scan of the food's ingredient statement (from the import); when absent and the
   * food has a statement, the statement is analysed here.
   */
  additiveScan?: IngredientAnalysis | null;
}

const NAME_SAYS_ADDITIVE_RE =
  /pasteuri[sz]ed process|process(ed)? cheese|with (added )?phosphates?|phosphates? added|with added solution|baking powder/i;

function fmtMg(x: number): string {
  return x >= 100
    ? x.toFixed(0)
    : x >= 10
      ? x.toFixed(1)
      : x.toFixed(2).replace(/\.?0+$/, '') || '0';
}

function fmtG(x: number): string {
  return x.toFixed(x >= 10 ? 1 : 2).replace(/\.?0+$/, '') || '0';
}

/** Phosphorus profile per 100 g of a food (see the module comment for the methods). */
export function profileFood(
  food: Food,
  fractions: AbsorptionFractions = DEFAULT_ABSORPTION_FRACTIONS,
  options: ProfileOptions = {},
): PhosphorusProfile {
  const totalMg = food.per100g.phosphorusMg;
  const proteinG = food.per100g.proteinG;
  const evidence: string[] = [];
  const nameScan = analyzeIngredients(food.name);
  const additiveEvidentFromName =
    nameScan.additives.some((a) => a.counted) || NAME_SAYS_ADDITIVE_RE.test(food.name);

  const ratioMgPerG = phosphorusProteinRatioMgPerG(totalMg, proteinG);
  let ratioBand: string | null = null;
  if (ratioMgPerG !== null) ratioBand = ratioBandFor(ratioMgPerG).id;
  else if (totalMg !== null && proteinG !== null && proteinG < MIN_PROTEIN_FOR_RATIO_G)
    ratioBand = NO_PROTEIN_BAND;

  if (totalMg === null) {
    evidence.push(
      `The table (${food.source}) gives no phosphorus value for this food: nothing can be estimated.`,
    );
    return {
      totalMg: null,
      organicAnimalMg: null,
      organicPlantMg: null,
      phytateMg: null,
      additiveMg: null,
      method: 'unknown',
      evidence,
      absorbableMg: null,
      ratioMgPerG,
      ratioBand,
      additiveLikely: false,
      additiveEvidentFromName,
    };
  }

  evidence.push(
    `Total phosphorus ${fmtMg(totalMg)} mg per 100 g` +
      (proteinG !== null ? `, protein ${fmtG(proteinG)} g per 100 g` : ', protein not given') +
      ` (${food.source}${food.sourceRelease ? ` ${food.sourceRelease}` : ''} ${food.code}).`,
  );

  const cls = classifyFood(food);
  let method: SplitMethod;
  let additiveLikely = false;
  let excessClass: FoodClass | null = null;
  let allAdditive = false;

  // (a) ingredient statement
  let scan: IngredientAnalysis | null = null;
  if (options.additiveScan !== undefined && options.additiveScan !== null)
    scan = options.additiveScan;
  else if (food.ingredients && food.ingredients.trim().length > 0)
    scan = analyzeIngredients(food.ingredients, food.ingredientsLanguage);

  let rules: GenericAdditiveRule[] = [];
  if (scan !== null) {
    method = 'ingredient-statement';
    const counted = scan.additives.filter((a) => a.counted);
    const noted = scan.additives.filter((a) => !a.counted);
    if (counted.length > 0) {
      additiveLikely = true;
      excessClass = cls.foodClass;
      // An acidulated drink (phosphoric acid, E 338): the acid is the phosphorus source, so a
      // trace protein value does not keep part of it "natural" (as the cola rule below).
      if (cls.foodClass === 'beverage' && counted.some((a) => a.family === '338')) {
        allAdditive = true;
      }
      evidence.push(
        `Ingredient statement names counted phosphate additives: ${unique(counted.map((a) => `${a.code} ("${a.matchedText}")`)).join(', ')}.`,
      );
    } else {
      evidence.push(
        'Ingredient statement names no counted phosphate additive: all phosphorus taken as natural (organic).',
      );
    }
    if (noted.length > 0)
      evidence.push(
        `Also named, not counted (organic phosphate esters, starch phosphates or lecithins, small amounts): ${unique(noted.map((a) => a.code)).join(', ')}.`,
      );
  } else {
    rules = matchingGenericRules(food);
    if (rules.length > 0) {
      method = 'generic-rule';
      additiveLikely = true;
      const first = rules[0] as GenericAdditiveRule;
      excessClass = first.classOverride ?? cls.foodClass;
      allAdditive = rules.some((r) => r.allAdditive === true);
      for (const r of rules)
        evidence.push(
          `Likely additive phosphorus: ${r.description} (rule "${r.id}"; ${r.source}).`,
        );
    } else {
      method = CLASS_ORIGIN[cls.foodClass] === 'mixed' ? 'unknown' : 'food-group';
    }
  }

  let naturalMg = totalMg;
  // A mixed dish with no statement and no rule: whether it holds additives is not known.
  let additiveMg: number | null = method === 'unknown' ? null : 0;
  if (excessClass !== null) {
    if (allAdditive) {
      naturalMg = 0;
      additiveMg = totalMg;
      evidence.push(
        'No natural phosphorus expected in this product: all of it is taken as additive phosphorus.',
      );
    } else if (proteinG === null) {
      naturalMg = totalMg;
      additiveMg = null;
      evidence.push(
        'Protein is not given, so the additive share cannot be estimated: the split is unknown.',
      );
    } else {
      const nat = NATURAL_RATIOS_MG_PER_G[excessClass];
      const expected = proteinG * nat.ratioMgPerG;
      naturalMg = Math.min(totalMg, expected);
      additiveMg = totalMg - naturalMg;
      if (proteinG < MIN_PROTEIN_FOR_RATIO_G) {
        evidence.push(
          `Essentially no protein (${fmtG(proteinG)} g): natural phosphorus ${fmtMg(naturalMg)} mg at most, so ` +
            `${fmtMg(additiveMg)} mg is taken as additive phosphorus.`,
        );
      } else {
        evidence.push(
          `Natural phosphorus expected from protein: ${fmtG(proteinG)} g x ${nat.ratioMgPerG} mg/g = ${fmtMg(expected)} mg ` +
            `(natural P:protein ratio of additive-free ${excessClass} foods: ${nat.source}). ` +
            (additiveMg > 0
              ? `Excess ${fmtMg(totalMg)} - ${fmtMg(naturalMg)} = ${fmtMg(additiveMg)} mg is taken as additive phosphorus.`
              : 'The total is not above it, so no additive phosphorus is estimated despite the evidence of additives.'),
        );
      }
    }
  }

  // Natural part: animal or plant by class.
  const originClass = excessClass ?? cls.foodClass;
  const origin = CLASS_ORIGIN[originClass];
  let organicAnimalMg: number | null = null;
  let organicPlantMg: number | null = null;
  let phytateMg: number | null = null;
  const amounts: PhosphorusBySourceMg = {
    animalOrganicMg: 0,
    plantNonPhytateMg: 0,
    phytateMg: 0,
    additiveMg: additiveMg ?? 0,
    unknownMg: 0,
  };
  if (additiveMg === null) {
    amounts.unknownMg = totalMg;
    amounts.additiveMg = 0;
    if (method === 'unknown')
      evidence.push(
        `Mixed or unclassified food (${cls.basis}), no ingredient statement and no additive rule: ` +
          'the split into animal, plant and additive phosphorus is unknown; the absorbable estimate uses the fractions for an unknown split.',
      );
  } else if (origin === 'animal') {
    organicAnimalMg = naturalMg;
    organicPlantMg = 0;
    phytateMg = 0;
    amounts.animalOrganicMg = naturalMg;
    evidence.push(`Natural phosphorus taken as organic animal phosphorus (${cls.basis}).`);
  } else if (origin === 'plant') {
    organicAnimalMg = 0;
    organicPlantMg = naturalMg;
    // `phytateMg` of a food is phytic acid, mg per 100 g (INFOODS tag PHYTAC, as the importers store it).
    const phyticAcidMg = food.per100g.phytateMg;
    if (phyticAcidMg !== null) {
      const fromPhytate = phyticAcidMg * PHYTIC_ACID_P_FRACTION;
      phytateMg = Math.min(naturalMg, fromPhytate);
      amounts.phytateMg = phytateMg;
      amounts.plantNonPhytateMg = naturalMg - phytateMg;
      evidence.push(
        `Natural phosphorus taken as organic plant phosphorus (${cls.basis}); phytate P = phytic acid ${fmtMg(phyticAcidMg)} mg x ` +
          `${PHYTIC_ACID_P_FRACTION.toFixed(4)} (P fraction of C6H18O24P6, IUPAC 2021 atomic weights) = ${fmtMg(fromPhytate)} mg` +
          (fromPhytate > naturalMg ? ', capped at the plant phosphorus' : '') +
          '.',
      );
    } else {
      const assumed = ASSUMED_PHYTATE_SHARE[originClass];
      const share = assumed?.share ?? 0;
      amounts.phytateMg = naturalMg * share;
      amounts.plantNonPhytateMg = naturalMg - amounts.phytateMg;
      evidence.push(
        `Natural phosphorus taken as organic plant phosphorus (${cls.basis}). The table gives no phytate` +
          (share > 0
            ? `; for the absorbable estimate ${Math.round(share * 100)}% of it is assumed phytate-bound (${assumed?.source ?? ''}).`
            : assumed
              ? `; none is assumed phytate-bound (${assumed.source}).`
              : '.'),
      );
    }
  } else {
    amounts.unknownMg = naturalMg;
    evidence.push(
      `Mixed food (${cls.basis}): whether its natural phosphorus is animal or plant is unknown; ` +
        'the absorbable estimate uses the fractions for an unknown split.',
    );
  }

  const abs = absorbableMg(amounts, fractions);
  evidence.push(
    `Absorbable phosphorus ${fmtMg(abs.low)}-${fmtMg(abs.high)} mg (typical ${fmtMg(abs.typical)} mg): each source x its absorbed fraction.`,
  );
  if (ratioMgPerG !== null) {
    const band = ratioBandFor(ratioMgPerG);
    evidence.push(
      `Phosphorus-to-protein ratio ${ratioMgPerG.toFixed(1)} mg/g: ${band.label} (${band.note}).`,
    );
  } else if (ratioBand === NO_PROTEIN_BAND) {
    evidence.push('Phosphorus-to-protein ratio: undefined, the food has no protein.');
  } else {
    evidence.push('Phosphorus-to-protein ratio: unknown, protein is not given.');
  }
  if (additiveEvidentFromName) evidence.push('The food name itself indicates added phosphate.');

  return {
    totalMg,
    organicAnimalMg,
    organicPlantMg,
    phytateMg,
    additiveMg,
    method,
    evidence,
    absorbableMg: abs,
    ratioMgPerG,
    ratioBand,
    additiveLikely,
    additiveEvidentFromName,
  };
}

function unique(xs: string[]): string[] {
  return [...new Set(xs)];
}

/** A per-100 g profile scaled to an amount eaten, in grams (ratios and bands do not change). */
export function scaleProfile(p: PhosphorusProfile, grams: number): PhosphorusProfile {
  const f = grams / 100;
  const s = (x: number | null): number | null => (x === null ? null : x * f);
  return {
    ...p,
    totalMg: s(p.totalMg),
    organicAnimalMg: s(p.organicAnimalMg),
    organicPlantMg: s(p.organicPlantMg),
    phytateMg: s(p.phytateMg),
    additiveMg: s(p.additiveMg),
    absorbableMg: p.absorbableMg
      ? {
          low: p.absorbableMg.low * f,
          typical: p.absorbableMg.typical * f,
          high: p.absorbableMg.high * f,
        }
      : null,
    evidence: [...p.evidence, `Amounts scaled from per 100 g to ${grams} g.`],
  };
}
