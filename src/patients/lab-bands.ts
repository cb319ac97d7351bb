import { z } from 'zod';
import type { Analyte } from './analytes.js';

/**
 * The clinic's reference or target band per analyte, in the canonical unit, drawn behind each
 * trend chart; one band off dialysis and one on dialysis. The setting `labBands` overrides
 * these defaults (each named with its source below).
 */
const range = z
  .object({ min: z.number().nonnegative().nullable(), max: z.number().positive().nullable() })
  .strict()
  .refine((r) => r.min === null || r.max === null || r.min <= r.max, {
    message: 'min must not be greater than max',
    path: ['min'],
  });
const band = z.object({ notOnDialysis: range, onDialysis: range }).strict();

export const labBandsSchema = z
  .object({
    phosphate: band,
    calcium: band,
    pth: band,
    albumin: band,
    potassium: band,
    bicarbonate: band,
    'vitamin-d-25oh': band,
  })
  .strict();
export type LabBands = z.infer<typeof labBandsSchema>;
export type LabBand = LabBands[Analyte];

const both = (min: number | null, max: number | null): LabBand => ({
  notOnDialysis: { min, max },
  onDialysis: { min, max },
});

/**
 * PTH assay upper normal limit assumed for the default band: 65 pg/mL (assumed, no published
 * figure: assays differ; the clinic sets its own). On dialysis 2-9 x 65 = 130-585 pg/mL.
 */
const PTH_ASSAY_UPPER_LIMIT_PG_PER_ML = 65;

export const DEFAULT_LAB_BANDS: LabBands = {
  phosphate: both(2.5, 4.5),
  calcium: both(8.5, 10.2),
  pth: {
    notOnDialysis: { min: null, max: PTH_ASSAY_UPPER_LIMIT_PG_PER_ML },
    onDialysis: {
      min: 2 * PTH_ASSAY_UPPER_LIMIT_PG_PER_ML,
      max: 9 * PTH_ASSAY_UPPER_LIMIT_PG_PER_ML,
    },
  },
  albumin: both(3.5, 5.0),
  potassium: both(3.5, 5.0),
  bicarbonate: both(24, 26),
  'vitamin-d-25oh': both(30, null),
};

/** Shown beside each default band. */
export const LAB_BAND_SOURCES: Record<Analyte, string> = {
  phosphate:
    'KDIGO 2017 CKD-MBD guideline update (Kidney Int Suppl 2017;7:1-59) 4.1.2: lower elevated phosphate toward the normal range; adult normal range 2.5-4.5 mg/dL (Kalantar-Zadeh K et al., CJASN 2010;5:519-530)',
  calcium:
    "KDIGO 2017 CKD-MBD 4.1.3: avoid hypercalcaemia; 8.5-10.2 mg/dL is assumed (no published figure): a common laboratory range, set your laboratory's",
  pth: "KDIGO 2017 CKD-MBD 4.2.3: on dialysis about 2-9 times the assay's upper normal limit; not on dialysis the optimal level is not known (4.2.1), the band shows the upper normal limit. The 65 pg/mL limit is assumed (no published figure): set your assay's",
  albumin:
    "assumed (no published figure): 3.5-5.0 g/dL, a common laboratory range; set your laboratory's",
  potassium:
    "assumed (no published figure): 3.5-5.0 mmol/L, a common laboratory range; set your laboratory's",
  bicarbonate:
    'KDOQI Clinical Practice Guideline for Nutrition in CKD: 2020 Update (Ikizler TA et al., Am J Kidney Dis 2020;76(3 Suppl 1):S1-S107): maintain serum bicarbonate at 24-26 mmol/L (OPINION)',
  'vitamin-d-25oh':
    'KDIGO 2017 CKD-MBD 3.1.x: correct vitamin D deficiency as in the general population; 30 ng/mL lower bound from the Endocrine Society guideline (Holick MF et al., J Clin Endocrinol Metab 2011;96:1911-1930)',
};
