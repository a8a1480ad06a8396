/**
 * Two-sample t tests of a difference of means (group a − group b).
 *
 * Welch's test (unequal variances): t = (x̄a − x̄b)/√(sa²/na + sb²/nb), degrees of freedom
 * by the Welch–Satterthwaite equation (Welch 1947, Biometrika 34:28; Satterthwaite 1946).
 * Student's test (equal variances): pooled variance sp² = ((na−1)sa² + (nb−1)sb²)/(na+nb−2),
 * t = (x̄a − x̄b)/(sp·√(1/na + 1/nb)), df = na + nb − 2 (Student 1908).
 * Both report a two-sided p value and the confidence interval of the difference, as R's
 * `t.test(a, b)` and `t.test(a, b, var.equal = TRUE)`.
 * @example
 * welchTTest(sleepGroup1, sleepGroup2)
 * // → t −1.860813, df 17.776474, p 0.079394, 95% CI −3.3654832 to 0.2054832 (R t.test on datasets::sleep)
 */
import { mean, variance } from './descriptive.js';
import { tQuantile, tTwoSidedP } from './distributions.js';

export interface TTestResult {
  /** Difference of means, mean(a) − mean(b). */
  difference: number;
  /** Standard error of the difference. */
  se: number;
  t: number;
  df: number;
  /** Two-sided p value. */
  p: number;
  ciLow: number;
  ciHigh: number;
  /** Confidence level of the interval, e.g. 0.95. */
  level: number;
}

function result(difference: number, se: number, df: number, level: number): TTestResult {
  const t = difference / se;
  const q = tQuantile(0.5 + level / 2, df);
  return { difference, se, t, df, p: tTwoSidedP(t, df), ciLow: difference - q * se, ciHigh: difference + q * se, level };
}

/** Welch's unequal-variance t test; see the file comment. NaN fields when either group has < 2 values. */
export function welchTTest(a: readonly number[], b: readonly number[], level = 0.95): TTestResult {
  const va = variance(a) / a.length;
  const vb = variance(b) / b.length;
  const se = Math.sqrt(va + vb);
  const df = ((va + vb) * (va + vb)) / ((va * va) / (a.length - 1) + (vb * vb) / (b.length - 1));
  return result(mean(a) - mean(b), se, df, level);
}

/** Student's equal-variance (pooled) t test; see the file comment. */
export function studentTTest(a: readonly number[], b: readonly number[], level = 0.95): TTestResult {
  const df = a.length + b.length - 2;
  const pooled = ((a.length - 1) * variance(a) + (b.length - 1) * variance(b)) / df;
  const se = Math.sqrt(pooled * (1 / a.length + 1 / b.length));
  return result(mean(a) - mean(b), se, df, level);
}
