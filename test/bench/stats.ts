// Benchmark statistics: nearest-rank percentile (common practice, no source).
/** Percentile (0-100) of a list of numbers, nearest-rank method. */
export function percentile(values: readonly number[], p: number): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const rank = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[rank] as number;
}

/** Formats a number with thousands separators. */
export function fmt(n: number, digits = 0): string {
  return n.toLocaleString('en-US', {
    maximumFractionDigits: digits,
    minimumFractionDigits: digits,
  });
}
