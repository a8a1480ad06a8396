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
 * Bounds: nH ≥ 0. Start rule (variable projection, coarse to fine): pCa50 scanned about
 * every 0.2 from (lowest pCa − 0.5) to (highest pCa + 0.5) and nH over
 * {0.5, 1, 1.5, 2, 3, 4, 6}; then pCa50 about every 0.05 within one coarse step of the best
 * point, with nH at the best candidate and its two neighbours in that list; at each,
 * Fpassive and Fmax by linear least squares in closed form (lineOnBasis); the best is the
 * start.
 * Numerics: 1/(1 + 10^z) is evaluated as 10^(−z)/(1 + 10^(−z)) for z > 0, so a steep
 * curve never overflows to Infinity/Infinity; 10^u is computed as exp(u·ln 10) (about five
 * times faster than Math.pow here, same value to ~1e-15 relative).
 * @example hillForcePca.f(5.8, [2, 30, 5.8, 3]) // → 17 (passive + fmax/2)
 */
import type { CurveModel } from '../types.js';
import { lineOnBasis, linearGrid, range } from './start-helpers.js';

const LN10 = Math.LN10;
const NH_CANDIDATES = [0.5, 1, 1.5, 2, 3, 4, 6];
/** pCa50 spacing of the coarse start scan over the whole range, and of the fine scan around its best point. */
const PCA50_COARSE_STEP = 0.2;
const PCA50_FINE_STEP = 0.05;

/** Fraction activated, 1/(1 + 10^z), without overflow. */
function activated(z: number): number {
  if (z > 0) {
    const e = Math.exp(-LN10 * z);
    return e / (1 + e);
  }
  return 1 / (1 + Math.exp(LN10 * z));
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
    const g = new Float64Array(x.length);
    let best: number[] = [range(y)[0], range(y)[1] - range(y)[0], (low + high) / 2, 2];
    let bestRss = Infinity;
    const tryAt = (pCa50: number, nH: number) => {
      for (let i = 0; i < x.length; i++) g[i] = activated(nH * (x[i] - pCa50));
      const fit = lineOnBasis(g, y, true);
      if (fit && fit.rss < bestRss) {
        bestRss = fit.rss;
        best = [fit.a, fit.b, pCa50, nH];
      }
    };
    // Coarse scan over the whole range, then a fine one around its best point.
    const scanLow = low - 0.5;
    const scanHigh = high + 0.5;
    const coarseSteps = Math.max(2, Math.round((scanHigh - scanLow) / PCA50_COARSE_STEP) + 1);
    for (const pCa50 of linearGrid(scanLow, scanHigh, coarseSteps)) {
      for (const nH of NH_CANDIDATES) tryAt(pCa50, nH);
    }
    const spacing = (scanHigh - scanLow) / (coarseSteps - 1);
    const centre = best[2];
    const at = Math.max(0, NH_CANDIDATES.indexOf(best[3]));
    const nHs = NH_CANDIDATES.slice(Math.max(0, at - 1), at + 2);
    const fineLow = Math.max(scanLow, centre - spacing);
    const fineHigh = Math.min(scanHigh, centre + spacing);
    const fineSteps = Math.max(2, Math.round((fineHigh - fineLow) / PCA50_FINE_STEP) + 1);
    for (const pCa50 of linearGrid(fineLow, fineHigh, fineSteps)) {
      for (const nH of nHs) tryAt(pCa50, nH);
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
