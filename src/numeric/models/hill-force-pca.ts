/**
 * Hill equation for steady-state force against calcium (force–pCa relation).
 *
 * F = Fpassive + Fmax/(1 + 10^(nH·(pCa − pCa50)))
 *  - passive (Fpassive): force at very low calcium (high pCa), in the data's unit (kPa = mN/mm²);
 *  - fmax (Fmax): calcium-activated force above passive;
 *  - pCa50: pCa at half-maximal activation (higher = more calcium-sensitive);
 *  - nH: Hill coefficient, steepness (cooperativity).
 * Check points: F(pCa50) = Fpassive + Fmax/2; 10% and 90% of Fmax at pCa50 ± log10(9)/nH
 * (computed from the Hill equation).
 *
 * Source: Hill 1910, J Physiol 40:iv–vii; the pCa form as in e.g. Moss 1992, Circ Res 70:865.
 * Bounds: nH ≥ 0. Start rule: pCa50 scanned every 0.05 from (lowest pCa − 0.5) to
 * (highest pCa + 0.5) and nH over {0.5, 1, 1.5, 2, 3, 4, 6}; at each, Fpassive and Fmax by
 * linear least squares in closed form (lineOnBasis); the best is the start (variable
 * projection). The whole grid is kept (a coarse-to-fine scan was tried and found worse
 * local optima in about 1 in 300 noisy synthetic fits); it is made cheap by forming
 * 10^(nH·(pCa − pCa50)) from one exponential per pCa50 and point (powerOf).
 * Numerics: 1/(1 + 10^z) is evaluated as 10^(−z)/(1 + 10^(−z)) for z > 0, so a steep
 * curve never overflows to Infinity/Infinity; 10^u is computed as exp(u·ln 10) (the same
 * value as Math.pow to ~1e-15 relative).
 * @example hillForcePca.f(5.8, [2, 30, 5.8, 3]) // → 17 (passive + fmax/2)
 */
import type { CurveModel } from '../types.js';
import { parameterTuple } from './parameters.js';
import { lineOnBasis, linearGrid, range } from './start-helpers.js';

const LN10 = Math.LN10;
const NH_CANDIDATES = [0.5, 1, 1.5, 2, 3, 4, 6];
const PCA50_GRID_STEP = 0.05;

/**
 * b^nH for the start scan's nH candidates from b and √b by products (b^6 = (b³)²), so the
 * scan needs one exponential per pCa50 and point instead of one per candidate; any other
 * nH by exp(nH·ln10·d) with d = pCa − pCa50 (b = 10^d). With |d| ≤ range + 0.5 pCa units
 * the largest power stays far from overflow for any real pCa range.
 */
function powerOf(b: number, rootB: number, nH: number, d: number): number {
  switch (nH) {
    case 0.5:
      return rootB;
    case 1:
      return b;
    case 1.5:
      return b * rootB;
    case 2:
      return b * b;
    case 3:
      return b * b * b;
    case 4: {
      const b2 = b * b;
      return b2 * b2;
    }
    case 6: {
      const b3 = b * b * b;
      return b3 * b3;
    }
    default:
      return Math.exp(LN10 * nH * d);
  }
}

/** Fraction activated, 1/(1 + 10^z), without overflow. */
function activated(z: number): number {
  if (z > 0) {
    const e = Math.exp(-LN10 * z);
    return e / (1 + e);
  }
  return 1 / (1 + Math.exp(LN10 * z));
}

/** (Fpassive, Fmax, pCa50, nH) from a parameter vector. */
const hillParams = (p: readonly number[]) => parameterTuple(p, 4, 'hill-force-pca');

export const hillForcePca: CurveModel = {
  id: 'hill-force-pca',
  formula: 'F = Fpassive + Fmax/(1 + 10^(nH·(pCa − pCa50)))',
  params: ['passive', 'fmax', 'pCa50', 'nH'],
  meanings: [
    'force at low calcium (high pCa)',
    'calcium-activated force above passive',
    'pCa at half-maximal activation',
    'Hill coefficient (steepness)',
  ],
  source: 'Hill 1910, J Physiol 40:iv–vii; pCa form as in Moss 1992, Circ Res 70:865',
  f(pCa, p) {
    const q = hillParams(p); // [passive, fmax, pCa50, nH]
    return q[0] + q[1] * activated(q[3] * (pCa - q[2]));
  },
  gradient(pCa, p) {
    const q = hillParams(p);
    const s = activated(q[3] * (pCa - q[2]));
    // d s/d z = −ln10·s·(1 − s), with z = nH·(pCa − pCa50).
    const ds = -LN10 * s * (1 - s);
    return [1, s, q[1] * ds * -q[3], q[1] * ds * (pCa - q[2])];
  },
  start(x, y) {
    const [low, high] = range(x);
    const n = x.length;
    const steps = Math.max(1, Math.round((high - low + 1) / PCA50_GRID_STEP) + 1);
    const base = new Float64Array(n);
    const root = new Float64Array(n);
    const g = new Float64Array(n);
    let best: number[] = [range(y)[0], range(y)[1] - range(y)[0], (low + high) / 2, 2];
    let bestRss = Infinity;
    for (const pCa50 of linearGrid(low - 0.5, high + 0.5, steps)) {
      // b = 10^(pCa − pCa50) once per point; 10^(nH·(pCa − pCa50)) = b^nH by products.
      for (let i = 0; i < n; i++) {
        const b = Math.exp(LN10 * (x[i]! - pCa50));
        base[i] = b;
        root[i] = Math.sqrt(b);
      }
      for (const nH of NH_CANDIDATES) {
        for (let i = 0; i < n; i++) g[i] = 1 / (1 + powerOf(base[i]!, root[i]!, nH, x[i]! - pCa50));
        const fit = lineOnBasis(g, y, true);
        if (fit && fit.rss < bestRss) {
          bestRss = fit.rss;
          best = [fit.a, fit.b, pCa50, nH];
        }
      }
    }
    return best;
  },
  lower: [undefined, undefined, undefined, 0],
};

/**
 * pCa at which the activated force is the given fraction of Fmax (0 < fraction < 1):
 * pCa = pCa50 + log10((1 − fraction)/fraction)/nH.
 * @example pCaAtFraction(0.9, 5.8, 3) // → 5.4819 (pCa50 − log10(9)/3)
 */
export function pCaAtFraction(fraction: number, pCa50: number, nH: number): number {
  return pCa50 + Math.log10((1 - fraction) / fraction) / nH;
}
