/** Number formatting for the consult screens: every figure carries its unit. */
const fmt0 = new Intl.NumberFormat('en', { maximumFractionDigits: 0 });
const fmt1 = new Intl.NumberFormat('en', { maximumFractionDigits: 1 });

export function mg(v: number | null | undefined): string {
  return v === null || v === undefined ? '—' : `${fmt0.format(v)} mg`;
}
export function g(v: number | null | undefined, digits = 1): string {
  if (v === null || v === undefined) return '—';
  return `${(digits === 0 ? fmt0 : fmt1).format(v)} g`;
}
export function kcal(v: number | null | undefined): string {
  return v === null || v === undefined ? '—' : `${fmt0.format(v)} kcal`;
}
export function ratio(v: number | null | undefined): string {
  return v === null || v === undefined ? '—' : `${fmt1.format(v)} mg/g`;
}
/** An absorbable range "low–high mg (typical t mg)". */
export function range(
  r: { low: number; typical: number; high: number } | null | undefined,
): string {
  if (!r) return '—';
  return `${fmt0.format(r.low)}–${fmt0.format(r.high)} mg`;
}
export function pct(v: number): string {
  return `${fmt0.format(v * 100)} %`;
}
export function num(v: number | null | undefined, digits = 1): string {
  if (v === null || v === undefined) return '—';
  return new Intl.NumberFormat('en', { maximumFractionDigits: digits }).format(v);
}
