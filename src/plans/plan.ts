import { z } from 'zod';
import type { Food } from '../foods/food.js';
import { applicability, conservativeBasis, type WeightBasis } from '../preparation/apply.js';
import { PREPARATION_METHOD_IDS, type PreparationMethodId } from '../preparation/methods.js';

/** Items heavier than this in one line are refused as typing errors (common practice, no source). */
export const MAX_ITEM_GRAMS = 5000;

const itemInputSchema = z
  .object({
    foodId: z.number().int().positive('foodId must be a positive whole number'),
    grams: z
      .number({ error: 'grams must be a number' })
      .positive('grams must be greater than 0')
      .max(MAX_ITEM_GRAMS, `grams must be at most ${MAX_ITEM_GRAMS} (5 kg) in one item`)
      .optional(),
    measure: z
      .object({
        portionId: z.number().int().positive(),
        count: z
          .number({ error: 'count must be a number' })
          .positive('count must be greater than 0')
          .max(100, 'count must be at most 100'),
      })
      .strict()
      .optional(),
    /** The patient's own words for the item, in their language. */
    label: z.string().trim().min(1).max(120).nullable().optional(),
    /** How the food is prepared (a method id of the preparation table); none = as the table lists it. */
    preparation: z
      .enum(PREPARATION_METHOD_IDS, {
        error: `preparation must be one of ${PREPARATION_METHOD_IDS.join(', ')}`,
      })
      .nullable()
      .optional(),
    /**
     * Which weight the grams (or measure) are: 'table' = the food as its table lists it (raw),
     * 'plate' = cooked on the plate. Only read with a preparation; when left out, the reading that
     * gives the larger amounts is used.
     */
    weightBasis: z.enum(['table', 'plate']).optional(),
  })
  .strict()
  .superRefine((it, ctx) => {
    if ((it.grams === undefined) === (it.measure === undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['grams'],
        message:
          'give either grams or a household measure (measure.portionId and measure.count), not both',
      });
    }
  });

const occasionInputSchema = z
  .object({
    name: z.string().trim().min(1, 'occasion name is required').max(60),
    kind: z.enum(['meal', 'snack']).optional(),
    time: z
      .string()
      .regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'time must be HH:MM (24 h)')
      .nullable()
      .optional(),
    items: z.array(itemInputSchema).max(60),
  })
  .strict();

const dayInputSchema = z
  .object({
    label: z.string().trim().min(1, 'day label is required').max(60),
    occasions: z
      .array(occasionInputSchema)
      .min(1, 'a day needs at least one eating occasion')
      .max(12),
  })
  .strict();

/** A plan as the client sends it (create or save a new version). */
export const planInputSchema = z
  .object({
    name: z.string().trim().min(1, 'name is required').max(120),
    days: z.array(dayInputSchema).min(1, 'a plan needs at least one day').max(31),
    /** Short note kept with this version (what changed at this consult). */
    note: z.string().trim().max(500).nullable().optional(),
  })
  .strict();
export type PlanInput = z.infer<typeof planInputSchema>;

/** A stored item: grams always resolved; the household measure kept as entered. */
export interface PlanItem {
  foodId: number;
  grams: number;
  measure: { portionId: number; count: number; description: string; gramsPerUnit: number } | null;
  label: string | null;
  /** Absent on items saved before preparation methods existed (they summarise as before). */
  preparation?: PreparationMethodId;
  /** Set with `preparation` (other than 'as-listed'): which weight `grams` is. */
  weightBasis?: WeightBasis;
}

export interface PlanOccasion {
  name: string;
  kind: 'meal' | 'snack';
  time: string | null;
  items: PlanItem[];
}

export interface PlanDay {
  label: string;
  occasions: PlanOccasion[];
}

/** The content of one plan version. */
export interface PlanContent {
  name: string;
  days: PlanDay[];
}

export interface PlanIssue {
  path: string;
  message: string;
}

/** Snack unless said otherwise by name ('snack', 'merienda', 'collation', ...): common practice. */
export function guessOccasionKind(name: string): 'meal' | 'snack' {
  return /snack|merienda|tentempi|collation|go[uû]ter|zwischen|spuntino|lanche/i.test(name)
    ? 'snack'
    : 'meal';
}

/**
 * Checks every item against the foods and resolves household measures to grams (pure).
 * Issues name the field as `days.0.occasions.1.items.2.foodId`.
 */
export function resolvePlan(
  input: PlanInput,
  foods: ReadonlyMap<number, Food>,
): { ok: true; value: PlanContent } | { ok: false; issues: PlanIssue[] } {
  const issues: PlanIssue[] = [];
  const days: PlanDay[] = input.days.map((d, di) => ({
    label: d.label,
    occasions: d.occasions.map((o, oi) => ({
      name: o.name,
      kind: o.kind ?? guessOccasionKind(o.name),
      time: o.time ?? null,
      items: o.items.flatMap((it, ii): PlanItem[] => {
        const at = `days.${di}.occasions.${oi}.items.${ii}`;
        const food = foods.get(it.foodId);
        if (!food) {
          issues.push({ path: `${at}.foodId`, message: `unknown food id ${it.foodId}` });
          return [];
        }
        const prep = resolvePreparation(it, food, it.measure !== undefined);
        if (!prep.ok) {
          issues.push({ path: `${at}.preparation`, message: prep.message });
          return [];
        }
        if (it.measure) {
          const portion = food.portions.find((p) => p.id === it.measure?.portionId);
          if (!portion) {
            issues.push({
              path: `${at}.measure.portionId`,
              message: `household measure ${it.measure.portionId} is not one of food ${food.id}'s measures (${food.portions.map((p) => p.id).join(', ') || 'it has none'})`,
            });
            return [];
          }
          // The table's gram weight is for `amount` units of the description (e.g. 2 slices).
          const gramsPerUnit = portion.grams / (portion.amount > 0 ? portion.amount : 1);
          const grams = gramsPerUnit * it.measure.count;
          if (grams > MAX_ITEM_GRAMS) {
            issues.push({
              path: `${at}.measure.count`,
              message: `${it.measure.count} x ${portion.description} = ${Math.round(grams)} g is more than ${MAX_ITEM_GRAMS} g in one item`,
            });
            return [];
          }
          return [
            {
              foodId: food.id,
              grams,
              measure: {
                portionId: portion.id,
                count: it.measure.count,
                description: portion.description,
                gramsPerUnit,
              },
              label: it.label ?? null,
              ...prep.value,
            },
          ];
        }
        return [
          {
            foodId: food.id,
            grams: it.grams as number,
            measure: null,
            label: it.label ?? null,
            ...prep.value,
          },
        ];
      }),
    })),
  }));
  return issues.length > 0
    ? { ok: false, issues }
    : { ok: true, value: { name: input.name, days } };
}

/**
 * The preparation fields to store for an item: none when it has no method (so items without one
 * are stored exactly as before), the method alone for 'as-listed', else the method and the
 * weight basis (given, else 'table' for a household measure of the table's food, else the
 * reading that gives the larger amounts). A method the food cannot take is refused.
 */
function resolvePreparation(
  it: {
    preparation?: PreparationMethodId | null | undefined;
    weightBasis?: WeightBasis | undefined;
  },
  food: Food,
  byMeasure: boolean,
):
  | { ok: true; value: Pick<PlanItem, 'preparation' | 'weightBasis'> }
  | { ok: false; message: string } {
  const method = it.preparation ?? null;
  if (method === null) return { ok: true, value: {} };
  if (method === 'as-listed') return { ok: true, value: { preparation: method } };
  const a = applicability(food, method);
  if (!a.ok) return { ok: false, message: `${method}: ${a.reason}` };
  // A household measure of the table's food weighs the food as the table lists it.
  const weightBasis = it.weightBasis ?? (byMeasure ? 'table' : conservativeBasis(a.prepClass));
  return { ok: true, value: { preparation: method, weightBasis } };
}

/** Every food id a plan input refers to. */
export function planFoodIds(input: {
  days: { occasions: { items: { foodId: number }[] }[] }[];
}): number[] {
  const ids = new Set<number>();
  for (const d of input.days)
    for (const o of d.occasions) for (const it of o.items) ids.add(it.foodId);
  return [...ids];
}
