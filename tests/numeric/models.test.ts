/**
 * Curve models: published fits and check points.
 * Sources: R datasets::Puromycin (Bates & Watts 1988); Hill and
 * double-exponential check points computed from the models [C]; SciPy 1.17 least_squares for the basal variant
 * (computed from the Puromycin inputs).
 */
import { describe, expect, it } from 'vitest';
import { fitCurve } from '../../src/numeric/nls.js';
import { michaelisMenten, michaelisMentenBasal } from '../../src/numeric/models/michaelis-menten-basal.js';
import { hillForcePca, pCaAtFraction } from '../../src/numeric/models/hill-force-pca.js';
import { exponentialSingle } from '../../src/numeric/models/exponential-single.js';
import { exponentialDouble, slowFraction } from '../../src/numeric/models/exponential-double.js';
import type { CurveModel } from '../../src/numeric/types.js';
import { at, entry, param } from './checked.js';

const relative = (got: number, want: number) => Math.abs(got - want) / Math.abs(want);

const conc = [0.02, 0.02, 0.06, 0.06, 0.11, 0.11, 0.22, 0.22, 0.56, 0.56, 1.1, 1.1];
const treated = [76, 47, 97, 107, 123, 139, 159, 152, 191, 201, 207, 200];
const untreated = [67, 51, 84, 86, 98, 115, 131, 124, 144, 158, 160];

describe('Michaelis–Menten on R datasets::Puromycin (Bates & Watts 1988)', () => {
  // R's nls stops at ~6 significant digits (from R's printed fit), so parameters are compared at 1e-5 relative;
  // the full-precision optimum is checked against SciPy 1.17 least_squares (xtol = ftol = gtol = 1e-15),
  // computed from the Puromycin inputs, agreeing to 1e-7 (both stop on RSS changes near 1e-15): treated Vm 212.683744, K 0.0641212824; untreated Vm 160.280047, K 0.0477081858.
  it.each([
    { label: 'treated [V]', x: conc, y: treated, vm: 212.68370711, k: 0.06412123, scipy: [212.683744, 0.0641212824], seVm: 6.947, seK: 0.008281, rss: 1195.449, sd: 10.93, corr: 0.7651 },
    { label: 'untreated [C]', x: conc.slice(0, 11), y: untreated, vm: 160.28013, k: 0.04770831, scipy: [160.280047, 0.0477081858], seVm: 6.480283, seK: 0.00778198, rss: 859.604294, sd: NaN, corr: NaN },
  ])('$label', ({ x, y, vm, k, scipy, seVm, seK, rss, sd, corr }) => {
    const fit = fitCurve(michaelisMenten, x, y);
    expect(fit.converged).toBe(true);
    expect(relative(param(fit, 'vm').estimate, vm)).toBeLessThan(1e-5);
    expect(relative(param(fit, 'k').estimate, k)).toBeLessThan(1e-5);
    expect(relative(param(fit, 'vm').estimate, at(scipy, 0))).toBeLessThan(1e-7);
    expect(relative(param(fit, 'k').estimate, at(scipy, 1))).toBeLessThan(1e-7);
    expect(relative(param(fit, 'vm').se, seVm)).toBeLessThan(1e-3);
    expect(relative(param(fit, 'k').se, seK)).toBeLessThan(1e-3);
    expect(relative(fit.rss, rss)).toBeLessThan(1e-6);
    if (!Number.isNaN(sd)) expect(fit.residualSd).toBeCloseTo(sd, 2);
    if (!Number.isNaN(corr)) expect(entry(fit.correlation, 0, 1)).toBeCloseTo(corr, 4);
  });

  it('with basal term, treated: SciPy least_squares (computed from the Puromycin inputs)', () => {
    // SciPy 1.17 optimize.least_squares (xtol = ftol = gtol = 1e-15), SE from s²(JᵀJ)⁻¹:
    // basal 31.7048746, kcat 189.964763, km 0.104666093, RSS 798.528708615, SE 12.7080765, 11.2455534, 0.02621902.
    const fit = fitCurve(michaelisMentenBasal, conc, treated);
    expect(fit.converged).toBe(true);
    const want = [31.7048746, 189.964763, 0.104666093];
    const wantSe = [12.7080765, 11.2455534, 0.02621902];
    expect(fit.parameters).toHaveLength(want.length);
    fit.parameters.forEach((p, j) => {
      expect(relative(p.estimate, at(want, j))).toBeLessThan(1e-6);
      expect(relative(p.se, at(wantSe, j))).toBeLessThan(1e-5);
    });
    expect(relative(fit.rss, 798.528708615)).toBeLessThan(1e-9);
  });

  it('start rule alone lands near the optimum (within 20% on Puromycin treated; common practice, no source)', () => {
    const start = michaelisMentenBasal.start(conc, treated);
    expect(relative(at(start, 1), 189.96)).toBeLessThan(0.2);
    expect(relative(at(start, 2), 0.1047)).toBeLessThan(0.2);
  });
});

/** Analytic gradients agree with central differences (relative 1e-6) at a few points; common practice, no source. */
function checkGradient(model: CurveModel, p: number[], xs: number[]): void {
  for (const x of xs) {
    const g = model.gradient!(x, p);
    p.forEach((v, j) => {
      const h = 1e-6 * Math.max(Math.abs(v), 1e-3);
      const up = p.slice();
      const down = p.slice();
      up[j] = v + h;
      down[j] = v - h;
      const fd = (model.f(x, up) - model.f(x, down)) / (2 * h);
      expect(Math.abs(at(g, j) - fd)).toBeLessThan(1e-6 * Math.max(1, Math.abs(fd)));
    });
  }
}

describe('analytic gradients match finite differences', () => {
  it.each([
    ['michaelis-menten-basal', michaelisMentenBasal, [0.03, 5, 20], [0, 5, 50, 100]],
    ['michaelis-menten', michaelisMenten, [5, 20], [1, 5, 50, 100]],
    ['hill-force-pca', hillForcePca, [2, 30, 5.8, 3], [4.5, 5.6, 5.8, 6.1, 9]],
    ['exponential-single', exponentialSingle, [1, 0.03, 0.1], [0, 10, 100]],
    ['exponential-double', exponentialDouble, [0.7, 0.03, 0.3, 0.0034, 0.05], [0, 60, 300, 900]],
  ] as const)('%s', (_id, model, p, xs) => checkGradient(model, [...p], [...xs]));
});

describe('Hill force–pCa check points (computed from the model [C])', () => {
  const p = [2, 30, 5.8, 3];
  it('F(pCa50) = passive + Fmax/2', () => {
    expect(hillForcePca.f(5.8, p)).toBeCloseTo(2 + 15, 12);
  });
  it('10% and 90% of Fmax at pCa50 ± log10(9)/nH = ±0.3181 for nH = 3', () => {
    expect(Math.log10(9) / 3).toBeCloseTo(0.3181, 4);
    expect(hillForcePca.f(5.8 - Math.log10(9) / 3, p)).toBeCloseTo(2 + 0.9 * 30, 10);
    expect(hillForcePca.f(5.8 + Math.log10(9) / 3, p)).toBeCloseTo(2 + 0.1 * 30, 10);
    expect(pCaAtFraction(0.9, 5.8, 3)).toBeCloseTo(5.8 - 0.3181, 4);
  });
  it('steep curves do not overflow', () => {
    expect(hillForcePca.f(1, [0, 1, 9, 400])).toBe(1);
    expect(hillForcePca.f(9, [0, 1, 1, 400])).toBe(0);
    expect(hillForcePca.gradient!(9, [0, 1, 1, 400]).every(Number.isFinite)).toBe(true);
  });
});

describe('double exponential check points (computed from the model [C])', () => {
  // amplitude 1, slow fraction 0.30, k_fast 0.030 s⁻¹, k_slow 0.0034 s⁻¹, offset 0.
  it.each([
    [0, 1.0],
    [60, 0.36035],
    [300, 0.10826],
    [900, 0.014066],
  ])('t = %d s → %d', (t, want) => {
    expect(relative(exponentialDouble.f(t, [0.7, 0.03, 0.3, 0.0034, 0]), want)).toBeLessThan(5e-5);
  });

  it('phases are ordered kFast > kSlow after the fit, whatever the start order', () => {
    const t = Array.from({ length: 181 }, (_, i) => i * 5);
    const y = t.map((v) => exponentialDouble.f(v, [0.7, 0.03, 0.3, 0.0034, 0]));
    // Start with the phases swapped: slow first.
    const fit = fitCurve(exponentialDouble, t, y, { start: [0.3, 0.003, 0.7, 0.02, 0] });
    expect(fit.converged).toBe(true);
    const [aFast, kFast, aSlow, kSlow] = fit.parameters.map((q) => q.estimate);
    expect(kFast).toBeCloseTo(0.03, 8);
    expect(kSlow).toBeCloseTo(0.0034, 8);
    expect(aFast).toBeCloseTo(0.7, 6);
    expect(aSlow).toBeCloseTo(0.3, 6);
    expect(slowFraction(fit).estimate).toBeCloseTo(0.3, 6);
    expect(() => slowFraction({ ...fit, correlation: [] })).toThrow(/slowFraction: the fit's correlation matrix has no entry \(0, 2\)/);
  });
});
