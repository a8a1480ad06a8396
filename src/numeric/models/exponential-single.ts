/**
 * Single exponential decay with offset.
 *
 * y = A·exp(−k·t) + c
 *  - amplitude (A): signal change that decays (fluorescence units);
 *  - k: rate constant (1/time unit of t, s⁻¹);
 *  - offset (c): plateau at long times.
 * Source: first-order kinetics; used as the fall-back for single-turnover chase traces
 * when two phases are not resolved (e.g. Hooijman, Stewart & Cooke 2011, Biophys J 100:1969).
 * Bounds: k ≥ 0. Start rule (variable projection, coarse to fine): k scanned over 15
 * log-spaced values from 0.1/(time span) to max(100/(time span), 1/(smallest time step));
 * at each, A and c by linear least squares in closed form (lineOnBasis); then ln k refined
 * by Brent's method (brentMinimise) between the neighbours of the best grid value, to 1e-7;
 * the lowest RSS seen is the start. Evenly spaced times build exp(−k·t) by recurrence
 * (decayInto).
 * @example exponentialSingle.f(10, [2, 0.1, 1]) // → 1.735759 (2·e⁻¹ + 1)
 */
import type { CurveModel } from '../types.js';
import { parameterTuple } from './parameters.js';
import { brentMinimise, decayInto, evenStep, lineOnBasis, logGrid, range } from './start-helpers.js';

const RATE_GRID_POINTS = 15;
/**
 * Tolerance in ln k of the refinement of the start rate: the projected RSS is then at its
 * minimum over k to about machine precision, which is the least-squares optimum of the
 * separable model, so Levenberg–Marquardt only polishes it (large-residual data, e.g. a
 * two-phase trace, otherwise costs many linearly convergent iterations).
 */
const RATE_REFINE_TOLERANCE = 1e-7;

/**
 * Rate candidates spanning what the sampling of t can resolve.
 * @example rateCandidates([0, 1, 2, 10], 3) // → [0.01, ~0.32, 10]
 */
export function rateCandidates(t: readonly number[], count: number): number[] {
  const [low, high] = range(t);
  const span = high - low > 0 ? high - low : 1;
  const sorted = [...t].sort((a, b) => a - b);
  let minStep = Infinity;
  for (let i = 1; i < sorted.length; i++) {
    const d = sorted[i]! - sorted[i - 1]!;
    if (d > 0 && d < minStep) minStep = d;
  }
  const fastest = Math.max(100 / span, Number.isFinite(minStep) ? 1 / minStep : 0);
  return logGrid(0.1 / span, fastest, count);
}

/** (A, k, c) from a parameter vector. */
const singleParams = (p: readonly number[]) => parameterTuple(p, 3, 'exponential-single');

export const exponentialSingle: CurveModel = {
  id: 'exponential-single',
  formula: 'y = A·exp(−k·t) + c',
  params: ['amplitude', 'k', 'offset'],
  meanings: ['decaying amplitude', 'rate constant (per time unit)', 'plateau at long times'],
  source: 'first-order kinetics; single-turnover fall-back as in Hooijman et al. 2011, Biophys J 100:1969',
  f: (t, p) => {
    const q = singleParams(p); // [amplitude, k, offset]
    return q[0] * Math.exp(-q[1] * t) + q[2];
  },
  gradient(t, p) {
    const q = singleParams(p);
    const e = Math.exp(-q[1] * t);
    return [e, -q[0] * t * e, 1];
  },
  evaluate(x, p, values, jacobian) {
    const n = x.length;
    const [amplitude, k, offset] = singleParams(p);
    for (let i = 0; i < n; i++) {
      const t = x[i]!;
      const e = Math.exp(-k * t);
      values[i] = amplitude * e + offset;
      if (jacobian) {
        jacobian[i] = e;
        jacobian[n + i] = -amplitude * t * e;
        jacobian[2 * n + i] = 1;
      }
    }
  },
  start(x, y) {
    let best: number[] = [range(y)[1] - range(y)[0], 1, range(y)[0]];
    let bestRss = Infinity;
    const e = new Float64Array(x.length);
    const step = evenStep(x);
    /** Projected RSS at rate k (A and c by closed-form least squares); keeps the best. */
    const rssAt = (k: number): number => {
      decayInto(x, k, step, e);
      const fit = lineOnBasis(e, y, true);
      if (!fit) return Infinity;
      if (fit.rss < bestRss) {
        bestRss = fit.rss;
        best = [fit.b, k, fit.a];
      }
      return fit.rss;
    };
    const rates = rateCandidates(x, RATE_GRID_POINTS);
    let bestIndex = -1;
    let gridBest = Infinity;
    rates.forEach((k, i) => {
      const rss = rssAt(k);
      if (rss < gridBest) {
        gridBest = rss;
        bestIndex = i;
      }
    });
    if (bestIndex >= 0) {
      // Refine ln k between the neighbours of the best grid rate.
      const lowK = rates[Math.max(0, bestIndex - 1)]!;
      const highK = rates[Math.min(rates.length - 1, bestIndex + 1)]!;
      brentMinimise((u) => rssAt(Math.exp(u)), Math.log(lowK), Math.log(highK), RATE_REFINE_TOLERANCE);
    }
    return best;
  },
  lower: [undefined, 0, undefined],
};
