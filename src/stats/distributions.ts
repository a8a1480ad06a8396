/**
 * Distribution functions used by the fits and the statistics: thin wrappers over
 * the @stdlib/stats-base-dists-* packages (a well-kept library), so that the rest of the code imports one module and one naming.
 *
 * Each wrapper returns NaN for invalid arguments (e.g. df ≤ 0), as stdlib does.
 */
import tQuantileLib from '@stdlib/stats-base-dists-t-quantile';
import tCdfLib from '@stdlib/stats-base-dists-t-cdf';
import fCdfLib from '@stdlib/stats-base-dists-f-cdf';

/**
 * Quantile of Student's t distribution with `df` degrees of freedom.
 * Method: stdlib's inverse of the regularised incomplete beta function.
 * Source: @stdlib/stats-base-dists-t-quantile.
 * @example tQuantile(0.975, 10) // → 2.228139 (R: qt(0.975, 10) = 2.228139)
 */
export function tQuantile(probability: number, df: number): number {
  return tQuantileLib(probability, df);
}

/**
 * Cumulative distribution function of Student's t distribution.
 * Source: @stdlib/stats-base-dists-t-cdf.
 * @example tCdf(2.228139, 10) // → 0.975
 */
export function tCdf(t: number, df: number): number {
  return tCdfLib(t, df);
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
