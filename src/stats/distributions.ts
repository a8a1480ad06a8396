/**
 * Distribution functions used by the fits and the statistics: thin wrappers over
 * the @stdlib/stats-base-dists-* packages (a well-kept library, as DESIGN.md §5
 * asks), so that the rest of the code imports one module and one naming.
 *
 * Each wrapper returns NaN for invalid arguments (e.g. df ≤ 0), as stdlib does.
 */
import tQuantileLib from '@stdlib/stats-base-dists-t-quantile';
import tCdfLib from '@stdlib/stats-base-dists-t-cdf';
import fCdfLib from '@stdlib/stats-base-dists-f-cdf';
import normalCdfLib from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantileLib from '@stdlib/stats-base-dists-normal-quantile';

/**
 * Quantile of Student's t distribution with `df` degrees of freedom.
 * Method: stdlib's inverse of the regularised incomplete beta function.
 * Source: @stdlib/stats-base-dists-t-quantile.
 * @example tQuantile(0.975, 10) // → 2.228139 (R: qt(0.975, 10) = 2.228139)
 */
export function tQuantile(probability: number, df: number): number {
  // Memoised: a study asks for the same few (level, df) pairs for thousands of comparisons, and
  // each costs an inverse incomplete beta (about 15 µs; 0.2 s of a 1,000-variant rebuild).
  const known = quantiles.get(probability)?.get(df);
  if (known !== undefined) return known;
  const q = tQuantileLib(probability, df);
  if (quantileCount >= QUANTILES_KEPT) {
    quantiles.clear();
    quantileCount = 0;
  }
  const byDf = quantiles.get(probability);
  if (byDf) byDf.set(df, q);
  else quantiles.set(probability, new Map([[df, q]]));
  quantileCount++;
  return q;
}

/** tQuantile's memo: probability → df → quantile; emptied when it holds QUANTILES_KEPT values. */
const quantiles = new Map<number, Map<number, number>>();
let quantileCount = 0;
const QUANTILES_KEPT = 10_000;

/**
 * Cumulative distribution function of Student's t distribution.
 * Source: @stdlib/stats-base-dists-t-cdf.
 * @example tCdf(2.228139, 10) // → 0.975
 */
export function tCdf(t: number, df: number): number {
  return tCdfLib(t, df);
}

/**
 * Two-sided p value of a t statistic: 2·P(T > |t|).
 * @example tTwoSidedP(-1.860813, 17.776474) // → 0.079394 (R t.test on sleep data)
 */
export function tTwoSidedP(t: number, df: number): number {
  if (!Number.isFinite(t) && !Number.isNaN(t)) return 0;
  return 2 * tCdfLib(-Math.abs(t), df);
}

/**
 * Cumulative distribution function of the F distribution with (df1, df2) degrees of freedom.
 * Source: @stdlib/stats-base-dists-f-cdf.
 * @example fCdf(3, 2, 10) // → 0.904 (R: pf(3, 2, 10) = 0.9046)
 */
export function fCdf(f: number, df1: number, df2: number): number {
  return fCdfLib(f, df1, df2);
}

/**
 * Upper-tail probability of the F distribution, P(F > f): the p value of an F test.
 * Computed as P(F(df2, df1) < 1/f), which keeps relative precision in the far tail
 * where 1 − cdf would round to 0.
 * @example fUpperP(3, 2, 10) // → 0.0954 (R: pf(3, 2, 10, lower.tail = FALSE) = 0.09536743)
 */
export function fUpperP(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f) || !(df1 > 0) || !(df2 > 0)) return NaN;
  if (f <= 0) return 1;
  return fCdfLib(1 / f, df2, df1);
}

/**
 * Cumulative distribution function of the normal distribution (default standard normal).
 * Source: @stdlib/stats-base-dists-normal-cdf.
 * @example normalCdf(1.959964) // → 0.975
 */
export function normalCdf(x: number, mean = 0, sd = 1): number {
  return normalCdfLib(x, mean, sd);
}

/**
 * Quantile of the normal distribution (default standard normal).
 * Source: @stdlib/stats-base-dists-normal-quantile.
 * @example normalQuantile(0.975) // → 1.959964
 */
export function normalQuantile(probability: number, mean = 0, sd = 1): number {
  return normalQuantileLib(probability, mean, sd);
}
