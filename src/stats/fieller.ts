/**
 * Confidence interval of a ratio a/b of two independent estimates by Fieller's theorem
 * (Fieller 1954, J R Stat Soc B 16:175–185), in the form of REFERENCES.md §3:
 *   m = a/b, g = t²·SEb²/b²,
 *   limits = [m ∓ (t/|b|)·√((1 − g)·SEa² + m²·SEb²)]/(1 − g).
 * When g ≥ 1 the denominator is not significantly different from 0 and the confidence set
 * is not a bounded interval: the result says `bounded: false` with limits −∞ and +∞.
 * t is the two-sided quantile t(0.5 + level/2, df) (normal quantile when df is Infinity).
 * @example
 * fiellerInterval({ numerator: 14, seNumerator: 3, denominator: 7, seDenominator: 2, df: 10, level: 0.90 })
 * // → ratio 2, g 0.268164, low 1.051413, high 4.414296 (DCSTATS README worked example)
 */
import { normalQuantile, tQuantile } from './distributions.js';

export interface RatioInput {
  numerator: number;
  seNumerator: number;
  denominator: number;
  seDenominator: number;
  /** Degrees of freedom of the t quantile; Infinity for the normal quantile. */
  df: number;
  /** Confidence level, e.g. 0.95. */
  level: number;
}

export interface FiellerInterval {
  ratio: number;
  /** g = t²·SEb²/b²; g ≥ 1 means no bounded interval. */
  g: number;
  bounded: boolean;
  low: number;
  high: number;
}

/** Two-sided critical value for a confidence level and df (t, or normal when df is Infinity). */
export function criticalValue(level: number, df: number): number {
  const p = 0.5 + level / 2;
  return df === Infinity ? normalQuantile(p) : tQuantile(p, df);
}

/** Fieller interval for numerator/denominator; see the file comment. */
export function fiellerInterval(input: RatioInput): FiellerInterval {
  const { numerator: a, seNumerator: seA, denominator: b, seDenominator: seB } = input;
  const t = criticalValue(input.level, input.df);
  const ratio = a / b;
  const g = (t * t * seB * seB) / (b * b);
  if (!(g < 1)) return { ratio, g, bounded: false, low: -Infinity, high: Infinity };
  const half = (t / Math.abs(b)) * Math.sqrt((1 - g) * seA * seA + ratio * ratio * seB * seB);
  return { ratio, g, bounded: true, low: (ratio - half) / (1 - g), high: (ratio + half) / (1 - g) };
}
