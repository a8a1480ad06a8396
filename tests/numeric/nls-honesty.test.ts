/**
 * fitCurve says when it did not work: divergence, too few points, non-finite models,
 * bounds, weights, and the shape of the result. Data here are constructed (common
 * practice, no source) with known answers stated beside each check.
 */
import { describe, expect, it } from 'vitest';
import { fitCurve } from '../../src/numeric/nls.js';
import type { CurveModel } from '../../src/numeric/types.js';
import { michaelisMenten } from '../../src/numeric/models/michaelis-menten-basal.js';
import { parameterTuple } from '../../src/numeric/models/parameters.js';
import { at, entry, param } from './checked.js';

/** y = a·(1 − exp(−b·x)); on data that curve upward its best fit lies at a → ∞, b → 0. */
const saturating: CurveModel = {
  id: 'saturating',
  formula: 'y = a·(1 − exp(−b·x))',
  params: ['a', 'b'],
  f: (x, p) => {
    const [a, b] = parameterTuple(p, 2, 'saturating');
    return a * (1 - Math.exp(-b * x));
  },
  start: () => [10, 0.1],
};
const xs = [1, 2, 3, 4, 5, 6, 7, 8];

describe('fitCurve honesty', () => {
  it.each([
    ['straight line', xs.map((x) => 2 * x)],
    ['upward curve', xs.map((x) => 2 * x + 0.05 * x * x)],
  ])('a minimum at infinity (%s) is reported as diverged, not converged', (_label, ys) => {
    const fit = fitCurve(saturating, xs, ys);
    expect(fit.converged).toBe(false);
    expect(fit.stopReason).toBe('diverged');
  });

  it('too few points: n < parameters + 1', () => {
    const fit = fitCurve(michaelisMenten, [1, 2], [1, 2]);
    expect(fit.converged).toBe(false);
    expect(fit.stopReason).toBe('too-few-points');
    expect(param(fit, 'vm').se).toBeNaN();
  });

  it('a model producing NaN at the start is reported non-finite, without throwing', () => {
    const bad: CurveModel = { ...saturating, id: 'bad', f: (x, p) => Math.sqrt(-at(p, 0) - x) };
    const fit = fitCurve(bad, xs, xs, { start: [1, 1] });
    expect(fit.converged).toBe(false);
    expect(fit.stopReason).toBe('non-finite');
  });

  it('a parameter with no influence makes the fit singular, not converged', () => {
    const redundant: CurveModel = { ...saturating, id: 'redundant', params: ['a', 'b', 'unused'], f: (x, p) => at(p, 0) * x, start: () => [1, 1, 1] };
    const fit = fitCurve(redundant, xs, xs.map((x) => 3 * x + 0.1 * Math.sin(x)));
    expect(fit.converged).toBe(false);
    expect(fit.stopReason).toBe('singular');
  });

  it('non-finite points and zero weights are left out and counted', () => {
    const x = [0.02, 0.06, 0.11, 0.22, 0.56, 1.1, NaN, 0.5];
    const y = [60, 100, 130, 155, 195, 205, 100, 1000];
    const fit = fitCurve(michaelisMenten, x, y, { weights: [1, 1, 1, 1, 1, 1, 1, 0] });
    expect(fit.n).toBe(6);
    expect(fit.df).toBe(4);
  });

  it('weights: a weighted fit equals an unweighted fit of the points repeated by weight', () => {
    // Weight 2 on a point is the same least-squares problem as that point twice (exact identity).
    const x = [0.02, 0.06, 0.11, 0.22, 0.56, 1.1];
    const y = [60, 100, 130, 155, 195, 205];
    const weighted = fitCurve(michaelisMenten, x, y, { weights: [2, 1, 1, 1, 1, 2] });
    const repeated = fitCurve(michaelisMenten, [at(x, 0), ...x, at(x, 5)], [at(y, 0), ...y, at(y, 5)]);
    expect(weighted.converged && repeated.converged).toBe(true);
    weighted.parameters.forEach((p) => expect(p.estimate).toBeCloseTo(param(repeated, p.name).estimate, 8));
    expect(weighted.rss).toBeCloseTo(repeated.rss, 8);
  });

  it('bounds: an estimate pushed against its bound stays there and is marked atBound', () => {
    // Decreasing data: the unconstrained Michaelis–Menten fit would want K < 0.
    // At K = 0 the model is the constant Vm, so the constrained optimum is Vm = mean(y) = 5.241667
    // (computed by hand from these constructed values).
    const x = [1, 2, 3, 4, 5, 6];
    const y = [6, 5.5, 5.2, 5, 4.9, 4.85];
    const fit = fitCurve(michaelisMenten, x, y);
    expect(fit.converged).toBe(true);
    expect(param(fit, 'k').estimate).toBe(0);
    expect(param(fit, 'k').atBound).toBe(true);
    expect(param(fit, 'vm').atBound).toBeUndefined();
    expect(param(fit, 'vm').estimate).toBeCloseTo(31.45 / 6, 8);
  });

  it('analytic and finite-difference Jacobians give the same fit (Puromycin treated, R datasets::Puromycin)', () => {
    const conc = [0.02, 0.02, 0.06, 0.06, 0.11, 0.11, 0.22, 0.22, 0.56, 0.56, 1.1, 1.1];
    const rate = [76, 47, 97, 107, 123, 139, 159, 152, 191, 201, 207, 200];
    const analytic = fitCurve(michaelisMenten, conc, rate);
    const numeric = fitCurve({ ...michaelisMenten, gradient: undefined }, conc, rate);
    analytic.parameters.forEach((p) => {
      expect(Math.abs(p.estimate - param(numeric, p.name).estimate) / p.estimate).toBeLessThan(1e-8);
      expect(Math.abs(p.se - param(numeric, p.name).se) / p.se).toBeLessThan(1e-6);
    });
  });

  it('result shape: correlation is symmetric with unit diagonal; CI is estimate ± t·SE', () => {
    const fit = fitCurve(michaelisMenten, [0.02, 0.06, 0.11, 0.22, 0.56, 1.1], [60, 100, 130, 155, 195, 205]);
    expect(entry(fit.correlation, 0, 0)).toBeCloseTo(1, 12);
    expect(entry(fit.correlation, 0, 1)).toBeCloseTo(entry(fit.correlation, 1, 0), 12);
    // t(0.975, 4) = 2.776445 (R: qt(0.975, 4)), from memory; checked against SciPy t.ppf.
    const p = param(fit, 'vm');
    expect((p.ciHigh - p.estimate) / p.se).toBeCloseTo(2.776445, 5);
    expect((p.estimate - p.ciLow) / p.se).toBeCloseTo(2.776445, 5);
  });

  it('mismatched array lengths are a programming error and throw', () => {
    expect(() => fitCurve(michaelisMenten, [1, 2, 3], [1, 2])).toThrow(/x has 3 values but y has 2/);
  });

  it('a parameter vector of the wrong length is a programming error and throws, naming the model', () => {
    expect(() => fitCurve(michaelisMenten, xs, xs, { start: [1, 1, 1] })).toThrow(/fitCurve: 3 start values for the 2 parameters of michaelis-menten/);
    expect(() => fitCurve({ ...saturating, start: () => [10] }, xs, xs)).toThrow(/the start rule of saturating gave 1 values for its 2 parameters/);
    expect(() => fitCurve({ ...saturating, gradient: () => [1] }, xs, xs.map((x) => 3 * (1 - Math.exp(-0.5 * x))))).toThrow(/saturating: the gradient has 1 values for 2 parameters/);
    expect(() => fitCurve({ ...saturating, canonical: (p) => p.slice(1) }, xs, xs)).toThrow(/saturating: the canonical form has 1 values for 2 parameters/);
    expect(() => michaelisMenten.f(1, [1, 2, 3])).toThrow(/michaelis-menten: 3 parameter values given for its 2 parameters/);
  });
});
