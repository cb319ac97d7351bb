import { z } from 'zod';

/**
 * Response schemas of the plan summary for the OpenAPI document. They mirror
 * `summary-types.ts`; a test parses a real summary with them and requires nothing to be lost.
 */
const mgRange = z.object({ low: z.number(), typical: z.number(), high: z.number() });
const nutrientKey = z.enum([
  'phosphorusMg',
  'absorbablePhosphorusMg',
  'proteinG',
  'potassiumMg',
  'sodiumMg',
  'calciumMg',
  'energyKcal',
]);

const preparedRangesSchema = z
  .object({
    phosphorusMg: mgRange,
    proteinG: mgRange,
    potassiumMg: mgRange,
    sodiumMg: mgRange,
    calciumMg: mgRange,
  })
  .describe('low-high range of the amounts a preparation method changes (typical in the middle)');

export const nutrientsSchema = z
  .object({
    phosphorusMg: z.number(),
    absorbablePhosphorusMg: mgRange,
    additivePhosphorusMg: z.number(),
    proteinG: z.number(),
    phosphorusProteinRatioMgPerG: z.number().nullable(),
    potassiumMg: z.number(),
    sodiumMg: z.number(),
    calciumMg: z.number(),
    energyKcal: z.number(),
    incomplete: z
      .array(nutrientKey)
      .describe('nutrients some foods lack: the totals are lower bounds'),
    preparedRanges: preparedRangesSchema
      .optional()
      .describe('only when some item in scope has a preparation method'),
  })
  .describe('mg, g and kcal; ratio in mg phosphorus per g protein');

const n = z.number().nullable();
const itemNutrientsSchema = z.object({
  phosphorusMg: n,
  absorbablePhosphorusMg: mgRange.nullable(),
  additivePhosphorusMg: n,
  proteinG: n,
  phosphorusProteinRatioMgPerG: n,
  potassiumMg: n,
  sodiumMg: n,
  calciumMg: n,
  energyKcal: n,
});

const flags = z.object({ additive: z.boolean(), highRatio: z.boolean() });

const factorsSchema = z.object({
  phosphorus: mgRange,
  potassium: mgRange,
  sodium: mgRange,
  calcium: mgRange,
  protein: mgRange,
});

const itemPreparationSchema = z
  .object({
    method: z.string().describe('a method id of the preparation table'),
    label: z.string(),
    prepClass: z.string().nullable(),
    weightBasis: z
      .enum(['table', 'plate'])
      .nullable()
      .describe(
        "which weight the item's grams are: the food as its table lists it, or on the plate",
      ),
    tableGrams: z.number(),
    plateGrams: z.number(),
    factors: factorsSchema
      .nullable()
      .describe('retained fractions applied (true retention, low/typical/high); null = none'),
    yield: mgRange.nullable().describe('plate grams per gram as the table lists it'),
    ranges: preparedRangesSchema.nullable(),
    sources: z.array(z.string()),
    notes: z.array(z.string()),
  })
  .describe('the preparation method of the item; its nutrients are after it');

const itemSchema = z.object({
  foodId: z.number(),
  foodName: z.string(),
  foodCode: z.string(),
  source: z.string(),
  grams: z.number(),
  measure: z
    .object({ portionId: z.number(), count: z.number(), description: z.string() })
    .nullable(),
  label: z.string(),
  nutrients: itemNutrientsSchema,
  splitMethod: z.string(),
  flags,
  preparation: itemPreparationSchema.optional(),
});

const targetSchema = z.object({
  min: n,
  max: n,
  unit: z.enum(['g/day', 'kcal/day', 'mg/day', 'mL/day']),
  perKg: z.object({ min: z.number(), max: z.number(), unit: z.string() }).nullable(),
  setBy: z.enum(['default', 'dietitian', 'unset']),
  source: z.string(),
  defaultValue: z.object({ min: n, max: n }).nullable(),
  note: z.string().nullable(),
  alongside: z
    .object({ min: z.number(), max: z.number(), perKg: z.number(), source: z.string() })
    .nullable()
    .optional(),
  fromBindersMaxMg: n.optional(),
  unsetAttention: z.string().nullable().optional(),
  onDialysis: z.boolean().optional(),
});
const targetKey = z.enum([
  'proteinG',
  'energyKcal',
  'sodiumMg',
  'phosphorusMg',
  'potassiumMg',
  'calciumMg',
  'fluidMl',
]);

const statusSchema = z.object({
  level: z.enum(['on-target', 'attention']),
  checks: z.array(
    z.object({
      target: targetKey,
      value: z.number(),
      min: n,
      max: n,
      unit: z.string(),
      status: z.enum(['below', 'within', 'above', 'not-set']),
      incomplete: z.boolean(),
      message: z.string(),
    }),
  ),
  messages: z.array(z.string()),
});

const contributorSchema = z.object({
  foodId: z.number(),
  name: z.string(),
  phosphorusMg: z.number(),
  absorbablePhosphorusMgTypical: z.number(),
  share: z.number(),
  occurrences: z.number(),
  phosphorusProteinRatioMgPerG: n,
  flags,
});

const spacing = z.object({ medicines: z.string(), instruction: z.string(), source: z.string() });

export const binderSummarySchema = z.object({
  prescription: z
    .object({
      ingredient: z.string(),
      unitStrengthMg: z.number(),
      schedule: z.enum(['per-day', 'per-meal']),
      units: z.number(),
      otherMedicines: z.array(z.string()),
    })
    .nullable(),
  ingredient: z
    .object({
      displayName: z.string(),
      timing: z.string(),
      timingSource: z.string(),
      warnings: z.array(z.string()),
      spacing: z.array(spacing),
      spacingForListedMedicines: z.array(
        z.object({ medicine: z.string(), notes: z.array(spacing) }),
      ),
      pbedGPerUnit: n,
      pbedSource: z.string(),
      elementalCalciumMgPerUnit: z.number(),
    })
    .nullable(),
  roundingRule: z.string(),
  perOccasion: z.array(
    z.object({
      day: z.string(),
      occasion: z.string(),
      time: z.string().nullable(),
      absorbablePhosphorusMgTypical: z.number(),
      units: z.number(),
      exactShare: n,
      reason: z.string(),
      timing: z.string(),
    }),
  ),
  days: z.array(
    z.object({
      day: z.string(),
      prescribedUnits: z.number(),
      distributedUnits: z.number(),
      pbedG: n,
      elementalCalciumMgFromBinders: z.number(),
      elementalCalciumMgTotal: z.number(),
      disagreements: z.array(
        z.object({ code: z.string(), occasion: z.string().nullable(), message: z.string() }),
      ),
    }),
  ),
  elementalCalciumMgPerDay: z.number(),
  limits: z.object({ fromBindersMaxMg: z.number(), totalMaxMg: z.number(), source: z.string() }),
  caution: z.string(),
});

export const planSummarySchema = z.object({
  planId: z.number(),
  patientId: z.number(),
  version: z.number(),
  name: z.string(),
  days: z.array(
    z.object({
      label: z.string(),
      occasions: z.array(
        z.object({
          name: z.string(),
          kind: z.enum(['meal', 'snack']),
          time: z.string().nullable(),
          items: z.array(itemSchema),
          nutrients: nutrientsSchema,
        }),
      ),
      nutrients: nutrientsSchema,
      // Versions saved before a target existed lack it.
      targets: z.partialRecord(targetKey, targetSchema),
      status: statusSchema,
      ratioBand: z
        .object({
          ratioMgPerG: z.number(),
          band: z.string(),
          label: z.string(),
          note: z.string(),
        })
        .nullable()
        .optional(),
      topContributors: z.array(contributorSchema),
    }),
  ),
  average: z.object({ nutrients: nutrientsSchema, status: statusSchema }),
  topContributors: z.array(contributorSchema),
  flags: z.object({
    additiveFoods: z.array(
      z.object({ foodId: z.number(), name: z.string(), evidence: z.array(z.string()) }),
    ),
    highRatioFoods: z.array(
      z.object({
        foodId: z.number(),
        name: z.string(),
        phosphorusProteinRatioMgPerG: z.number(),
        basis: z.enum(['total', 'absorbable-plant']).optional(),
        flaggedValueMgPerG: z.number().optional(),
      }),
    ),
  }),
  binders: binderSummarySchema,
  thresholds: z.record(z.string(), z.number()),
  caution: z.string(),
  cautions: z
    .array(z.object({ code: z.string(), text: z.string(), source: z.string() }))
    .optional(),
});
