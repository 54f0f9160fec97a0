/**
 * Distribution-free confidence interval for a median from order statistics (the sign-test interval):
 * with the n values sorted, [x_(k), x_(n−k+1)] covers the population median with probability
 * 1 − 2·P(B ≤ k − 1), B ~ Binomial(n, ½), where k is the largest index keeping that probability
 * ≥ 1 − α (Conover 1999, Practical Nonparametric Statistics, 3rd ed., §3.2; Hollander & Wolfe 1999 §3.6).
 * It assumes independent values; consecutive nights are not fully independent (weather runs in
 * spells), so the interval is, if anything, too narrow. Pure module.
 */

/** log(n choose j) by summing logs (n is at most a few thousand nights). */
function logChoose(n: number, j: number): number {
  let s = 0;
  for (let i = 1; i <= j; i++) s += Math.log(n - j + i) - Math.log(i);
  return s;
}

/** P(B ≤ m) for B ~ Binomial(n, ½). */
export function binomialHalfCdf(n: number, m: number): number {
  if (m < 0) return 0;
  if (m >= n) return 1;
  let p = 0;
  for (let j = 0; j <= m; j++) p += Math.exp(logChoose(n, j) - n * Math.LN2);
  return Math.min(1, p);
}

export type MedianCi = { lower: number; upper: number; k: number; coverage: number; method: string } | null;

/** The (1 − alpha) order-statistic interval for the median of `values`; null when n is too small. */
export function medianConfidenceInterval(values: readonly number[], alpha = 0.05): MedianCi {
  const n = values.length;
  if (n < 6) return null; // for n ≤ 5 even [min, max] covers less than 95 %
  const sorted = [...values].sort((a, b) => a - b);
  let k = 0;
  // Largest k with 2·P(B ≤ k − 1) ≤ alpha.
  while (k + 1 <= Math.floor((n + 1) / 2) && 2 * binomialHalfCdf(n, k) <= alpha) k++;
  if (k < 1) return null;
  return {
    lower: sorted[k - 1]!,
    upper: sorted[n - k]!,
    k,
    coverage: 1 - 2 * binomialHalfCdf(n, k - 1),
    method: "distribution-free interval for the median from order statistics (sign-test interval, Conover 1999 §3.2)",
  };
}
