/** Small statistics helpers for intervals from block-averaged data. */

// Two-sided 95 % Student t quantiles t(0.975, df) for df 1…30 (standard statistical tables).
const T975 = [
  12.706, 4.303, 3.182, 2.776, 2.571, 2.447, 2.365, 2.306, 2.262, 2.228, 2.201, 2.179, 2.16, 2.145, 2.131,
  2.12, 2.11, 2.101, 2.093, 2.086, 2.08, 2.074, 2.069, 2.064, 2.06, 2.056, 2.052, 2.048, 2.045, 2.042,
];

/** t(0.975, df); beyond 30 degrees of freedom 1.96 + 2.4/df is within 0.002 of the tables. */
export function tQuantile975(df: number): number {
  if (!(df >= 1)) return NaN;
  const d = Math.floor(df);
  return d <= 30 ? T975[d - 1] : 1.96 + 2.4 / d;
}

/** [lo, hi] interval, or null when it cannot be formed. */
export function interval95(estimate: number, se: number, df: number): [number, number] | null {
  const t = tQuantile975(df);
  if (!Number.isFinite(estimate) || !Number.isFinite(se) || !Number.isFinite(t)) return null;
  return [estimate - t * se, estimate + t * se];
}

/** Mean and 95 % interval of independent block means from Σx, Σx², count. */
export function meanInterval(n: number, sum: number, sumSq: number): { mean: number; ci95: [number, number] | null } {
  if (n < 1) return { mean: NaN, ci95: null };
  const mean = sum / n;
  if (n < 2) return { mean, ci95: null };
  const variance = Math.max(0, (sumSq - n * mean * mean) / (n - 1));
  return { mean, ci95: interval95(mean, Math.sqrt(variance / n), n - 1) };
}

/** Round for the summary; null for anything not finite (the summary never holds NaN). */
export function roundOrNull(v: number, digits: number): number | null {
  if (!Number.isFinite(v)) return null;
  const f = 10 ** digits;
  // + 0 turns −0 into 0 (JSON writes −0 as 0, so the summary would not survive a round trip).
  return Math.round(v * f) / f + 0;
}

export function roundPair(p: [number, number] | null, digits: number): [number, number] | null {
  if (!p) return null;
  const a = roundOrNull(p[0], digits);
  const b = roundOrNull(p[1], digits);
  return a === null || b === null ? null : [a, b];
}
