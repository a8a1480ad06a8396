/**
 * Double exponential decay with offset and one rate fixed, for a single-turnover chase trace in
 * which only one phase could be resolved:
 *
 *     y = Afast·exp(−kfast·t) + Aslow·exp(−kslow·t) + c
 *
 * with kslow fixed when the resolved phase is the fast one (`fixed: 'slow'`), or kfast fixed when
 * it is the slow one (`fixed: 'fast'`). The fixed rate comes from elsewhere (the paired WT's rate,
 * src/assays/turnover/module.ts); the amplitude of the phase at that rate is then a linear parameter that
 * the data determine, with a standard error, even when it is near zero or negative (no bound), so
 * that a trace with no slow phase gives a slow fraction near 0 with its uncertainty.
 * Parameters: ['aFast', 'kFast', 'aSlow', 'offset'] (slow rate fixed) or
 * ['aFast', 'aSlow', 'kSlow', 'offset'] (fast rate fixed). Free rate bounded below by 0.
 * Start: the single exponential's start (src/numeric/models/exponential-single.ts) for the free
 * phase and the offset, 0 for the other amplitude.
 * @example exponentialDoubleFixedRate('slow', 0.0034).f(60, [0.7, 0.03, 0.3, 0]) // → 0.36035 (computed from the model [C])
 */
import type { CurveModel } from '../types.js';
import { exponentialSingle } from './exponential-single.js';
import { parameterTuple } from './parameters.js';

export function exponentialDoubleFixedRate(fixed: 'slow' | 'fast', rate: number): CurveModel {
  const slowFixed = fixed === 'slow';
  const id = `exponential-double-${fixed}-rate-fixed`;
  const params = slowFixed ? (['aFast', 'kFast', 'aSlow', 'offset'] as const) : (['aFast', 'aSlow', 'kSlow', 'offset'] as const);
  /** (aFast, kFast, aSlow, kSlow, c) from the parameter vector. */
  const unpack = (p: readonly number[]): [number, number, number, number, number] => {
    const q = parameterTuple(p, 4, id);
    return slowFixed ? [q[0], q[1], q[2], rate, q[3]] : [q[0], rate, q[1], q[2], q[3]];
  };
  return {
    id,
    formula: `y = Afast·exp(−kfast·t) + Aslow·exp(−kslow·t) + c, ${slowFixed ? 'kslow' : 'kfast'} fixed at ${rate.toPrecision(3)}`,
    params,
    source: 'Hooijman, Stewart & Cooke 2011, Biophys J 100:1969 (the two-phase model); one rate fixed as stated',
    f(t, p) {
      const [aF, kF, aS, kS, c] = unpack(p);
      return aF * Math.exp(-kF * t) + aS * Math.exp(-kS * t) + c;
    },
    gradient(t, p) {
      const [aF, kF, aS, kS] = unpack(p);
      const eF = Math.exp(-kF * t);
      const eS = Math.exp(-kS * t);
      return slowFixed ? [eF, -aF * t * eF, eS, 1] : [eF, eS, -aS * t * eS, 1];
    },
    start(x, y) {
      const [a, k, c] = parameterTuple(exponentialSingle.start(x, y), 3, exponentialSingle.id);
      return slowFixed ? [a, k, 0, c] : [0, a, k, c];
    },
    lower: slowFixed ? [undefined, 0, undefined, undefined] : [undefined, undefined, 0, undefined],
  };
}
