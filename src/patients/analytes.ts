import { formulaMass } from '../chem/formula.js';
import { ATOMIC_WEIGHTS_G_PER_MOL, ATOMIC_WEIGHTS_SOURCE } from '../chem/atomic-weights.js';

/**
 * The serum results the product follows: one entry per analyte with its LOINC codes (LOINC long
 * common names beside them), the canonical unit every result is also stored in, the units a
 * result may be entered in (as written on a lab report, with the UCUM code behind each), what a
 * mass <-> amount conversion needs (molar mass or charge, with the source), and the bounds past
 * which a value is refused as a typing error.
 */

export const ANALYTES = [
  'phosphate',
  'calcium',
  'pth',
  'albumin',
  'potassium',
  'bicarbonate',
  'vitamin-d-25oh',
] as const;
export type Analyte = (typeof ANALYTES)[number];

export interface LoincCode {
  code: string;
  /** LOINC long common name. */
  longName: string;
}

export interface AnalyteDefinition {
  analyte: Analyte;
  label: string;
  loinc: readonly LoincCode[];
  /** The unit stored beside the value as entered (UCUM code, as shown). */
  canonicalUnit: string;
  /** Units accepted on entry, as written on a report -> the UCUM code. */
  units: Readonly<Record<string, string>>;
  /** g/mol for mass <-> amount-of-substance conversions, with where it comes from. */
  molarMass: { gPerMol: number; source: string } | null;
  /** Charge for milliequivalents (mEq/L = mmol/L x charge). */
  charge: number | null;
  /**
   * Values outside these bounds (canonical unit) are refused as typing errors, not clinical
   * limits (common practice, no source: far outside what a living patient shows).
   */
  plausible: { min: number; max: number };
}

/** 25-hydroxyvitamin D3 (calcifediol), C27H44O2: molar mass from IUPAC atomic weights. */
const CALCIFEDIOL_G_PER_MOL = formulaMass('C27H44O2').molarMassGPerMol;

/**
 * Human PTH(1-84) molar mass, stated so that 1 pg/mL = 0.106 pmol/L (the factor labs print:
 * 1e-9 g/L / 9425 g/mol = 0.1061e-12 mol/L). 9425 g/mol is the 84-residue peptide's mass
 * (UniProt P01270 mature chain, from memory).
 */
const PTH_1_84_G_PER_MOL = 9425;

export const ANALYTE_DEFINITIONS: Readonly<Record<Analyte, AnalyteDefinition>> = {
  phosphate: {
    analyte: 'phosphate',
    label: 'Serum phosphate',
    loinc: [
      { code: '2777-1', longName: 'Phosphate [Mass/volume] in Serum or Plasma' },
      { code: '14879-1', longName: 'Phosphate [Moles/volume] in Serum or Plasma' },
    ],
    canonicalUnit: 'mg/dL',
    units: { 'mg/dL': 'mg/dL', 'mmol/L': 'mmol/L' },
    // Serum phosphate is reported as phosphorus: 1 mmol = 30.974 mg.
    molarMass: {
      gPerMol: ATOMIC_WEIGHTS_G_PER_MOL.P ?? NaN,
      source: `P; ${ATOMIC_WEIGHTS_SOURCE}`,
    },
    charge: null,
    plausible: { min: 0.3, max: 20 },
  },
  calcium: {
    analyte: 'calcium',
    label: 'Serum calcium (total)',
    loinc: [
      { code: '17861-6', longName: 'Calcium [Mass/volume] in Serum or Plasma' },
      { code: '2000-8', longName: 'Calcium [Moles/volume] in Serum or Plasma' },
    ],
    canonicalUnit: 'mg/dL',
    units: { 'mg/dL': 'mg/dL', 'mmol/L': 'mmol/L', 'mEq/L': 'meq/L' },
    molarMass: {
      gPerMol: ATOMIC_WEIGHTS_G_PER_MOL.Ca ?? NaN,
      source: `Ca; ${ATOMIC_WEIGHTS_SOURCE}`,
    },
    charge: 2, // Ca2+
    plausible: { min: 2, max: 20 },
  },
  pth: {
    analyte: 'pth',
    label: 'PTH (intact)',
    loinc: [{ code: '2731-8', longName: 'Parathyrin.intact [Mass/volume] in Serum or Plasma' }],
    canonicalUnit: 'pg/mL',
    units: { 'pg/mL': 'pg/mL', 'ng/L': 'ng/L', 'pmol/L': 'pmol/L' },
    molarMass: {
      gPerMol: PTH_1_84_G_PER_MOL,
      source: 'PTH(1-84) 9425 g/mol, stated: 1 pg/mL = 0.106 pmol/L',
    },
    charge: null,
    plausible: { min: 1, max: 5000 },
  },
  albumin: {
    analyte: 'albumin',
    label: 'Serum albumin',
    loinc: [{ code: '1751-7', longName: 'Albumin [Mass/volume] in Serum or Plasma' }],
    canonicalUnit: 'g/dL',
    units: { 'g/dL': 'g/dL', 'g/L': 'g/L' },
    molarMass: null,
    charge: null,
    plausible: { min: 0.5, max: 7 },
  },
  potassium: {
    analyte: 'potassium',
    label: 'Serum potassium',
    loinc: [{ code: '2823-3', longName: 'Potassium [Moles/volume] in Serum or Plasma' }],
    canonicalUnit: 'mmol/L',
    units: { 'mmol/L': 'mmol/L', 'mEq/L': 'meq/L' },
    molarMass: null,
    charge: 1, // K+: mEq/L = mmol/L
    plausible: { min: 1, max: 10 },
  },
  bicarbonate: {
    analyte: 'bicarbonate',
    label: 'Serum bicarbonate',
    loinc: [{ code: '1963-8', longName: 'Bicarbonate [Moles/volume] in Serum or Plasma' }],
    canonicalUnit: 'mmol/L',
    units: { 'mmol/L': 'mmol/L', 'mEq/L': 'meq/L' },
    molarMass: null,
    charge: 1, // HCO3-: mEq/L = mmol/L
    plausible: { min: 3, max: 60 },
  },
  'vitamin-d-25oh': {
    analyte: 'vitamin-d-25oh',
    label: '25-OH vitamin D',
    loinc: [
      { code: '1989-3', longName: '25-Hydroxyvitamin D3 [Mass/volume] in Serum or Plasma' },
      {
        code: '62292-8',
        longName: '25-Hydroxyvitamin D2+25-Hydroxyvitamin D3 [Mass/volume] in Serum or Plasma',
      },
    ],
    canonicalUnit: 'ng/mL',
    units: { 'ng/mL': 'ng/mL', 'ug/L': 'ug/L', 'µg/L': 'ug/L', 'nmol/L': 'nmol/L' },
    molarMass: {
      gPerMol: CALCIFEDIOL_G_PER_MOL,
      source: `25-hydroxyvitamin D3 C27H44O2, from ${ATOMIC_WEIGHTS_SOURCE}`,
    },
    charge: null,
    plausible: { min: 1, max: 300 },
  },
};

export function isAnalyte(s: string): s is Analyte {
  return (ANALYTES as readonly string[]).includes(s);
}

/** LOINC code -> analyte, over every code the catalogue lists. */
export const ANALYTE_BY_LOINC: ReadonlyMap<string, Analyte> = new Map(
  ANALYTES.flatMap((a) => ANALYTE_DEFINITIONS[a].loinc.map((l) => [l.code, a] as const)),
);
