/**
 * Descriptive statistics. Each function ignores nothing: callers remove missing values
 * first (a NaN in gives NaN out), so that dropping data is always visible at the call site.
 */

/**
 * Arithmetic mean, summed in input order. NaN for an empty list.
 * @example mean([1, 2, 3, 4]) // → 2.5
 */
export function mean(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

/**
 * Sample variance with Bessel's correction, Σ(x − x̄)²/(n − 1), two-pass (mean first).
 * NaN when n < 2.
 * @example variance([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]) // → 9.166667 (R: var(1:10))
 */
export function variance(values: readonly number[]): number {
  const n = values.length;
  if (n < 2) return NaN;
  const m = mean(values);
  let sum = 0;
  for (const v of values) sum += (v - m) * (v - m);
  return sum / (n - 1);
}

/**
 * Sample standard deviation with Bessel's correction, √variance. NaN when n < 2.
 * @example sd([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]) // → 3.02765 (R: sd(1:10))
 */
export function sd(values: readonly number[]): number {
  return Math.sqrt(variance(values));
}

/**
 * Standard error of the mean, sd/√n. NaN when n < 2.
 * @example se([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]) // → 0.957427
 */
export function se(values: readonly number[]): number {
  return sd(values) / Math.sqrt(values.length);
}

/**
 * Sample quantile, type 7 of Hyndman & Fan (1996, Am Stat 50:361), R's default: with the
 * sorted values x_1..x_n, h = (n − 1)·p + 1 and Q(p) = x_⌊h⌋ + (h − ⌊h⌋)·(x_⌊h⌋+1 − x_⌊h⌋).
 * NaN for an empty list or p outside [0, 1].
 * @example quantile([1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 0.25) // → 3.25 (R: quantile(1:10, 0.25))
 */
export function quantile(values: readonly number[], p: number): number {
  const n = values.length;
  if (n === 0 || !(p >= 0 && p <= 1)) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return quantileSorted(sorted, p);
}

/** Type 7 quantile of values already sorted ascending (see `quantile`). */
export function quantileSorted(sorted: readonly number[], p: number): number {
  const n = sorted.length;
  if (n === 0 || !(p >= 0 && p <= 1)) return NaN;
  const h = (n - 1) * p;
  const low = Math.floor(h);
  const high = Math.min(low + 1, n - 1);
  // 0 ≤ low ≤ high ≤ n − 1, as n ≥ 1 and 0 ≤ p ≤ 1.
  const below = sorted[low]!;
  const above = sorted[high]!;
  return below + (h - low) * (above - below);
}

/**
 * Median: the type 7 quantile at 0.5 (the middle value, or the mean of the two middle values).
 * @example median([3, 1, 4, 1]) // → 2
 */
export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}
