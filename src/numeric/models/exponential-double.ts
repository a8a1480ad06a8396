/**
 * Double exponential decay with offset, for single-turnover (mant-nucleotide chase) traces.
 *
 * y = Afast·exp(−kfast·t) + Aslow·exp(−kslow·t) + c, with kfast > kslow
 *  - aFast, kFast: amplitude and rate of the fast phase (disordered-relaxed heads);
 *  - aSlow, kSlow: amplitude and rate of the slow phase (super-relaxed heads);
 *  - offset (c): plateau at long times.
 * Slow-phase fraction = Aslow/(Afast + Aslow) (REFERENCES.md §6, Sarkar et al., Sci Adv 2020).
 * Ordering: the two phases are interchangeable in the formula; after the fit the
 * `canonical` hook swaps them so that kFast ≥ kSlow, before SEs are computed.
 * Source: Hooijman, Stewart & Cooke 2011, Biophys J 100:1969; Anderson et al. 2018, PNAS 115:E8143.
 * Bounds: both rates ≥ 0. Start rule: the (kfast, kslow) pair scanned over a 30-point
 * log grid (see rateCandidates) with kfast ≥ 1.5·kslow; at each pair the two amplitudes and
 * the offset by linear least squares; the best is the start (variable projection).
 * @example exponentialDouble.f(60, [0.7, 0.03, 0.3, 0.0034, 0]) // → 0.36035 (REFERENCES.md §6 [C])
 */
import type { CurveModel, FitResult } from '../types.js';
import { rateCandidates } from './exponential-single.js';
import { range, solve3 } from './start-helpers.js';

const RATE_GRID_POINTS = 30;
/** Smallest ratio kfast/kslow in the start scan. */
const START_MIN_RATIO = 1.5;

export const exponentialDouble: CurveModel = {
  id: 'exponential-double',
  formula: 'y = Afast·exp(−kfast·t) + Aslow·exp(−kslow·t) + c, kfast > kslow',
  params: ['aFast', 'kFast', 'aSlow', 'kSlow', 'offset'],
  meanings: [
    'amplitude of the fast phase',
    'rate constant of the fast phase (per time unit)',
    'amplitude of the slow phase',
    'rate constant of the slow phase (per time unit)',
    'plateau at long times',
  ],
  source: 'Hooijman, Stewart & Cooke 2011, Biophys J 100:1969; Anderson et al. 2018, PNAS 115:E8143',
  f: (t, p) => p[0] * Math.exp(-p[1] * t) + p[2] * Math.exp(-p[3] * t) + p[4],
  gradient(t, p) {
    const eFast = Math.exp(-p[1] * t);
    const eSlow = Math.exp(-p[3] * t);
    return [eFast, -p[0] * t * eFast, eSlow, -p[2] * t * eSlow, 1];
  },
  start(x, y) {
    const rates = rateCandidates(x, RATE_GRID_POINTS);
    const n = x.length;
    const exps = rates.map((k) => x.map((t) => Math.exp(-k * t)));
    // Gram sums, so each (kfast, kslow) pair costs one 3×3 solve (normal equations are
    // accurate enough for a starting value).
    const count = rates.length;
    const sums = new Array<number>(count).fill(0);
    const withY = new Array<number>(count).fill(0);
    const cross = rates.map(() => new Array<number>(count).fill(0));
    let sumY = 0;
    for (let i = 0; i < n; i++) sumY += y[i];
    for (let a = 0; a < count; a++) {
      const ea = exps[a];
      for (let i = 0; i < n; i++) {
        sums[a] += ea[i];
        withY[a] += ea[i] * y[i];
      }
      for (let b = 0; b <= a; b++) {
        const eb = exps[b];
        let s = 0;
        for (let i = 0; i < n; i++) s += ea[i] * eb[i];
        cross[a][b] = s;
        cross[b][a] = s;
      }
    }
    const spread = range(y)[1] - range(y)[0];
    let best: number[] = [spread / 2, rates[RATE_GRID_POINTS - 5], spread / 2, rates[5], range(y)[0]];
    let bestRss = Infinity;
    for (let fast = 0; fast < rates.length; fast++) {
      for (let slow = 0; slow < fast; slow++) {
        if (rates[fast] < START_MIN_RATIO * rates[slow]) continue;
        const gram = [
          [cross[fast][fast], cross[fast][slow], sums[fast]],
          [cross[slow][fast], cross[slow][slow], sums[slow]],
          [sums[fast], sums[slow], n],
        ];
        const rhs = [withY[fast], withY[slow], sumY];
        const c = solve3(gram, rhs);
        if (!c) continue;
        // RSS up to the constant Σy²: cᵀGc − 2cᵀb = −cᵀb at the normal-equation solution.
        const score = -(c[0] * rhs[0] + c[1] * rhs[1] + c[2] * rhs[2]);
        if (score < bestRss) {
          bestRss = score;
          best = [c[0], rates[fast], c[1], rates[slow], c[2]];
        }
      }
    }
    return best;
  },
  canonical(p) {
    return p[3] > p[1] ? [p[2], p[3], p[0], p[1], p[4]] : p.slice();
  },
  lower: [undefined, 0, undefined, 0, undefined],
};

/**
 * Slow-phase fraction Aslow/(Afast + Aslow) of a double-exponential fit with its standard
 * error by the delta method (first-order Taylor expansion; e.g. Casella & Berger,
 * Statistical Inference, 2nd ed., §5.5.4), using the covariance of (Afast, Aslow)
 * rebuilt from the fit's SEs and correlation.
 * @example slowFraction(fitOf(t, 0.7·e^(−0.03t) + 0.3·e^(−0.0034t))).estimate // → 0.30
 */
export function slowFraction(fit: FitResult): { estimate: number; se: number } {
  const get = (name: string) => fit.parameters.findIndex((q) => q.name === name);
  const iFast = get('aFast');
  const iSlow = get('aSlow');
  if (iFast < 0 || iSlow < 0) return { estimate: NaN, se: NaN };
  const aFast = fit.parameters[iFast].estimate;
  const aSlow = fit.parameters[iSlow].estimate;
  const total = aFast + aSlow;
  const estimate = aSlow / total;
  const seFast = fit.parameters[iFast].se;
  const seSlow = fit.parameters[iSlow].se;
  const covariance = fit.correlation[iFast][iSlow] * seFast * seSlow;
  // ∂f/∂Afast = −Aslow/total², ∂f/∂Aslow = Afast/total².
  const dFast = -aSlow / (total * total);
  const dSlow = aFast / (total * total);
  const variance = dFast * dFast * seFast * seFast + dSlow * dSlow * seSlow * seSlow + 2 * dFast * dSlow * covariance;
  return { estimate, se: variance >= 0 ? Math.sqrt(variance) : NaN };
}
