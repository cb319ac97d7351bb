/**
 * The solver layer against a published optimum: Stigler's 1939 diet problem (Stigler GJ, "The
 * cost of subsistence", J Farm Econ 1945;27(2):303-314; 77 foods, 9 nutrients, values per dollar
 * of expenditure at August 1939 prices). Minimise dollars a day subject to the National Research
 * Council's 1943 allowances (calories 3,000, protein 70 g, calcium 0.8 g, iron 12 mg, vitamin A
 * 5,000 IU, thiamine 1.8 mg, riboflavin 2.7 mg, niacin 18 mg, ascorbic acid 75 mg). The LP
 * optimum on the data as tabulated is about $39.66 a year (Dantzig GB, Linear Programming and
 * Extensions, 1963, ch. 27-1 reports $39.69 with his rounding); its foods are wheat flour, beef
 * liver, cabbage, spinach and dried navy beans.
 */
import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { highsSolver } from '../../src/balance/highs-solver.js';
import { LpModel, type LpSolver } from '../../src/balance/lp-model.js';

const FILE = new URL('../fixtures/balance/stigler-1939.tsv', import.meta.url);

/** NRC 1943 allowances in the table's units (Stigler 1945, as quoted above). */
const ALLOWANCE: Record<string, number> = {
  calories1000: 3,
  proteinG: 70,
  calciumG: 0.8,
  ironMg: 12,
  vitaminA1000Iu: 5,
  thiamineMg: 1.8,
  riboflavinMg: 2.7,
  niacinMg: 18,
  ascorbicAcidMg: 75,
};

function readTable(): { foods: string[]; perDollar: Record<string, number>[] } {
  const lines = readFileSync(FILE, 'utf8')
    .split('\n')
    .filter((l) => l.trim() !== '' && !l.startsWith('#'));
  const header = (lines[0] as string).split('\t');
  const foods: string[] = [];
  const perDollar: Record<string, number>[] = [];
  for (const line of lines.slice(1)) {
    const cells = line.split('\t');
    foods.push(cells[0] as string);
    const row: Record<string, number> = {};
    header.slice(1).forEach((h, i) => (row[h] = Number(cells[i + 1])));
    perDollar.push(row);
  }
  return { foods, perDollar };
}

describe('Stigler 1939 diet problem (Stigler 1945, J Farm Econ 27:303-314; Dantzig 1963)', () => {
  let solver: LpSolver;
  beforeAll(async () => {
    solver = await highsSolver();
  });

  it('reads the whole table: 77 foods, 9 nutrients', () => {
    const { foods, perDollar } = readTable();
    expect(foods).toHaveLength(77);
    for (const row of perDollar) {
      for (const k of Object.keys(ALLOWANCE)) expect(Number.isFinite(row[k])).toBe(true);
    }
    // Stigler 1945: wheat flour (enriched) per $1: 44.7 thousand kcal, 1,411 g protein.
    expect(perDollar[0]).toMatchObject({ calories1000: 44.7, proteinG: 1411 });
  });

  it('finds the published optimum: about $39.66 a year, with the five known foods', () => {
    const { foods, perDollar } = readTable();
    const m = new LpModel();
    // x = dollars a day spent on each food; minimise the day's dollars
    const x = foods.map(() => m.addVar({ lower: 0, cost: 1 }));
    for (const [k, min] of Object.entries(ALLOWANCE)) {
      m.addRow(
        x.map((v, i) => [v, perDollar[i]![k]!] as [number, number]),
        min,
        Infinity,
      );
    }
    const r = solver.solve(m);
    expect(r.status).toBe('optimal');
    // $0.108662 a day x 365 days = $39.66 a year (Stigler 1945 data; Dantzig 1963: $39.69)
    const annual = r.objective * 365;
    expect(annual).toBeCloseTo(39.66, 2);
    const bought = foods.filter((_, i) => r.values[x[i]!]! > 1e-9).sort();
    expect(bought).toEqual(['cabbage', 'flour', 'liver', 'navybeans', 'spinach']);
    // every allowance met at the optimum
    Object.values(ALLOWANCE).forEach((min, row) =>
      expect(r.activity[row]!).toBeGreaterThanOrEqual(min - 1e-7),
    );
  });

  it('prices the allowances from the duals: each is >= 0, and they reproduce the optimum', () => {
    // LP duality: the optimum equals sum(allowance x dual) for the >= rows.
    const { foods, perDollar } = readTable();
    const m = new LpModel();
    const x = foods.map(() => m.addVar({ lower: 0, cost: 1 }));
    for (const [k, min] of Object.entries(ALLOWANCE))
      m.addRow(
        x.map((v, i) => [v, perDollar[i]![k]!] as [number, number]),
        min,
        Infinity,
      );
    const r = solver.solve(m);
    const duals = [...(r.rowDuals as Float64Array)];
    duals.forEach((d) => expect(d).toBeGreaterThanOrEqual(-1e-12));
    const dualObjective = Object.values(ALLOWANCE).reduce((s, min, i) => s + min * duals[i]!, 0);
    expect(dualObjective).toBeCloseTo(r.objective, 9);
  });
});
