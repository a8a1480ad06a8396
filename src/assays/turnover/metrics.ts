/**
 * The single-turnover assay's metrics (definitions and hypercontractile directions) and their
 * default WT-like bands.
 */
import type { MetricDef } from '../../results/types.js';
import type { PlausibleRange } from '../types.js';

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

/**
 * Typical WT values that fitted values are checked against (src/analysis/plausibility.ts). The slow
 * fraction has no unit: no unit mistake shows in it.
 */
export const TURNOVER_PLAUSIBLE: Record<string, PlausibleRange | null> = {
  slowFraction: null,
  kFast: {
    typical: [0.03, 0.03],
    of: 'human β-cardiac two-headed myosin (Sarkar et al., Sci Adv 2020)',
    source: 'fast phase 0.030 s⁻¹, Sarkar et al., Sci Adv 2020',
    causes: [{ kind: 'turnover', column: 'time', power: -1 }],
  },
  kSlow: {
    typical: [0.0034, 0.0034],
    of: 'human β-cardiac two-headed myosin (Sarkar et al., Sci Adv 2020)',
    source: 'slow phase 0.0034 s⁻¹, Sarkar et al., Sci Adv 2020',
    causes: [{ kind: 'turnover', column: 'time', power: -1 }],
  },
};
