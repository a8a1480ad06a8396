/**
 * Small wording helpers shared by the archive's sentences. Numbers are formatted as the call
 * sentences format them (src/results/format.ts), so that a change line reads like the report it
 * is printed on. Pure.
 */
import { fmtEffect } from '../results/format.js';
import type { MetricScale } from '../results/types.js';

/**
 * An interval or band as the reports write it: '1.21× to 1.55×', '−0.100 to +0.100'.
 * @example rangeText(0.8, 1.25, 'ratio') // '0.800× to 1.25×'
 */
export function rangeText(lo: number | null | undefined, hi: number | null | undefined, scale: MetricScale): string {
  if (lo === null || lo === undefined || hi === null || hi === undefined) return 'n/a';
  return `${fmtEffect(lo, scale)} to ${fmtEffect(hi, scale)}`;
}

/** 'a', 'a and b', 'a, b and c'. */
export function joinAnd(xs: readonly string[]): string {
  return xs.length <= 1 ? (xs[0] ?? '') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`;
}

export function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
