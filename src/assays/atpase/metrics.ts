/**
 * The ATPase assay's metrics (definitions and hypercontractile directions) and their default
 * WT-like bands.
 */
import type { MetricDef } from '../../results/types.js';
import type { PlausibleRange } from '../types.js';

/** Unit flags that make kcat and KM extrapolations: such a unit does not enter their comparison (src/analysis/normalise.ts). */
const EXTRAPOLATED = ['km-above-range'] as const;
/** Unit flags that qualify the fitted values: counted on the comparison rows. */
const QUALIFIERS = ['too-few-points', 'poorly-determined', 'nadh-too-few-readings', 'nadh-no-background'] as const;

export const ATPASE_METRICS: MetricDef[] = [
  {
    id: 'kcat',
    label: 'kcat',
    unit: 's⁻¹',
    scale: 'ratio',
    hyper: 'up',
    primary: true,
    description: 'Maximal actin-activated rate per head above basal, from the fitted curve.',
    excludeFlagged: EXTRAPOLATED,
    carryFlags: QUALIFIERS,
  },
  {
    id: 'km',
    label: 'KM (actin)',
    unit: 'µM',
    scale: 'ratio',
    hyper: 'none',
    primary: false,
    description: 'Actin concentration at half-maximal activation.',
    excludeFlagged: EXTRAPOLATED,
    carryFlags: QUALIFIERS,
  },
  {
    id: 'kcatOverKm',
    label: 'kcat/KM (initial slope)',
    unit: 'µM⁻¹·s⁻¹',
    scale: 'ratio',
    hyper: 'none',
    primary: false,
    description:
      'Slope of the rate against actin at low actin: kcat/KM from the fitted curve. It stays well determined when KM lies above the actin range, where kcat and KM alone are extrapolations.',
    carryFlags: ['too-few-points', 'nadh-too-few-readings', 'nadh-no-background'],
  },
  {
    id: 'basal',
    label: 'Basal rate',
    unit: 's⁻¹',
    scale: 'difference',
    hyper: 'none',
    primary: false,
    description: 'Rate per head without actin (the fitted v0), compared as a difference in s⁻¹: it lies near zero, where ratios are unstable, and a fit may put it below zero.',
    carryFlags: ['too-few-points', 'nadh-too-few-readings', 'nadh-no-background'],
  },
];

/**
 * Default WT-like bands (manifest: thresholds.bands["atpase.<metric>"]). Common practice, no
 * source: 0.8–1.25 (±20–25%, symmetric on the log scale) for rates is a band many labs use
 * informally; KM, a fitted half-saturation concentration, takes 0.67–1.5; kcat/KM, a quotient of
 * two fitted values, takes the KM band. The basal rate lies near zero and is compared as a
 * difference in s⁻¹: ±0.01 s⁻¹ is about a third of a typical WT basal rate of 0.02–0.04 s⁻¹
 * (typical value from memory; band common practice, no source). It is
 * reported only, never in calls.
 */
export const ATPASE_BANDS: Record<string, [number, number]> = {
  kcat: [0.8, 1.25],
  km: [0.67, 1.5],
  kcatOverKm: [0.67, 1.5],
  basal: [-0.01, 0.01],
};

/**
 * Typical WT ranges that fitted values are checked against (src/analysis/plausibility.ts). kcat/KM
 * and the basal rate have none: kcat/KM follows from kcat and KM, which are checked, and the basal
 * rate lies near zero, where no range tells a unit mistake from a weak preparation.
 */
export const ATPASE_PLAUSIBLE: Record<string, PlausibleRange | null> = {
  kcat: {
    typical: [4, 7],
    of: 'human β-cardiac myosin',
    source: 'typical WT values of the trade, from memory',
    causes: [
      { kind: 'atpase-rates', column: 'rate', power: 1 },
      { kind: 'atpase-nadh', column: 'heads', power: -1 },
      { kind: 'atpase-nadh', column: 'time', power: -1 },
      { kind: 'atpase-nadh', column: 'path', power: -1 },
    ],
  },
  km: {
    typical: [10, 100],
    of: 'human β-cardiac myosin',
    source: '"tens of µM", typical WT values of the trade, from memory',
    causes: [
      { kind: 'atpase-rates', column: 'actin', power: 1 },
      { kind: 'atpase-nadh', column: 'actin', power: 1 },
    ],
  },
  kcatOverKm: null,
  basal: null,
};
