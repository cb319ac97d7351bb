import { z } from 'zod';
import type { Food } from '../foods/food.js';
import { applicableMethods, sourcesText } from './apply.js';
import { cookedStateOf } from './cooked-state.js';
import { PREPARATION_METHODS, type FactorRange } from './methods.js';

const range = z.object({ low: z.number(), typical: z.number(), high: z.number() });

/** The preparation fields of a food in the JSON contract (`foods show --json`, GET /api/foods/:id). */
export const foodPreparationJsonSchema = z.object({
  cookedState: z
    .enum(['raw', 'cooked', 'unknown'])
    .describe("read from the table's own description; only raw entries take a preparation"),
  cookedStateBasis: z.string(),
  preparations: z
    .array(
      z.object({
        method: z.string(),
        label: z.string(),
        prepClass: z.string(),
        factors: z
          .object({
            phosphorus: range,
            potassium: range,
            sodium: range,
            calcium: range,
            protein: range,
          })
          .describe('retained fractions (true retention), low/typical/high'),
        yield: range.describe('plate grams per gram as the table lists it'),
        sources: z.array(z.string()),
      }),
    )
    .describe('methods that apply to this food; empty when none does (cooked or unknown entries)'),
});
export type FoodPreparationJson = z.infer<typeof foodPreparationJsonSchema>;

const plain = (r: FactorRange) => ({ low: r.low, typical: r.typical, high: r.high });

/** `{cookedState, cookedStateBasis, preparations}` for a food. */
export function toFoodPreparationJson(food: Food): FoodPreparationJson {
  const state = cookedStateOf(food);
  return {
    cookedState: state.state,
    cookedStateBasis: state.basis,
    preparations: applicableMethods(food).map((m) => ({
      method: m.method,
      label: PREPARATION_METHODS[m.method].label,
      prepClass: m.prepClass,
      factors: {
        phosphorus: plain(m.factors.phosphorus),
        potassium: plain(m.factors.potassium),
        sodium: plain(m.factors.sodium),
        calcium: plain(m.factors.calcium),
        protein: plain(m.factors.protein),
      },
      yield: plain(m.yield),
      sources: sourcesText(m.factors, m.yield),
    })),
  };
}
