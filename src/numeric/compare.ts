/**
 * Choosing between two nested curve fits to the same points (e.g. single versus double
 * exponential for a single-turnover trace).
 *
 * Two methods, both from Motulsky & Christopoulos 2004, "Fitting Models to Biological Data
 * Using Linear and Nonlinear Regression" (Oxford UP), chapters 21–22 (model comparison):
 *  - extra-sum-of-squares F test (`extraSumOfSquaresF`);
 *  - Akaike's information criterion for least squares (`compareAic`), in the form of
 *    Burnham & Anderson 2002, "Model Selection and Multimodel Inference", 2nd ed., §2.2 and
 *    §2.4: AIC = n·ln(RSS/n) + 2K and the small-sample AICc = AIC + 2K(K + 1)/(n − K − 1),
 *    where K = number of curve parameters + 1 (the residual variance is also estimated).
 *
 * A complex fit that did not converge is never preferred: the simpler one is kept and the
 * reason says why.
 */
import { fUpperP } from '../stats/distributions.js';
import type { FitResult } from './types.js';

export interface FTestResult {
  /** F = ((RSS_simple − RSS_complex)/(df_simple − df_complex)) / (RSS_complex/df_complex). */
  f: number;
  /** Numerator degrees of freedom: extra parameters of the complex model. */
  df1: number;
  /** Denominator degrees of freedom: n − parameters of the complex model. */
  df2: number;
  /** Upper-tail p value of F(df1, df2). */
  p: number;
  keep: 'simple' | 'complex';
  reason: string;
}

/**
 * Extra-sum-of-squares F test for nested least-squares fits of the same points.
 * Keeps the complex model when p < alpha and both fits converged.
 * @example
 * extraSumOfSquaresF({ rss: 10, df: 20, … }, { rss: 5, df: 18, … }, 0.05)
 * // → f = ((10 − 5)/2)/(5/18) = 9, df1 2, df2 18, p = 0.001953, keep 'complex'
 */
export function extraSumOfSquaresF(simple: FitResult, complex: FitResult, alpha: number): FTestResult {
  const df1 = simple.df - complex.df;
  const df2 = complex.df;
  const base = { df1, df2 };
  if (simple.n !== complex.n || df1 <= 0 || df2 <= 0) {
    return { ...base, f: NaN, p: NaN, keep: 'simple', reason: 'fits are not nested fits of the same points' };
  }
  if (!complex.converged) {
    return { ...base, f: NaN, p: NaN, keep: 'simple', reason: `the ${complex.modelId} fit did not converge (${complex.stopReason})` };
  }
  if (!(complex.rss < simple.rss)) {
    return { ...base, f: 0, p: 1, keep: 'simple', reason: `the ${complex.modelId} fit does not lower the residual sum of squares` };
  }
  const f = (simple.rss - complex.rss) / df1 / (complex.rss / df2);
  const p = fUpperP(f, df1, df2);
  const keep = p < alpha ? 'complex' : 'simple';
  const reason = `extra-sum-of-squares F(${df1}, ${df2}) = ${f.toPrecision(4)}, p = ${p.toPrecision(3)} ${keep === 'complex' ? '<' : '≥'} ${alpha}`;
  return { ...base, f, p, keep, reason };
}

/**
 * AIC for a least-squares fit: n·ln(RSS/n) + 2K with K = parameters + 1
 * (Burnham & Anderson 2002, §2.2). NaN when RSS ≤ 0 or n is 0.
 * @example aicLeastSquares(10, 20, 2) // → 20·ln(0.5) + 6 = −7.8629
 */
export function aicLeastSquares(rss: number, n: number, parameters: number): number {
  if (!(rss > 0) || !(n > 0)) return NaN;
  return n * Math.log(rss / n) + 2 * (parameters + 1);
}

/**
 * Small-sample corrected AIC: AIC + 2K(K + 1)/(n − K − 1), K = parameters + 1
 * (Burnham & Anderson 2002, §2.4, eq. 2.5 via Hurvich & Tsai 1989). NaN when n ≤ K + 1.
 * @example aiccLeastSquares(10, 20, 2) // → −7.8629 + 2·3·4/16 = −6.3629
 */
export function aiccLeastSquares(rss: number, n: number, parameters: number): number {
  const k = parameters + 1;
  if (n - k - 1 <= 0) return NaN;
  return aicLeastSquares(rss, n, parameters) + (2 * k * (k + 1)) / (n - k - 1);
}

export interface AicComparison {
  /** AICc of each fit (AICc, not AIC: the correction matters at the point counts of bench assays). */
  aiccSimple: number;
  aiccComplex: number;
  /** AICc(simple) − AICc(complex): positive favours the complex model. */
  delta: number;
  /** Akaike weight of the complex model, 1/(1 + exp(−delta/2)): its probability of being the better of the two. */
  weightComplex: number;
  keep: 'simple' | 'complex';
  reason: string;
}

/**
 * Compare two fits of the same points by AICc; keeps the one with the lower AICc, the
 * simple one on ties or when the complex fit did not converge.
 * @example compareAic(fitSingle, fitDouble) // → { delta: 25.1, weightComplex: 0.99999, keep: 'complex', … }
 */
export function compareAic(simple: FitResult, complex: FitResult): AicComparison {
  const pSimple = simple.parameters.length;
  const pComplex = complex.parameters.length;
  const aiccSimple = aiccLeastSquares(simple.rss, simple.n, pSimple);
  const aiccComplex = aiccLeastSquares(complex.rss, complex.n, pComplex);
  const delta = aiccSimple - aiccComplex;
  const weightComplex = 1 / (1 + Math.exp(-delta / 2));
  if (simple.n !== complex.n) {
    return { aiccSimple, aiccComplex, delta: NaN, weightComplex: NaN, keep: 'simple', reason: 'fits are not of the same points' };
  }
  if (!complex.converged) {
    return { aiccSimple, aiccComplex, delta, weightComplex, keep: 'simple', reason: `the ${complex.modelId} fit did not converge (${complex.stopReason})` };
  }
  const keep = delta > 0 ? 'complex' : 'simple';
  return { aiccSimple, aiccComplex, delta, weightComplex, keep, reason: `ΔAICc = ${delta.toPrecision(3)} (AICc simple − complex)` };
}
