/**
 * Confidence interval of a ratio a/b of two independent positive estimates on the log
 * scale, by the delta method: SE(ln(a/b)) ≈ √((SEa/a)² + (SEb/b)²), interval
 * exp(ln(a/b) ± q·SE) with q the two-sided t (or normal, df = Infinity) quantile.
 * Source: delta method (Casella & Berger, Statistical Inference, 2nd ed., §5.5.4); its use
 * for ratios compared with Fieller's in Franz 2007, "Ratios: a short guide to confidence
 * limits and proper use", arXiv:0710.2024. Valid only when a, b > 0; NaN otherwise.
 * @example
 * logRatioInterval({ numerator: 14, seNumerator: 3, denominator: 7, seDenominator: 2, df: Infinity, level: 0.95 })
 * // → ratio 2, seLog 0.357143, low 0.993183, high 4.027454
 */
import { criticalValue, type RatioInput } from './fieller.js';

export interface LogRatioInterval {
  ratio: number;
  /** Standard error of ln(ratio). */
  seLog: number;
  low: number;
  high: number;
}

/** Log-ratio (delta-method) interval; see the file comment. */
export function logRatioInterval(input: RatioInput): LogRatioInterval {
  const { numerator: a, seNumerator: seA, denominator: b, seDenominator: seB } = input;
  if (!(a > 0 && b > 0)) return { ratio: a / b, seLog: NaN, low: NaN, high: NaN };
  const ratio = a / b;
  const seLog = Math.sqrt((seA / a) ** 2 + (seB / b) ** 2);
  const q = criticalValue(input.level, input.df);
  return { ratio, seLog, low: ratio * Math.exp(-q * seLog), high: ratio * Math.exp(q * seLog) };
}
