/**
 * Michaelis–Menten models for steady-state actin-activated ATPase.
 *
 * With basal term: v = v0 + kcat·[A]/(KM + [A])
 *  - basal (v0): ATPase rate with no actin, per head (s⁻¹);
 *  - kcat: maximal actin-activated rate above basal, per head (s⁻¹);
 *  - km (KM): actin concentration giving half-maximal activation (same unit as [A], µM).
 * Plain: v = Vm·[A]/(K + [A]) with params ['vm', 'k'] (as in R's Puromycin example).
 *
 * Source: Michaelis & Menten 1913, Biochem Z 49:333; basal-term form as used for actomyosin
 * ATPase, e.g. De La Cruz & Ostap 2009, Methods Enzymol 455:157. Bounds: KM ≥ 0.
 * Start rule: KM scanned over 40 log-spaced values from (smallest positive [A])/10 to
 * 10·(largest [A]); at each, v0 and kcat (or Vm) by linear least squares in closed form
 * (lineOnBasis); the best pair is the start (variable projection,
 * src/numeric/models/start-helpers.ts).
 * @example
 * fitCurve(michaelisMenten, [0.02, 0.02, 0.06, …], [76, 47, 97, …]) // Puromycin treated
 * // → vm 212.68, k 0.06412 (R: nls(rate ~ Vm*conc/(K+conc)), An Introduction to R §11.7.1)
 */
import type { CurveModel } from '../types.js';
import { parameterTuple } from './parameters.js';
import { lineOnBasis, logGrid, range } from './start-helpers.js';

const KM_GRID_POINTS = 40;

/** KM candidates for the start scan, from the spacing of the data. */
function kmCandidates(x: readonly number[]): number[] {
  const positive = x.filter((v) => v > 0);
  if (positive.length === 0) return [1];
  const [low, high] = range(positive);
  return logGrid(low / 10, high * 10, KM_GRID_POINTS);
}

/**
 * The start rule shared by both Michaelis–Menten models: over the KM grid, the model is linear
 * in (basal, kcat) or in Vm alone, solved exactly; the KM with the least RSS wins (first on ties).
 */
function bestKm(x: readonly number[], y: readonly number[], withBasal: boolean): { a: number; b: number; km: number } | null {
  let best: { a: number; b: number; km: number } | null = null;
  let bestRss = Infinity;
  const g = new Float64Array(x.length);
  for (const km of kmCandidates(x)) {
    for (let i = 0; i < x.length; i++) {
      const xi = x[i]!;
      g[i] = xi / (km + xi);
    }
    const fit = lineOnBasis(g, y, withBasal);
    if (fit && fit.rss < bestRss) {
      bestRss = fit.rss;
      best = { a: fit.a, b: fit.b, km };
    }
  }
  return best;
}

/** (basal, kcat, KM) from a parameter vector of the model with basal term. */
const basalParams = (p: readonly number[]) => parameterTuple(p, 3, 'michaelis-menten-basal');

/** v = v0 + kcat·[A]/(KM + [A]); params ['basal', 'kcat', 'km']. */
export const michaelisMentenBasal: CurveModel = {
  id: 'michaelis-menten-basal',
  formula: 'v = basal + kcat·[A]/(KM + [A])',
  params: ['basal', 'kcat', 'km'],
  meanings: [
    'rate without actin (per head, s⁻¹)',
    'maximal actin-activated rate above basal (per head, s⁻¹)',
    'actin concentration at half-maximal activation (µM)',
  ],
  source: 'Michaelis & Menten 1913, Biochem Z 49:333; basal form as in De La Cruz & Ostap 2009, Methods Enzymol 455:157',
  f: (a, p) => {
    const q = basalParams(p); // [basal, kcat, km]
    return q[0] + (q[1] * a) / (q[2] + a);
  },
  gradient: (a, p) => {
    const q = basalParams(p);
    const d = q[2] + a;
    return [1, a / d, (-q[1] * a) / (d * d)];
  },
  start(x, y) {
    const best = bestKm(x, y, true);
    return best ? [best.a, best.b, best.km] : [0, Math.max(...y), range(x)[1] / 2];
  },
  lower: [undefined, undefined, 0],
};

/** (Vm, K) from a parameter vector of the plain model. */
const plainParams = (p: readonly number[]) => parameterTuple(p, 2, 'michaelis-menten');

/** v = Vm·[A]/(K + [A]); params ['vm', 'k']. */
export const michaelisMenten: CurveModel = {
  id: 'michaelis-menten',
  formula: 'v = Vm·[A]/(K + [A])',
  params: ['vm', 'k'],
  meanings: ['maximal rate', 'substrate concentration at half-maximal rate'],
  source: 'Michaelis & Menten 1913, Biochem Z 49:333',
  f: (a, p) => {
    const q = plainParams(p); // [vm, k]
    return (q[0] * a) / (q[1] + a);
  },
  gradient: (a, p) => {
    const q = plainParams(p);
    const d = q[1] + a;
    return [a / d, (-q[0] * a) / (d * d)];
  },
  start(x, y) {
    const best = bestKm(x, y, false);
    return best ? [best.b, best.km] : [Math.max(...y), range(x)[1] / 2];
  },
  lower: [undefined, 0],
};
