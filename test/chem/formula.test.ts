import { describe, expect, it } from 'vitest';
import { ATOMIC_WEIGHTS_G_PER_MOL } from '../../src/chem/atomic-weights.js';
import {
  elementMassFraction,
  formulaMass,
  molarMassGPerMol,
  parseFormula,
  phosphorusMassFraction,
} from '../../src/chem/formula.js';

function counts(formula: string): Record<string, number> {
  const r = parseFormula(formula);
  if (!r.ok) throw new Error(r.issues.join('; '));
  return { ...r.value.counts };
}

describe('IUPAC 2021 abridged standard atomic weights (Prohaska et al., Pure Appl Chem 2022)', () => {
  it('holds the abridged values for the elements of phosphate additives', () => {
    // IUPAC/CIAAW 2021 abridged table (values the product brief also fixes)
    expect(ATOMIC_WEIGHTS_G_PER_MOL.P).toBe(30.974);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.O).toBe(15.999);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.H).toBe(1.008);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.Na).toBe(22.99);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.K).toBe(39.098);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.Ca).toBe(40.078);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.Mg).toBe(24.305);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.Al).toBe(26.982);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.Fe).toBe(55.845);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.N).toBe(14.007);
    expect(ATOMIC_WEIGHTS_G_PER_MOL.C).toBe(12.011);
  });
});

describe('formula parser', () => {
  it('counts simple formulas', () => {
    expect(counts('H3PO4')).toEqual({ H: 3, P: 1, O: 4 });
    expect(counts('NaCl')).toEqual({ Na: 1, Cl: 1 });
    expect(counts('CO2')).toEqual({ C: 1, O: 2 });
  });

  it('multiplies parentheses and brackets, nested', () => {
    expect(counts('Ca3(PO4)2')).toEqual({ Ca: 3, P: 2, O: 8 });
    expect(counts('(NH4)2HPO4')).toEqual({ N: 2, H: 9, P: 1, O: 4 });
    expect(counts('Fe4(P2O7)3')).toEqual({ Fe: 4, P: 6, O: 21 });
    expect(counts('Ca5(PO4)3OH')).toEqual({ Ca: 5, P: 3, O: 13, H: 1 });
    expect(counts('K[Al(OH)4]2')).toEqual({ K: 1, Al: 2, O: 8, H: 8 });
  });

  it('adds hydrate water after a middle dot (and its look-alikes)', () => {
    const r = parseFormula('Na2HPO4·12H2O');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.counts).toEqual({ Na: 2, H: 25, P: 1, O: 16 });
    expect(r.value.waterOfCrystallisation).toBe(12);
    expect(counts('CaHPO4*2H2O')).toEqual({ Ca: 1, H: 5, P: 1, O: 6 });
    expect(counts('CaSO4·0.5H2O')).toEqual({ Ca: 1, S: 1, O: 4.5, H: 1 });
    expect(counts('NaAl3H14(PO4)8·4H2O')).toEqual({ Na: 1, Al: 3, H: 22, P: 8, O: 36 });
  });

  it('reads a repeat unit (NaPO3)n per unit', () => {
    const r = parseFormula('(NaPO3)n');
    expect(r.ok && r.value.repeatUnit).toBe(true);
    expect(counts('(NaPO3)n')).toEqual({ Na: 1, P: 1, O: 3 });
    expect(counts('(Ca(PO3)2)n')).toEqual({ Ca: 1, P: 2, O: 6 });
  });

  it('reports bad formulas as values, with the reason', () => {
    for (const bad of ['', 'Xx2', 'Ca3(PO4', 'H2O)', 'h2o', 'Na2HPO4·', 'Ca3(PO4]2']) {
      const r = parseFormula(bad);
      expect(r.ok, bad).toBe(false);
      if (!r.ok) expect(r.issues.length).toBeGreaterThan(0);
    }
    expect(() => formulaMass('Xx')).toThrow(/unknown element/);
  });
});

describe('molar masses against handbook values (CRC Handbook of Chemistry and Physics; from memory)', () => {
  // Handbook molar masses, g/mol (from memory of the CRC Handbook tables, 4th-5th significant figure)
  const handbook: [string, number][] = [
    ['H2O', 18.015],
    ['H3PO4', 97.995],
    ['NaH2PO4', 119.977],
    ['Na2HPO4', 141.959],
    ['Na3PO4', 163.94],
    ['KH2PO4', 136.086],
    ['K2HPO4', 174.176],
    ['Ca3(PO4)2', 310.177],
    ['Na4P2O7', 265.9],
    ['Na5P3O10', 367.864],
    ['Na2HPO4·12H2O', 358.14],
  ];
  it.each(handbook)('%s is %f g/mol within 0.01', (formula, expected) => {
    expect(Math.abs(molarMassGPerMol(counts(formula)) - expected)).toBeLessThan(0.011);
  });

  it('computes mass fractions from the atomic weights (worked)', () => {
    // Na2HPO4: 2 x 22.990 + 1.008 + 30.974 + 4 x 15.999 = 141.958 g/mol; P = 30.974 / 141.958 = 0.21819
    expect(molarMassGPerMol(counts('Na2HPO4'))).toBeCloseTo(141.958, 3);
    expect(phosphorusMassFraction('Na2HPO4')).toBeCloseTo(0.21819, 5);
    // Na: 45.980 / 141.958 = 0.32390
    expect(elementMassFraction(counts('Na2HPO4'), 'Na')).toBeCloseTo(0.3239, 4);
    const all = formulaMass('KH2PO4').massFractions;
    expect(Object.values(all).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
  });

  it('phytic acid C6H18O24P6 is 660.03 g/mol and 28.16% P (about 28.2%)', () => {
    // 6 x 12.011 + 18 x 1.008 + 24 x 15.999 + 6 x 30.974 = 72.066 + 18.144 + 383.976 + 185.844 = 660.030
    expect(molarMassGPerMol(counts('C6H18O24P6'))).toBeCloseTo(660.03, 2);
    // 185.844 / 660.030 = 0.28157
    expect(phosphorusMassFraction('C6H18O24P6')).toBeCloseTo(0.2816, 4);
    // Consistency: Lott JNA et al., Seed Sci Res 2000: 35 Mt phytic acid hold 9.9 Mt P -> 0.283
    expect(Math.abs(phosphorusMassFraction('C6H18O24P6') - 9.9 / 35)).toBeLessThan(0.002);
  });
});
