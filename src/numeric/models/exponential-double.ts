/**
 * Double exponential decay with offset, for single-turnover (mant-nucleotide chase) traces.
 *
 * y = Afast·exp(−kfast·t) + Aslow·exp(−kslow·t) + c, with kfast > kslow
 *  - aFast, kFast: amplitude and rate of the fast phase (disordered-relaxed heads);
 *  - aSlow, kSlow: amplitude and rate of the slow phase (super-relaxed heads);
 *  - offset (c): plateau at long times.
 * Slow-phase fraction = Aslow/(Afast + Aslow) (Sarkar et al., Sci Adv 2020).
 * Ordering: the two phases are interchangeable in the formula; after the fit the
 * `canonical` hook swaps them so that kFast ≥ kSlow, before SEs are computed.
 * Source: Hooijman, Stewart & Cooke 2011, Biophys J 100:1969; Anderson et al. 2018, PNAS 115:E8143.
 * Bounds: both rates ≥ 0. Start rule (variable projection, coarse to fine): the
 * (kfast, kslow) pair scanned over a 30-point log grid (see rateCandidates) with
 * kfast ≥ 1.5·kslow; at each pair the two amplitudes and the offset by linear least squares
 * (normal equations from Gram sums); then ln kfast refined by Brent's method between
 * the neighbours of the best grid rate with kslow fixed, and ln kslow likewise with the
 * refined kfast fixed (to 2%, ratio kept ≥ 1.5); the lowest RSS seen is the start.
 * Evenly spaced times build exp(−k·t) by recurrence (decayInto) and the sums of
 * exponentials and their products in closed form (geometricDecaySum).
 * @example exponentialDouble.f(60, [0.7, 0.03, 0.3, 0.0034, 0]) // → 0.36035 (computed from the model [C])
 */
import type { CurveModel, FitResult } from '../types.js';
import { rateCandidates } from './exponential-single.js';
import { parameterTuple } from './parameters.js';
import { brentMinimise, decayInto, evenStep, geometricDecaySum, range, solveSymmetric3 } from './start-helpers.js';

const RATE_GRID_POINTS = 30;
/** Tolerance in ln k of each one-dimensional refinement of a start rate (about ±2%). */
const RATE_REFINE_TOLERANCE = 0.02;
/** Smallest ratio kfast/kslow in the start scan. */
const START_MIN_RATIO = 1.5;

/** (Afast, kfast, Aslow, kslow, c) from a parameter vector. */
const doubleParams = (p: readonly number[]) => parameterTuple(p, 5, 'exponential-double');

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
  f: (t, p) => {
    const q = doubleParams(p); // [aFast, kFast, aSlow, kSlow, offset]
    return q[0] * Math.exp(-q[1] * t) + q[2] * Math.exp(-q[3] * t) + q[4];
  },
  gradient(t, p) {
    const q = doubleParams(p);
    const eFast = Math.exp(-q[1] * t);
    const eSlow = Math.exp(-q[3] * t);
    return [eFast, -q[0] * t * eFast, eSlow, -q[2] * t * eSlow, 1];
  },
  evaluate(x, p, values, jacobian) {
    const n = x.length;
    const [aFast, kFast, aSlow, kSlow, offset] = doubleParams(p);
    for (let i = 0; i < n; i++) {
      const t = x[i]!;
      const eFast = Math.exp(-kFast * t);
      const eSlow = Math.exp(-kSlow * t);
      values[i] = aFast * eFast + aSlow * eSlow + offset;
      if (jacobian) {
        jacobian[i] = eFast;
        jacobian[n + i] = -aFast * t * eFast;
        jacobian[2 * n + i] = eSlow;
        jacobian[3 * n + i] = -aSlow * t * eSlow;
        jacobian[4 * n + i] = 1;
      }
    }
  },
  start(x, y) {
    const n = x.length;
    if (y.length !== n) throw new RangeError(`exponential-double start: ${n} times but ${y.length} values`);
    const rates = rateCandidates(x, RATE_GRID_POINTS);
    const count = rates.length;
    // Indices below stay within the sizes they run over: n points (x, y and the decay buffers),
    // count grid rates (rates, sums, withY) and count² Gram entries (cross).
    // Gram sums per grid rate, so each (kfast, kslow) pair costs one 3×3 solve (normal
    // equations are accurate enough for a starting value). Evenly spaced times give the sums
    // of exponentials in closed form (geometricDecaySum); only Σe·y needs a pass.
    const sums = new Float64Array(count);
    const withY = new Float64Array(count);
    const cross = new Float64Array(count * count);
    let sumY = 0;
    for (let i = 0; i < n; i++) sumY += y[i]!;
    const step = evenStep(x);
    // Used only when step !== null, i.e. at least 3 evenly spaced times.
    const sumOf = (s: number) => geometricDecaySum(s, x[0]!, step!, n);
    const exps = new Float64Array((step === null ? count : 1) * n);
    for (let a = 0; a < count; a++) {
      const rate = rates[a]!;
      const o = step === null ? a * n : 0;
      const ea = exps.subarray(o, o + n);
      decayInto(x, rate, step, ea);
      if (step !== null) {
        let sy = 0;
        for (let i = 0; i < n; i++) sy += ea[i]! * y[i]!;
        withY[a] = sy;
        sums[a] = sumOf(rate);
        for (let b = 0; b <= a; b++) cross[a * count + b] = cross[b * count + a] = sumOf(rate + rates[b]!);
        continue;
      }
      // Every sum runs over i in order, one accumulator each; several sums share a pass so that
      // the additions of different sums overlap (the same values as one pass per sum).
      let sy = 0;
      let s1 = 0;
      let ss = 0;
      for (let i = 0; i < n; i++) {
        const v = ea[i]!;
        sy += v * y[i]!;
        s1 += v;
        ss += v * v;
      }
      withY[a] = sy;
      sums[a] = s1;
      cross[a * count + a] = ss;
      let b = 0;
      for (; b + 3 < a; b += 4) {
        const o0 = b * n;
        const o1 = o0 + n;
        const o2 = o1 + n;
        const o3 = o2 + n;
        let s0 = 0;
        let t1 = 0;
        let t2 = 0;
        let t3 = 0;
        for (let i = 0; i < n; i++) {
          const v = ea[i]!;
          s0 += v * exps[o0 + i]!;
          t1 += v * exps[o1 + i]!;
          t2 += v * exps[o2 + i]!;
          t3 += v * exps[o3 + i]!;
        }
        cross[a * count + b] = cross[b * count + a] = s0;
        cross[a * count + b + 1] = cross[(b + 1) * count + a] = t1;
        cross[a * count + b + 2] = cross[(b + 2) * count + a] = t2;
        cross[a * count + b + 3] = cross[(b + 3) * count + a] = t3;
      }
      for (; b < a; b++) {
        const ob = b * n;
        let sab = 0;
        for (let i = 0; i < n; i++) sab += ea[i]! * exps[ob + i]!;
        cross[a * count + b] = sab;
        cross[b * count + a] = sab;
      }
    }
    const [yLow, yHigh] = range(y);
    const spread = yHigh - yLow;
    // The grid has RATE_GRID_POINTS (30) rates: the fallback takes the 5th from each end.
    let best: [number, number, number, number, number] = [spread / 2, rates[count - 5]!, spread / 2, rates[4]!, yLow];
    let bestScore = Infinity;
    const c = new Float64Array(3);
    /** RSS up to the constant Σy² (cᵀGc − 2cᵀb = −cᵀb at the normal-equation solution); keeps the best. */
    const score = (kFast: number, kSlow: number, ff: number, fs: number, f1: number, fy: number, ss: number, s1: number, sy: number): number => {
      if (!solveSymmetric3(ff, fs, f1, ss, s1, n, fy, sy, sumY, c)) return Infinity;
      const aFast = c[0]!;
      const aSlow = c[1]!;
      const offset = c[2]!;
      const value = -(aFast * fy + aSlow * sy + offset * sumY);
      if (!Number.isFinite(value)) return Infinity;
      if (value < bestScore) {
        bestScore = value;
        best = [aFast, kFast, aSlow, kSlow, offset];
      }
      return value;
    };
    let bestFast = -1;
    let bestSlow = -1;
    let gridBest = Infinity;
    for (let fast = 0; fast < count; fast++) {
      const rateFast = rates[fast]!;
      const fastFast = cross[fast * count + fast]!;
      const fastSum = sums[fast]!;
      const fastY = withY[fast]!;
      for (let slow = 0; slow < fast; slow++) {
        const rateSlow = rates[slow]!;
        if (rateFast < START_MIN_RATIO * rateSlow) continue;
        const value = score(
          rateFast,
          rateSlow,
          fastFast,
          cross[fast * count + slow]!,
          fastSum,
          fastY,
          cross[slow * count + slow]!,
          sums[slow]!,
          withY[slow]!,
        );
        if (value < gridBest) {
          gridBest = value;
          bestFast = fast;
          bestSlow = slow;
        }
      }
    }
    if (bestFast < 0) return best;
    // Refine: Brent minimisation on ln kfast with kslow fixed, then on ln kslow with
    // kfast fixed, each between the neighbours of the best grid rate (ratio kept ≥ START_MIN_RATIO).
    const e = new Float64Array(n);
    const other = new Float64Array(n);
    /** Gram sums of the phase with rate k against the fixed phase `other` (rate kOther). */
    const refine = (moving: 'fast' | 'slow', kOther: number, lowK: number, highK: number): number => {
      decayInto(x, kOther, step, other);
      let oy = 0;
      for (let i = 0; i < n; i++) oy += other[i]! * y[i]!;
      let oo: number;
      let o1: number;
      if (step !== null) {
        oo = sumOf(2 * kOther);
        o1 = sumOf(kOther);
      } else {
        oo = 0;
        o1 = 0;
        for (let i = 0; i < n; i++) {
          const v = other[i]!;
          oo += v * v;
          o1 += v;
        }
      }
      let kBest = NaN;
      let valueBest = Infinity;
      const at = (u: number): number => {
        const k = Math.exp(u);
        decayInto(x, k, step, e);
        let ey = 0;
        for (let i = 0; i < n; i++) ey += e[i]! * y[i]!;
        let ee: number;
        let e1: number;
        let eo: number;
        if (step !== null) {
          ee = sumOf(2 * k);
          e1 = sumOf(k);
          eo = sumOf(k + kOther);
        } else {
          ee = 0;
          e1 = 0;
          eo = 0;
          for (let i = 0; i < n; i++) {
            const v = e[i]!;
            ee += v * v;
            e1 += v;
            eo += v * other[i]!;
          }
        }
        const value = moving === 'fast' ? score(k, kOther, ee, eo, e1, ey, oo, o1, oy) : score(kOther, k, oo, eo, o1, oy, ee, e1, ey);
        if (value < valueBest) {
          valueBest = value;
          kBest = k;
        }
        return value;
      };
      if (lowK < highK) brentMinimise(at, Math.log(lowK), Math.log(highK), RATE_REFINE_TOLERANCE);
      return kBest;
    };
    // bestFast and bestSlow are grid indices (a pair was scored), so every index here is on the grid.
    const neighbours = (index: number): [number, number] => [rates[Math.max(0, index - 1)]!, rates[Math.min(count - 1, index + 1)]!];
    const [fastLow, fastHigh] = neighbours(bestFast);
    const kSlowGrid = rates[bestSlow]!;
    const kFast = refine('fast', kSlowGrid, Math.max(fastLow, START_MIN_RATIO * kSlowGrid), fastHigh);
    const kFastNow = Number.isFinite(kFast) && best[1] === kFast ? kFast : best[1];
    const [slowLow, slowHigh] = neighbours(bestSlow);
    refine('slow', kFastNow, slowLow, Math.min(slowHigh, kFastNow / START_MIN_RATIO));
    return best;
  },
  canonical(p) {
    const [aFast, kFast, aSlow, kSlow, offset] = doubleParams(p);
    return kSlow > kFast ? [aSlow, kSlow, aFast, kFast, offset] : p.slice();
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
  const fast = fit.parameters[iFast];
  const slow = fit.parameters[iSlow];
  if (!fast || !slow) return { estimate: NaN, se: NaN };
  const correlation = fit.correlation[iFast]?.[iSlow];
  if (correlation === undefined) throw new RangeError(`slowFraction: the fit's correlation matrix has no entry (${iFast}, ${iSlow})`);
  const aFast = fast.estimate;
  const aSlow = slow.estimate;
  const total = aFast + aSlow;
  const estimate = aSlow / total;
  const seFast = fast.se;
  const seSlow = slow.se;
  const covariance = correlation * seFast * seSlow;
  // ∂f/∂Afast = −Aslow/total², ∂f/∂Aslow = Afast/total².
  const dFast = -aSlow / (total * total);
  const dSlow = aFast / (total * total);
  const variance = dFast * dFast * seFast * seFast + dSlow * dSlow * seSlow * seSlow + 2 * dFast * dSlow * covariance;
  return { estimate, se: variance >= 0 ? Math.sqrt(variance) : NaN };
}
