/**
 * Nested-model comparison. Expected numbers: SciPy 1.17 stats.f.sf (computed from the
 * constructed inputs) and the AIC formulas of Burnham & Anderson 2002 evaluated by hand.
 */
import { describe, expect, it } from 'vitest';
import { aicLeastSquares, aiccLeastSquares, compareAic, extraSumOfSquaresF } from '../../src/numeric/compare.js';
import type { FitResult } from '../../src/numeric/types.js';
import { fitCurve } from '../../src/numeric/nls.js';
import { exponentialSingle } from '../../src/numeric/models/exponential-single.js';
import { exponentialDouble } from '../../src/numeric/models/exponential-double.js';
import { createRandom } from '../../src/stats/random.js';

function fakeFit(rss: number, n: number, k: number, converged = true): FitResult {
  return {
    modelId: `k${k}`,
    parameters: Array.from({ length: k }, (_, j) => ({ name: `p${j}`, estimate: 1, se: 0.1, ciLow: 0.8, ciHigh: 1.2 })),
    rss, residualSd: Math.sqrt(rss / (n - k)), df: n - k, r2: 0.9, n, iterations: 5, converged,
    stopReason: converged ? 'converged-rss' : 'max-iterations', correlation: [],
  };
}

describe('extra-sum-of-squares F test', () => {
  it('F = ((10 − 5)/2)/(5/18) = 9, p = 0.001953125 (SciPy f.sf(9, 2, 18))', () => {
    const r = extraSumOfSquaresF(fakeFit(10, 22, 2), fakeFit(5, 22, 4), 0.05);
    expect(r.f).toBeCloseTo(9, 12);
    expect([r.df1, r.df2]).toEqual([2, 18]);
    expect(r.p).toBeCloseTo(0.001953125, 9);
    expect(r.keep).toBe('complex');
  });
  it('keeps the simple model when the complex fit did not converge', () => {
    const r = extraSumOfSquaresF(fakeFit(10, 22, 2), fakeFit(1, 22, 4, false), 0.05);
    expect(r.keep).toBe('simple');
    expect(r.reason).toMatch(/did not converge/);
  });
  it('keeps the simple model when p ≥ alpha: F = ((10 − 9)/2)/(9/18) = 1, p = 0.3874 (SciPy f.sf(1, 2, 18) = 0.38742)', () => {
    const r = extraSumOfSquaresF(fakeFit(10, 22, 2), fakeFit(9, 22, 4), 0.05);
    expect(r.p).toBeCloseTo(0.38742, 4);
    expect(r.keep).toBe('simple');
  });
});

describe('AIC (Burnham & Anderson 2002 §2.2, §2.4; K = parameters + 1)', () => {
  it('AIC = n·ln(RSS/n) + 2K: 20·ln(0.5) + 6 = −7.862944 (by hand)', () => {
    expect(aicLeastSquares(10, 20, 2)).toBeCloseTo(20 * Math.log(0.5) + 6, 12);
    expect(aicLeastSquares(10, 20, 2)).toBeCloseTo(-7.862944, 6);
  });
  it('AICc = AIC + 2K(K + 1)/(n − K − 1): −7.862944 + 24/16 = −6.362944 (by hand)', () => {
    expect(aiccLeastSquares(10, 20, 2)).toBeCloseTo(-6.362944, 6);
    expect(aiccLeastSquares(10, 4, 2)).toBeNaN();
  });
  it('prefers the lower AICc', () => {
    expect(compareAic(fakeFit(10, 40, 3), fakeFit(2, 40, 5)).keep).toBe('complex');
    expect(compareAic(fakeFit(10, 40, 3), fakeFit(9.9, 40, 5)).keep).toBe('simple');
  });
});

describe('single versus double exponential on seeded synthetic traces (simulation, known truth)', () => {
  const t = Array.from({ length: 181 }, (_, i) => i * 5);
  const replicates = 40;
  it('true single exponential: the F test keeps the single exponential in ≥ 85% of traces (nominal 95%)', () => {
    const random = createRandom(101);
    let keptSimple = 0;
    for (let r = 0; r < replicates; r++) {
      const y = t.map((v) => Math.exp(-0.01 * v) + 0.05 + random.normal(0, 0.01));
      const single = fitCurve(exponentialSingle, t, y);
      const double = fitCurve(exponentialDouble, t, y);
      if (extraSumOfSquaresF(single, double, 0.05).keep === 'simple') keptSimple++;
    }
    expect(keptSimple / replicates).toBeGreaterThanOrEqual(0.85);
  });
  it('true double exponential, rates 10× apart: the F test and AICc keep the double exponential in every trace', () => {
    const random = createRandom(202);
    for (let r = 0; r < replicates; r++) {
      const y = t.map((v) => 0.7 * Math.exp(-0.03 * v) + 0.3 * Math.exp(-0.003 * v) + 0.05 + random.normal(0, 0.01));
      const single = fitCurve(exponentialSingle, t, y);
      const double = fitCurve(exponentialDouble, t, y);
      expect(extraSumOfSquaresF(single, double, 0.05).keep).toBe('complex');
      expect(compareAic(single, double).keep).toBe('complex');
    }
  });
});
