import { ATOMIC_WEIGHTS_G_PER_MOL } from './atomic-weights.js';

/** Element counts of a formula (per formula unit, or per repeat unit for polymers). */
export interface ParsedFormula {
  formula: string;
  counts: Readonly<Record<string, number>>;
  /** True when the formula is a repeat unit, written `(NaPO3)n`; amounts are per unit. */
  repeatUnit: boolean;
  /** Molecules of water of crystallisation, from a `·nH2O` part (0 if none). */
  waterOfCrystallisation: number;
}

export type FormulaResult = { ok: true; value: ParsedFormula } | { ok: false; issues: string[] };

// Middle dot (and look-alikes or '*') separates water of crystallisation; a full stop is not
// accepted because it is also the decimal point of '0.5H2O'.
const HYDRATE_DOTS = /[·•∙⋅*]/;

/**
 * Parses a chemical formula: elements with counts, nested parentheses and brackets, hydrates
 * after a middle dot (`Na2HPO4·12H2O`, also `*`), and repeat units `(NaPO3)n`.
 */
export function parseFormula(formula: string): FormulaResult {
  const text = formula.trim();
  if (text.length === 0) return { ok: false, issues: ['empty formula'] };
  let repeatUnit = false;
  let body = text;
  const repeat = /^\((.+)\)\s*[nx]$/.exec(body);
  if (repeat) {
    repeatUnit = true;
    body = repeat[1] as string;
  }
  const parts = body.split(HYDRATE_DOTS);
  const counts: Record<string, number> = {};
  let water = 0;
  const issues: string[] = [];
  parts.forEach((part, index) => {
    const m = /^\s*(\d+(?:\.\d+)?)?\s*(.+?)\s*$/.exec(part);
    if (!m || !m[2]) {
      issues.push(`empty part ${index + 1} in "${text}"`);
      return;
    }
    const multiplier = m[1] ? Number(m[1]) : 1;
    const group = parseGroup(m[2], issues);
    if (!group) return;
    for (const [el, n] of Object.entries(group)) counts[el] = (counts[el] ?? 0) + n * multiplier;
    if (index > 0 && m[2] === 'H2O') water += multiplier;
  });
  if (issues.length > 0) return { ok: false, issues };
  return { ok: true, value: { formula: text, counts, repeatUnit, waterOfCrystallisation: water } };
}

function parseGroup(s: string, issues: string[]): Record<string, number> | null {
  const stack: Record<string, number>[] = [{}];
  const closers: string[] = [];
  let i = 0;
  const readCount = (): number => {
    const m = /^\d+/.exec(s.slice(i));
    if (!m) return 1;
    i += m[0].length;
    return Number(m[0]);
  };
  while (i < s.length) {
    const ch = s[i] as string;
    if (ch === '(' || ch === '[') {
      stack.push({});
      closers.push(ch === '(' ? ')' : ']');
      i++;
    } else if (ch === ')' || ch === ']') {
      if (closers.pop() !== ch) {
        issues.push(`unbalanced "${ch}" at ${i + 1} in "${s}"`);
        return null;
      }
      i++;
      const n = readCount();
      const inner = stack.pop() as Record<string, number>;
      const outer = stack[stack.length - 1] as Record<string, number>;
      for (const [el, c] of Object.entries(inner)) outer[el] = (outer[el] ?? 0) + c * n;
    } else if (/[A-Z]/.test(ch)) {
      const m = /^[A-Z][a-z]?/.exec(s.slice(i)) as RegExpExecArray;
      let symbol = m[0];
      // Prefer a one-letter symbol when the two-letter one is unknown (e.g. "Co" vs "C" "o" is
      // never valid, but "Cl" is).
      if (symbol.length === 2 && !(symbol in ATOMIC_WEIGHTS_G_PER_MOL))
        symbol = symbol[0] as string;
      if (!(symbol in ATOMIC_WEIGHTS_G_PER_MOL)) {
        issues.push(`unknown element "${symbol}" in "${s}"`);
        return null;
      }
      i += symbol.length;
      const n = readCount();
      const top = stack[stack.length - 1] as Record<string, number>;
      top[symbol] = (top[symbol] ?? 0) + n;
    } else if (ch === ' ') {
      i++;
    } else {
      issues.push(`unexpected "${ch}" at ${i + 1} in "${s}"`);
      return null;
    }
  }
  if (closers.length > 0) {
    issues.push(`unclosed bracket in "${s}"`);
    return null;
  }
  return stack[0] as Record<string, number>;
}

/** Molar mass in g/mol from element counts and the IUPAC abridged atomic weights. */
export function molarMassGPerMol(counts: Readonly<Record<string, number>>): number {
  let sum = 0;
  for (const [el, n] of Object.entries(counts)) {
    const w = ATOMIC_WEIGHTS_G_PER_MOL[el];
    if (w === undefined) throw new Error(`no atomic weight for ${el}`);
    sum += w * n;
  }
  return sum;
}

/** Mass fraction (0-1) of one element in a formula. */
export function elementMassFraction(
  counts: Readonly<Record<string, number>>,
  element: string,
): number {
  const w = ATOMIC_WEIGHTS_G_PER_MOL[element];
  if (w === undefined) throw new Error(`no atomic weight for ${element}`);
  return ((counts[element] ?? 0) * w) / molarMassGPerMol(counts);
}

/** Molar mass and every element's mass fraction of a formula; throws on a formula that does not parse. */
export function formulaMass(formula: string): {
  parsed: ParsedFormula;
  molarMassGPerMol: number;
  massFractions: Record<string, number>;
} {
  const r = parseFormula(formula);
  if (!r.ok) throw new Error(r.issues.join('; '));
  const mm = molarMassGPerMol(r.value.counts);
  const massFractions: Record<string, number> = {};
  for (const el of Object.keys(r.value.counts))
    massFractions[el] = elementMassFraction(r.value.counts, el);
  return { parsed: r.value, molarMassGPerMol: mm, massFractions };
}

/** Phosphorus mass fraction (0-1) computed from a formula; throws on a formula that does not parse. */
export function phosphorusMassFraction(formula: string): number {
  return formulaMass(formula).massFractions.P ?? 0;
}
