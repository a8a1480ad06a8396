/**
 * Hill equation for steady-state force against calcium (force–pCa relation).
 *
 * F = Fpassive + Fmax/(1 + 10^(nH·(pCa − pCa50)))
 *  - passive (Fpassive): force at very low calcium (high pCa), in the data's unit (kPa = mN/mm²);
 *  - fmax (Fmax): calcium-activated force above passive;
 *  - pCa50: pCa at half-maximal activation (higher = more calcium-sensitive);
 *  - nH: Hill coefficient, steepness (cooperativity).
 * Check points: F(pCa50) = Fpassive + Fmax/2; 10% and 90% of Fmax at pCa50 ± log10(9)/nH
 * (REFERENCES.md §6).
 *
 * Source: Hill 1910, J Physiol 40:iv–vii; the pCa form as in e.g. Moss 1992, Circ Res 70:865.
 * Bounds: nH ≥ 0. Start rule: pCa50 scanned every 0.05 from (lowest pCa − 0.5) to
 * (highest pCa + 0.5) and nH over {0.5, 1, 1.5, 2, 3, 4, 6}; at each, Fpassive and Fmax by
 * linear least squares; the best is the start (variable projection).
 * Numerics: 1/(1 + 10^z) is evaluated as 10^(−z)/(1 + 10^(−z)) for z > 0, so a steep
 * curve never overflows to Infinity/Infinity.
 * @example hillForcePca.f(5.8, [2, 30, 5.8, 3]) // → 17 (passive + fmax/2)
 */
import type { CurveModel } from '../types.js';
import { linearGrid, linearLeastSquares, range } from './start-helpers.js';

const LN10 = Math.LN10;
const NH_CANDIDATES = [0.5, 1, 1.5, 2, 3, 4, 6];
const PCA50_GRID_STEP = 0.05;

/** Fraction activated, 1/(1 + 10^z), without overflow. */
function activated(z: number): number {
  if (z > 0) {
    const e = Math.pow(10, -z);
    return e / (1 + e);
  }
  return 1 / (1 + Math.pow(10, z));
}

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
    return p[0] + p[1] * activated(p[3] * (pCa - p[2]));
  },
  gradient(pCa, p) {
    const s = activated(p[3] * (pCa - p[2]));
    // d s/d z = −ln10·s·(1 − s), with z = nH·(pCa − pCa50).
    const ds = -LN10 * s * (1 - s);
    return [1, s, p[1] * ds * -p[3], p[1] * ds * (pCa - p[2])];
  },
  start(x, y) {
    const [low, high] = range(x);
    const steps = Math.max(1, Math.round((high - low + 1) / PCA50_GRID_STEP) + 1);
    const ones = x.map(() => 1);
    let best: number[] = [range(y)[0], range(y)[1] - range(y)[0], (low + high) / 2, 2];
    let bestRss = Infinity;
    for (const pCa50 of linearGrid(low - 0.5, high + 0.5, steps)) {
      for (const nH of NH_CANDIDATES) {
        const fit = linearLeastSquares([ones, x.map((v) => activated(nH * (v - pCa50)))], y);
        if (fit && fit.rss < bestRss) {
          bestRss = fit.rss;
          best = [fit.coefficients[0], fit.coefficients[1], pCa50, nH];
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
