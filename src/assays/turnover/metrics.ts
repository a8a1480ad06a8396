/**
 * The single-turnover assay's metrics (definitions and hypercontractile directions) and their
 * default WT-like bands.
 */
import type { MetricDef } from '../../results/types.js';

/** Unit flags that qualify the turnover values: counted on the comparison rows. */
const QUALIFIERS = ['one-phase-trace', 'window-too-short', 'not-converged', 'no-reference-rates'] as const;

export const TURNOVER_METRICS: MetricDef[] = [
  {
    id: 'slowFraction',
    label: 'Slow-phase fraction',
    unit: '',
    scale: 'difference',
    hyper: 'down',
    primary: true,
    description:
      'Slow amplitude over the sum of fast and slow amplitudes: the share of heads in the slow (super-relaxed) state. Fewer slow heads means more heads available, counted as hypercontractile.',
    carryFlags: QUALIFIERS,
  },
  {
    id: 'kFast',
    label: 'Fast-phase rate',
    unit: 's⁻¹',
    scale: 'ratio',
    hyper: 'none',
    primary: false,
    description: 'Rate constant of the fast phase of nucleotide release.',
    carryFlags: QUALIFIERS,
  },
  {
    id: 'kSlow',
    label: 'Slow-phase rate',
    unit: 's⁻¹',
    scale: 'ratio',
    hyper: 'none',
    primary: false,
    description: 'Rate constant of the slow phase of nucleotide release.',
    carryFlags: QUALIFIERS,
  },
];

/**
 * Default WT-like bands (manifest: thresholds.bands["turnover.<metric>"]). Common practice, no
 * source: the slow-phase fraction uses ±0.10 absolute; the two rates, fitted time constants,
 * take 0.67–1.5.
 */
export const TURNOVER_BANDS: Record<string, [number, number]> = {
  slowFraction: [-0.1, 0.1],
  kFast: [0.67, 1.5],
  kSlow: [0.67, 1.5],
};
