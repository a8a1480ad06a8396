/**
 * The motility assay's metrics (definitions and hypercontractile directions) and their default
 * WT-like bands.
 */
import type { MetricDef } from '../../results/types.js';
import type { PlausibleRange } from '../types.js';

/** Unit flags that qualify the motility values: counted on the comparison rows. */
const QUALIFIERS = ['motility-too-few-filaments', 'motility-high-immobile-fraction', 'motility-invalid-velocity', 'motility-duplicate-frames'] as const;

export const MOTILITY_METRICS: MetricDef[] = [
  {
    id: 'velocity',
    label: 'Mean velocity of moving filaments',
    unit: 'µm/s',
    scale: 'ratio',
    hyper: 'up',
    primary: true,
    description: 'Arithmetic mean of the velocities of the filaments at or above the immobile threshold.',
    carryFlags: QUALIFIERS,
  },
  {
    id: 'medianVelocity',
    label: 'Median velocity of moving filaments',
    unit: 'µm/s',
    scale: 'ratio',
    hyper: 'up',
    primary: false,
    description: 'Median of the moving filaments’ velocities; less sensitive to a few fast or stuttering filaments.',
    carryFlags: QUALIFIERS,
  },
  {
    id: 'p95Velocity',
    label: '95th percentile velocity of moving filaments',
    unit: 'µm/s',
    scale: 'ratio',
    hyper: 'up',
    primary: false,
    description: '95th percentile (type 7, as R) of the moving filaments’ velocities: the speed of the fastest filaments.',
    carryFlags: QUALIFIERS,
  },
  {
    id: 'fractionImmobile',
    label: 'Fraction of immobile filaments',
    unit: '',
    scale: 'difference',
    hyper: 'none',
    primary: false,
    description:
      'Immobile filaments over all analysed filaments. Reported, not used in calls: it depends strongly on preparation quality (dead heads), so its direction says little about the variant’s mechanism.',
    carryFlags: QUALIFIERS,
  },
];

/**
 * Default WT-like bands (manifest: thresholds.bands["motility.<metric>"]). Common practice, no
 * source: 0.8–1.25 (±20–25%, symmetric on the log scale) for velocities is a band many labs use
 * informally; the immobile fraction uses ±0.10 absolute.
 */
export const MOTILITY_BANDS: Record<string, [number, number]> = {
  velocity: [0.8, 1.25],
  medianVelocity: [0.8, 1.25],
  p95Velocity: [0.8, 1.25],
  fractionImmobile: [-0.1, 0.1],
};

/**
 * Typical WT ranges that fitted values are checked against (src/analysis/plausibility.ts). Only the
 * mean velocity has one: the median and 95th percentile follow the same columns, so a unit mistake
 * shows in the mean already; the immobile fraction has no unit.
 */
export const MOTILITY_PLAUSIBLE: Record<string, PlausibleRange | null> = {
  velocity: {
    typical: [0.7, 1.0],
    of: 'human β-cardiac myosin',
    source: 'typical WT values of the trade, from memory',
    causes: [
      { kind: 'motility-velocities', column: 'velocity', power: 1 },
      { kind: 'motility-tracks', column: 'x', power: 1 },
      { kind: 'motility-tracks', column: 'time', power: -1 },
    ],
  },
  medianVelocity: null,
  p95Velocity: null,
  fractionImmobile: null,
};
