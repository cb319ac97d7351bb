/**
 * A small typed layer for linear and mixed-integer programmes: variables with bounds, cost and
 * integrality, rows with two-sided limits, and the CPLEX LP text a solver reads. Pure: it builds
 * text and reads answers; the solver behind `LpSolver` is handed in.
 */

/** A variable's index in its model. */
export type VarId = number;
/** A row's index in its model. */
export type RowId = number;

export interface VarSpec {
  lower: number;
  upper: number;
  cost: number;
  integer: boolean;
}

export interface RowSpec {
  terms: Map<VarId, number>;
  lower: number;
  upper: number;
}

/** What a solve ends in; `limit` = stopped by a time or iteration limit with a solution. */
export type LpStatus = 'optimal' | 'infeasible' | 'unbounded' | 'limit' | 'error';

export interface LpResult {
  status: LpStatus;
  /** The solver's word for the status, as it gave it. */
  solverStatus: string;
  /** Objective including the model's constant offset. */
  objective: number;
  values: Float64Array;
  /** Row activities. */
  activity: Float64Array;
  /** d objective / d row limit (LP only; null for a MIP): a price per unit of the row. */
  rowDuals: Float64Array | null;
}

export interface SolveOptions {
  timeLimitS?: number;
  mipRelGap?: number;
  /** Absolute MIP gap in objective units. */
  mipAbsGap?: number;
}

/** Anything that solves a model (HiGHS in the product; tests may hand in another). */
export interface LpSolver {
  /** The solver's name, shown with its answers. */
  readonly name: string;
  solve(model: LpModel, options?: SolveOptions): LpResult;
}

/** Coefficients below this magnitude are dropped (they only add noise to the LP text). */
const ZERO_COEF = 1e-12;

/** Number text the LP reader accepts: finite, shortest round-trip form. */
function num(x: number): string {
  if (!Number.isFinite(x)) throw new Error(`LP model: non-finite number ${x}`);
  return String(x);
}

export class LpModel {
  readonly vars: VarSpec[] = [];
  readonly rows: RowSpec[] = [];
  /** Constant added to the objective (the LP text carries none). */
  objectiveOffset = 0;

  /** Adds a variable; `lower`/`upper` may be infinite. */
  addVar(spec: Partial<VarSpec> = {}): VarId {
    const v: VarSpec = {
      lower: spec.lower ?? 0,
      upper: spec.upper ?? Infinity,
      cost: spec.cost ?? 0,
      integer: spec.integer ?? false,
    };
    if (v.lower > v.upper) throw new Error(`LP model: variable bounds ${v.lower} > ${v.upper}`);
    this.vars.push(v);
    return this.vars.length - 1;
  }

  /** Adds a row lower <= sum(coef x var) <= upper; either limit may be infinite. */
  addRow(terms: Iterable<[VarId, number]>, lower: number, upper: number): RowId {
    const t = new Map<VarId, number>();
    for (const [v, c] of terms) {
      if (v < 0 || v >= this.vars.length) throw new Error(`LP model: unknown variable ${v}`);
      t.set(v, (t.get(v) ?? 0) + c);
    }
    this.rows.push({ terms: t, lower, upper });
    return this.rows.length - 1;
  }

  addCost(v: VarId, cost: number): void {
    const spec = this.vars[v];
    if (!spec) throw new Error(`LP model: unknown variable ${v}`);
    spec.cost += cost;
  }

  /** The same model with every integer variable made continuous (the LP relaxation). */
  relaxed(): LpModel {
    return this.copy((v) => ({ ...v, integer: false }));
  }

  /** A copy whose variables pass through `map` (to fix or relax some of them). */
  copy(map: (v: VarSpec, id: VarId) => VarSpec = (v) => ({ ...v })): LpModel {
    const m = new LpModel();
    this.vars.forEach((v, i) => m.vars.push(map(v, i)));
    for (const r of this.rows)
      m.rows.push({ terms: new Map(r.terms), lower: r.lower, upper: r.upper });
    m.objectiveOffset = this.objectiveOffset;
    return m;
  }

  /** Value of a row's sum at a point. */
  rowValue(r: RowId, values: ArrayLike<number>): number {
    let s = 0;
    for (const [v, c] of (this.rows[r] as RowSpec).terms) s += c * (values[v] ?? 0);
    return s;
  }

  objectiveAt(values: ArrayLike<number>): number {
    let s = this.objectiveOffset;
    this.vars.forEach((v, i) => (s += v.cost * (values[i] ?? 0)));
    return s;
  }

  /**
   * CPLEX LP text. Variables are `x<i>`; a row with two finite different limits is written as
   * two rows (the reader has no ranged rows), so `lpRows` maps each written row to its model row.
   */
  toLpText(): { text: string; lpRows: RowId[] } {
    const out: string[] = ['Minimize', ` obj: ${this.linear(this.costTerms()) || '0 x0'}`];
    out.push('Subject To');
    const lpRows: RowId[] = [];
    this.rows.forEach((r, i) => {
      const expr = this.linear(r.terms);
      if (!expr) return; // an empty row only checks its constant limits: done by the caller
      const lo = Number.isFinite(r.lower);
      const hi = Number.isFinite(r.upper);
      if (lo && hi && r.lower === r.upper) {
        out.push(` r${lpRows.length}: ${expr} = ${num(r.lower)}`);
        lpRows.push(i);
        return;
      }
      if (lo) {
        out.push(` r${lpRows.length}: ${expr} >= ${num(r.lower)}`);
        lpRows.push(i);
      }
      if (hi) {
        out.push(` r${lpRows.length}: ${expr} <= ${num(r.upper)}`);
        lpRows.push(i);
      }
    });
    out.push('Bounds');
    this.vars.forEach((v, i) => {
      const lo = Number.isFinite(v.lower);
      const hi = Number.isFinite(v.upper);
      if (!lo && !hi) out.push(` x${i} free`);
      else if (lo && hi && v.lower === v.upper) out.push(` x${i} = ${num(v.lower)}`);
      else if (lo && hi) out.push(` ${num(v.lower)} <= x${i} <= ${num(v.upper)}`);
      else if (lo) out.push(` x${i} >= ${num(v.lower)}`);
      else out.push(` -inf <= x${i} <= ${num(v.upper)}`);
    });
    const ints = this.vars.flatMap((v, i) => (v.integer ? [`x${i}`] : []));
    if (ints.length > 0) {
      out.push('General');
      for (let i = 0; i < ints.length; i += 20) out.push(` ${ints.slice(i, i + 20).join(' ')}`);
    }
    out.push('End');
    return { text: out.join('\n'), lpRows };
  }

  private costTerms(): Map<VarId, number> {
    const m = new Map<VarId, number>();
    this.vars.forEach((v, i) => m.set(i, v.cost));
    return m;
  }

  private linear(terms: Map<VarId, number>): string {
    const parts: string[] = [];
    for (const [v, c] of terms) {
      if (Math.abs(c) < ZERO_COEF) continue;
      const sign = c < 0 ? '-' : '+';
      parts.push(
        `${parts.length === 0 && sign === '+' ? '' : `${sign} `}${num(Math.abs(c))} x${v}`,
      );
    }
    return parts.join(' ');
  }
}

/** One independent block of a model: its own sub-model and where its variables and rows came from. */
export interface Block {
  model: LpModel;
  vars: VarId[];
  rows: RowId[];
}

/**
 * Splits a model into blocks that share no row (union-find over the variables of each row).
 * Solving the blocks one by one gives the same optimum as solving the whole (the objective is a
 * sum over variables, and no row links two blocks), and a search over a product of small
 * programmes is far cheaper block by block.
 */
export function splitBlocks(model: LpModel): Block[] {
  const parent = model.vars.map((_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) {
      parent[i] = parent[parent[i]!]!;
      i = parent[i]!;
    }
    return i;
  };
  for (const r of model.rows) {
    let first: number | null = null;
    for (const v of r.terms.keys()) {
      if (first === null) first = find(v);
      else parent[find(v)] = first;
    }
  }
  const byRoot = new Map<number, Block>();
  const blockOf = (v: VarId): Block => {
    const root = find(v);
    let b = byRoot.get(root);
    if (!b) byRoot.set(root, (b = { model: new LpModel(), vars: [], rows: [] }));
    return b;
  };
  const local = new Map<VarId, VarId>();
  model.vars.forEach((spec, v) => {
    const b = blockOf(v);
    local.set(v, b.model.addVar({ ...spec }));
    b.vars.push(v);
  });
  model.rows.forEach((r, i) => {
    const firstVar = r.terms.keys().next();
    if (firstVar.done) return; // a constant row: checked by the solver on the whole model
    const b = blockOf(firstVar.value);
    b.model.addRow(
      [...r.terms].map(([v, c]): [VarId, number] => [local.get(v) as VarId, c]),
      r.lower,
      r.upper,
    );
    b.rows.push(i);
  });
  return [...byRoot.values()];
}

/** Solves a model block by block and puts the answers back in the model's own numbering. */
export function solveByBlocks(solver: LpSolver, model: LpModel, options?: SolveOptions): LpResult {
  const values = new Float64Array(model.vars.length);
  const constantRowBroken = model.rows.some(
    (r) => r.terms.size === 0 && (r.lower > 1e-9 || r.upper < -1e-9),
  );
  if (constantRowBroken) {
    return {
      status: 'infeasible',
      solverStatus: 'Infeasible (constant row)',
      objective: NaN,
      values,
      activity: new Float64Array(model.rows.length),
      rowDuals: null,
    };
  }
  const blocks = splitBlocks(model);
  const isMip = model.vars.some((v) => v.integer);
  const rowDuals = isMip ? null : new Float64Array(model.rows.length);
  const statuses: string[] = [];
  let status: LpStatus = 'optimal';
  for (const b of blocks) {
    const only = b.model.vars[0]!;
    if (
      b.rows.length === 0 &&
      b.vars.length === 1 &&
      Number.isFinite(only.cost >= 0 ? only.lower : only.upper)
    ) {
      // a variable in no row sits at its cheaper bound: no solver call needed
      values[b.vars[0]!] = only.cost >= 0 ? only.lower : only.upper;
      continue;
    }
    const r = solver.solve(b.model, options);
    statuses.push(r.solverStatus);
    if (r.status !== 'optimal' && r.status !== 'limit') {
      return { ...r, values, activity: new Float64Array(model.rows.length), rowDuals: null };
    }
    if (r.status === 'limit') status = 'limit';
    b.vars.forEach((v, k) => (values[v] = r.values[k]!));
    if (rowDuals && r.rowDuals) b.rows.forEach((row, k) => (rowDuals[row] = r.rowDuals![k]!));
  }
  const activity = new Float64Array(model.rows.length);
  for (let r = 0; r < model.rows.length; r++) activity[r] = model.rowValue(r, values);
  const worst = statuses.find((s) => s !== 'Optimal') ?? 'Optimal';
  return {
    status,
    solverStatus: worst,
    objective: model.objectiveAt(values),
    values,
    activity,
    rowDuals,
  };
}
