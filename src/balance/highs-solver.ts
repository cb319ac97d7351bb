/**
 * HiGHS (WASM build of the `highs` package) behind the `LpSolver` interface. The module is
 * loaded once per process, on first use; each solve runs a fresh native instance, so calls
 * never share state.
 */
import type { LpModel, LpResult, LpSolver, LpStatus, SolveOptions } from './lp-model.js';

interface HighsRow {
  Primal?: number;
  Dual?: number;
}
interface HighsColumn {
  Primal?: number;
}
interface HighsAnswer {
  Status: string;
  ObjectiveValue: number;
  Columns: Record<string, HighsColumn>;
  Rows: HighsRow[];
}
interface HighsModule {
  solve(problem: string, options?: Record<string, unknown>): HighsAnswer;
}

let loading: Promise<HighsModule> | undefined;
let loadMs: number | null = null;

/** Milliseconds the first load took in this process (null before it). */
export function highsLoadMs(): number | null {
  return loadMs;
}

async function loadHighs(): Promise<HighsModule> {
  const t0 = performance.now();
  const mod = (await import('highs')) as unknown as { default: () => Promise<HighsModule> };
  const highs = await mod.default();
  loadMs = performance.now() - t0;
  return highs;
}

/** The process's HiGHS solver (loaded on the first call; later calls get the same one). */
export async function highsSolver(): Promise<LpSolver> {
  loading ??= loadHighs();
  const highs = await loading;
  return { name: 'HiGHS', solve: (model, options) => solveWith(highs, model, options) };
}

const STATUS: Record<string, LpStatus> = {
  Optimal: 'optimal',
  Infeasible: 'infeasible',
  'Primal infeasible or unbounded': 'infeasible',
  Unbounded: 'unbounded',
  'Time limit reached': 'limit',
  'Iteration limit reached': 'limit',
  'Target for objective reached': 'limit',
  'Bound on objective reached': 'limit',
};

function emptyRowsFeasible(model: LpModel): boolean {
  const tol = 1e-9;
  return model.rows.every(
    (r) =>
      [...r.terms.values()].some((c) => Math.abs(c) >= 1e-12) ||
      (r.lower <= tol && r.upper >= -tol),
  );
}

function solveWith(highs: HighsModule, model: LpModel, options: SolveOptions = {}): LpResult {
  const nVars = model.vars.length;
  const nRows = model.rows.length;
  const failed = (status: LpStatus, solverStatus: string): LpResult => ({
    status,
    solverStatus,
    objective: NaN,
    values: new Float64Array(nVars),
    activity: new Float64Array(nRows),
    rowDuals: null,
  });
  if (!emptyRowsFeasible(model)) return failed('infeasible', 'Infeasible (constant row)');
  const isMip = model.vars.some((v) => v.integer);
  const { text, lpRows } = model.toLpText();
  const opts: Record<string, unknown> = { output_flag: false };
  if (options.timeLimitS !== undefined) opts.time_limit = options.timeLimitS;
  if (isMip) {
    opts.mip_rel_gap = options.mipRelGap ?? 1e-6;
    if (options.mipAbsGap !== undefined) opts.mip_abs_gap = options.mipAbsGap;
  }
  const answer = highs.solve(text, opts);
  const status = STATUS[answer.Status] ?? 'error';
  if (status !== 'optimal' && status !== 'limit') return failed(status, answer.Status);
  const values = new Float64Array(nVars);
  for (let i = 0; i < nVars; i++) {
    const v = model.vars[i]!;
    // A column the LP text never names (zero cost, in no row) sits at its bound nearest 0.
    const fallback = Math.min(Math.max(0, v.lower), v.upper);
    values[i] = answer.Columns[`x${i}`]?.Primal ?? fallback;
  }
  const activity = new Float64Array(nRows);
  for (let r = 0; r < nRows; r++) activity[r] = model.rowValue(r, values);
  let rowDuals: Float64Array | null = null;
  if (!isMip) {
    rowDuals = new Float64Array(nRows);
    answer.Rows.forEach((row, k) => {
      const r = lpRows[k];
      if (r !== undefined) rowDuals![r] = (rowDuals![r] ?? 0) + (row.Dual ?? 0);
    });
  }
  return {
    status,
    solverStatus: answer.Status,
    objective: model.objectiveAt(values),
    values,
    activity,
    rowDuals,
  };
}
