/**
 * Start-value helpers and the coarse-to-fine start rules, and the models' `evaluate` fast
 * path. Expected numbers are exact identities, analytic minima, or "computed from the same
 * inputs" by the plain routine a fast one replaces; tolerances on start values are common
 * practice, no source (a start need only lie in the optimum's basin).
 */
import { describe, expect, it } from 'vitest';
import { fitCurve } from '../../src/numeric/nls.js';
import {
  brentMinimise,
  decayInto,
  evenStep,
  geometricDecaySum,
  lineOnBasis,
  linearLeastSquares,
  solve3,
  solveSymmetric3,
} from '../../src/numeric/models/start-helpers.js';
import { exponentialSingle } from '../../src/numeric/models/exponential-single.js';
import { exponentialDouble } from '../../src/numeric/models/exponential-double.js';
import { hillForcePca } from '../../src/numeric/models/hill-force-pca.js';
import { michaelisMenten, michaelisMentenBasal } from '../../src/numeric/models/michaelis-menten-basal.js';
import type { CurveModel } from '../../src/numeric/types.js';
import { createRandom } from '../../src/stats/random.js';
import { at, param } from './checked.js';

const relative = (got: number, want: number) => Math.abs(got - want) / Math.abs(want);

describe('lineOnBasis equals linearLeastSquares (computed from the same inputs)', () => {
  it('doc example: y = 1 + 2g exactly', () => {
    const fit = lineOnBasis([0, 1, 2], [1, 3, 5], true)!;
    expect(fit.a).toBeCloseTo(1, 14);
    expect(fit.b).toBeCloseTo(2, 14);
    expect(fit.rss).toBeCloseTo(0, 20);
  });

  it.each([true, false])('random data, intercept %s', (intercept) => {
    const random = createRandom(intercept ? 1 : 2);
    const g = Array.from({ length: 24 }, () => random.uniform());
    const y = g.map((v) => 0.3 + 4 * v + random.normal(0, 0.2));
    const fast = lineOnBasis(g, y, intercept)!;
    const plain = linearLeastSquares(intercept ? [g.map(() => 1), g] : [g], y)!;
    const [a, b] = intercept ? [at(plain.coefficients, 0), at(plain.coefficients, 1)] : [0, at(plain.coefficients, 0)];
    expect(Math.abs(fast.a - a)).toBeLessThan(1e-12);
    expect(relative(fast.b, b)).toBeLessThan(1e-12);
    expect(relative(fast.rss, plain.rss)).toBeLessThan(1e-10);
  });

  it('is null for a basis with no spread', () => {
    expect(lineOnBasis([2, 2, 2], [1, 2, 3], true)).toBeNull();
    expect(lineOnBasis([0, 0, 0], [1, 2, 3], false)).toBeNull();
  });
});

describe('brentMinimise (analytic minima)', () => {
  it('(u − 2)² on [0, 5] → 2', () => {
    expect(brentMinimise((u) => (u - 2) ** 2, 0, 5, 1e-8).at).toBeCloseTo(2, 7);
  });
  it('cosh(u − 1.3) + 0.1u → 1.3 − asinh(0.1) = 1.200167', () => {
    let evaluations = 0;
    const r = brentMinimise((u) => (evaluations++, Math.cosh(u - 1.3) + 0.1 * u), -3, 7, 1e-9);
    expect(r.at).toBeCloseTo(1.3 - Math.asinh(0.1), 7);
    expect(evaluations).toBeLessThanOrEqual(100);
  });
  it('treats non-finite values as worse than any finite one', () => {
    expect(brentMinimise((u) => (u < 1 ? NaN : (u - 3) ** 2), 0, 10, 1e-8).at).toBeCloseTo(3, 6);
    expect(brentMinimise((u) => (u > 4 ? Infinity : (u - 3) ** 2), 0, 10, 1e-8).at).toBeCloseTo(3, 6);
  });
});

describe('solveSymmetric3 equals solve3 (computed from the same inputs)', () => {
  it('random symmetric systems and a singular one', () => {
    const random = createRandom(9);
    const out = new Float64Array(3);
    const draw = () => random.normal(0, 1);
    for (let trial = 0; trial < 50; trial++) {
      // Nine draws in order: the six distinct entries of the matrix, then the right-hand side.
      const [a00, a01, a02, a11, a12, a22, b0, b1, b2] = [draw(), draw(), draw(), draw(), draw(), draw(), draw(), draw(), draw()];
      const want = solve3([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]], [b0, b1, b2])!;
      expect(solveSymmetric3(a00, a01, a02, a11, a12, a22, b0, b1, b2, out)).toBe(true);
      want.forEach((v, j) => expect(Math.abs(at(out, j) - v)).toBeLessThan(1e-12 * Math.max(1, Math.abs(v))));
    }
    expect(solveSymmetric3(1, 2, 3, 4, 6, 9, 1, 1, 1, out)).toBe(false);
  });
});

describe('start rules', () => {
  const t = Array.from({ length: 400 }, (_, i) => i * 4.5);

  it('single exponential: the start is the least-squares optimum (variable projection, Golub & Pereyra 1973)', () => {
    // Large-residual case: a two-phase trace fitted with one phase.
    const random = createRandom(21);
    const y = t.map((v) => exponentialDouble.f(v, [0.7, 0.03, 0.3, 0.0034, 0.05]) + random.normal(0, 0.01));
    const start = exponentialSingle.start(t, y);
    const fit = fitCurve(exponentialSingle, t, y);
    expect(fit.converged).toBe(true);
    const startRss = y.reduce((s, v, i) => s + (exponentialSingle.f(at(t, i), start) - v) ** 2, 0);
    expect(relative(startRss, fit.rss)).toBeLessThan(1e-9);
    expect(relative(at(start, 1), param(fit, 'k').estimate)).toBeLessThan(1e-5);
  });

  it('double exponential: noise-free rates found to within 20% before any iteration', () => {
    const y = t.map((v) => exponentialDouble.f(v, [0.7, 0.03, 0.3, 0.0034, 0.05]));
    const start = exponentialDouble.start(t, y);
    expect(relative(at(start, 1), 0.03)).toBeLessThan(0.2);
    expect(relative(at(start, 3), 0.0034)).toBeLessThan(0.2);
  });

  it('Hill: noise-free pCa50 within half a grid step (0.025) and nH = 3 from the candidate list', () => {
    const pCa = [9, 6.4, 6.2, 6.0, 5.9, 5.8, 5.7, 5.6, 5.4, 4.5];
    const y = pCa.map((v) => hillForcePca.f(v, [2, 30, 5.83, 3]));
    const start = hillForcePca.start(pCa, y);
    expect(Math.abs(at(start, 2) - 5.83)).toBeLessThanOrEqual(0.025 + 1e-12);
    expect(start[3]).toBe(3);
  });
});

/** evaluate gives the same values and derivatives as f and gradient (bit for bit up to 1e-15 relative); common practice, no source. */
function checkEvaluate(model: CurveModel, p: number[], xs: number[]): void {
  const x = Float64Array.from(xs);
  const n = xs.length;
  const values = new Float64Array(n);
  const jac = new Float64Array(n * p.length);
  model.evaluate!(x, p, values, jac);
  xs.forEach((xi, i) => {
    const value = at(values, i);
    expect(Math.abs(value - model.f(xi, p))).toBeLessThanOrEqual(1e-15 * Math.max(1, Math.abs(value)));
    model.gradient!(xi, p).forEach((g, j) => expect(Math.abs(at(jac, j * n + i) - g)).toBeLessThanOrEqual(1e-15 * Math.max(1, Math.abs(g))));
  });
}

describe('evaluate fast path', () => {
  it.each([
    ['exponential-single', exponentialSingle, [1, 0.03, 0.1], [0, 10, 100, 1000]],
    ['exponential-double', exponentialDouble, [0.7, 0.03, 0.3, 0.0034, 0.05], [0, 60, 300, 900]],
  ] as const)('%s agrees with f and gradient', (_id, model, p, xs) => checkEvaluate(model, [...p], [...xs]));

  it('fitCurve gives the same fit with and without it (computed from the same inputs)', () => {
    const t = Array.from({ length: 200 }, (_, i) => i * 9);
    const random = createRandom(33);
    const y = t.map((v) => exponentialDouble.f(v, [0.7, 0.03, 0.3, 0.0034, 0.05]) + random.normal(0, 0.01));
    const fast = fitCurve(exponentialDouble, t, y);
    const plain = fitCurve({ ...exponentialDouble, evaluate: undefined }, t, y);
    expect(fast.converged).toBe(true);
    expect(plain.converged).toBe(true);
    expect(relative(fast.rss, plain.rss)).toBeLessThan(1e-12);
    fast.parameters.forEach((q) => {
      expect(relative(q.estimate, param(plain, q.name).estimate)).toBeLessThan(1e-8);
      expect(relative(q.se, param(plain, q.name).se)).toBeLessThan(1e-6);
    });
  });

  it('Michaelis–Menten models still start near the optimum on Puromycin treated (R datasets::Puromycin inputs)', () => {
    const conc = [0.02, 0.02, 0.06, 0.06, 0.11, 0.11, 0.22, 0.22, 0.56, 0.56, 1.1, 1.1];
    const treated = [76, 47, 97, 107, 123, 139, 159, 152, 191, 201, 207, 200];
    expect(relative(at(michaelisMenten.start(conc, treated), 1), 0.06412)).toBeLessThan(0.2);
    expect(relative(at(michaelisMentenBasal.start(conc, treated), 2), 0.1047)).toBeLessThan(0.2);
  });
});

describe('evenStep and decayInto (exact identities)', () => {
  it('detects even, increasing spacing only', () => {
    expect(evenStep([0, 4.5, 9, 13.5])).toBe(4.5);
    expect(evenStep([0, 1, 3])).toBeNull();
    expect(evenStep([3, 2, 1])).toBeNull();
    expect(evenStep([0, 1])).toBeNull();
  });
  it('the recurrence matches Math.exp to 1e-13 relative over 400 points', () => {
    const t = Array.from({ length: 400 }, (_, i) => 2 + i * 4.5);
    const step = evenStep(t);
    expect(step).not.toBeNull();
    const fast = new Float64Array(400);
    for (const k of [1e-5, 0.0034, 0.03, 0.2]) {
      decayInto(t, k, step, fast);
      t.forEach((v, i) => {
        const want = Math.exp(-k * v);
        expect(Math.abs(at(fast, i) - want)).toBeLessThanOrEqual(1e-13 * want + 1e-300);
      });
    }
  });
});

describe('Hill start equals the documented rule evaluated plainly (computed from the same inputs)', () => {
  it('dense grid with Math.pow and QR least squares gives the same start on noisy data', () => {
    const pCa = [9, 6.4, 6.2, 6.0, 5.9, 5.8, 5.7, 5.6, 5.4, 4.5];
    const random = createRandom(55);
    for (let trial = 0; trial < 20; trial++) {
      const y = pCa.map((v) => hillForcePca.f(v, [2, 30, 5.5 + random.uniform(), 1 + 4 * random.uniform()]) + random.normal(0, 1));
      const [low, high] = [4.5, 9];
      const steps = Math.round((high - low + 1) / 0.05) + 1;
      let want: number[] = [];
      let wantRss = Infinity;
      for (let s = 0; s < steps; s++) {
        const pCa50 = low - 0.5 + ((high - low + 1) * s) / (steps - 1);
        for (const nH of [0.5, 1, 1.5, 2, 3, 4, 6]) {
          const g = pCa.map((v) => 1 / (1 + Math.pow(10, nH * (v - pCa50))));
          const fit = linearLeastSquares([pCa.map(() => 1), g], y)!;
          if (fit.rss < wantRss) {
            wantRss = fit.rss;
            want = [at(fit.coefficients, 0), at(fit.coefficients, 1), pCa50, nH];
          }
        }
      }
      const got = hillForcePca.start(pCa, y);
      expect(got[2]).toBeCloseTo(at(want, 2), 12);
      expect(got[3]).toBe(at(want, 3));
      expect(relative(at(got, 0), at(want, 0))).toBeLessThan(1e-9);
      expect(relative(at(got, 1), at(want, 1))).toBeLessThan(1e-9);
    }
  });
});

describe('geometricDecaySum equals the direct sum (computed from the same inputs)', () => {
  it.each([
    [0.5, 0, 1, 3],
    [1e-7, 2, 4.5, 400],
    [0.0034 + 0.03, 0, 4.5, 400],
    [0.4, 10, 4.5, 400],
    [0, 3, 1, 7],
  ])('s = %d, t0 = %d, Δ = %d, n = %d', (s, t0, step, n) => {
    let direct = 0;
    for (let i = 0; i < n; i++) direct += Math.exp(-s * (t0 + i * step));
    expect(relative(geometricDecaySum(s, t0, step, n), direct)).toBeLessThan(1e-12);
  });
  it('doc example: 1 + e^−0.5 + e^−1 = 1.974410', () => {
    expect(geometricDecaySum(0.5, 0, 1, 3)).toBeCloseTo(1.97441, 5);
  });
});

describe('double-exponential start: closed-form sums (even times) and data passes (uneven) agree', () => {
  it('same start rates to 1e-3 on the same trace (computed from the same inputs)', () => {
    const t = Array.from({ length: 400 }, (_, i) => i * 4.5);
    const random = createRandom(44);
    const y = t.map((v) => exponentialDouble.f(v, [0.7, 0.03, 0.3, 0.0034, 0.05]) + random.normal(0, 0.01));
    const uneven = t.slice();
    uneven[200] = at(t, 200) + 1e-3; // beyond evenStep's slack (1e-9 of the 1795.5 s span), far below the 4.5 s step
    expect(evenStep(t)).not.toBeNull();
    expect(evenStep(uneven)).toBeNull();
    const a = exponentialDouble.start(t, y);
    const b = exponentialDouble.start(uneven, y);
    expect(relative(at(a, 1), at(b, 1))).toBeLessThan(1e-3);
    expect(relative(at(a, 3), at(b, 3))).toBeLessThan(1e-3);
  });
});

describe('double-exponential start on uneven times: Gram sums formed several per pass', () => {
  it('gives exactly the start of one pass per sum', () => {
    const random = createRandom(44);
    const t = Array.from({ length: 137 }, (_, i) => i * 13 + 0.37 * Math.sin(i));
    const y = t.map((v) => exponentialDouble.f(v, [0.7, 0.03, 0.3, 0.0034, 0.05]) + random.normal(0, 0.01));
    expect(evenStep(t)).toBeNull();
    // Regression pin: the output of the implementation with one pass over the data per Gram sum
    // (commit 7e6da64), recorded; each sum still adds its terms in the same order, so no bit may change.
    expect(exponentialDouble.start(t, y)).toEqual([0.7216110375559701, 0.02938396373006559, 0.28628401806000237, 0.003263115054747947, 0.05135797621851321]);
  });
});

describe('sizes that do not fit are refused (a RangeError naming the helper, not NaN)', () => {
  it('basis and matrix shapes', () => {
    expect(() => lineOnBasis([0, 1], [1, 3, 5], true)).toThrow(/lineOnBasis: the basis has 2 values for 3 observations/);
    expect(() => linearLeastSquares([[1, 1, 1], [0, 1]], [1, 3, 5])).toThrow(/linearLeastSquares: basis column 1 has 2 values for 3 observations/);
    expect(() => solve3([[2, 0, 0], [0, 3, 0]], [2, 3, 4])).toThrow(/solve3: needs a 3×3 matrix and 3 right-hand sides; got 2 rows of 3, 3 and 3/);
    expect(() => solve3([[2, 0, 0], [0, 3, 0], [0, 0, 4]], [2, 3])).toThrow(/solve3: needs a 3×3 matrix/);
    expect(solve3([[2, 0, 0], [0, 3, 0], [0, 0, 4]], [2, 3, 4])).toEqual([1, 1, 1]);
  });
  it('a model refuses a parameter vector of another length, naming itself', () => {
    expect(() => exponentialDouble.start([0, 1, 2, 3], [1, 0.5, 0.25])).toThrow(/exponential-double start: 4 times but 3 values/);
    expect(() => exponentialDouble.f(0, [0.7, 0.03, 0.3, 0.0034])).toThrow(/exponential-double: 4 parameter values given for its 5 parameters/);
    expect(() => hillForcePca.gradient!(5, [2, 30, 5.8])).toThrow(/hill-force-pca: 3 parameter values given for its 4 parameters/);
  });
});
