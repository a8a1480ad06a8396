/**
 * The force–pCa assay's metrics (definitions and hypercontractile directions) and their default
 * WT-like bands.
 */
import type { MetricDef } from '../../results/types.js';
import type { PlausibleRange } from '../types.js';

/** Unit flags that make the Hill parameters extrapolations or meaningless: such a unit does not enter their comparison. */
const EXTRAPOLATED = ['pca50-out-of-range', 'force-no-activation'] as const;
/** Unit flags that qualify the fitted values: counted on the comparison rows. */
const QUALIFIERS = ['too-few-points', 'poorly-determined'] as const;

export const FORCE_METRICS: MetricDef[] = [
  {
    id: 'fmax',
    label: 'Fmax (calcium-activated tension)',
    unit: 'kPa',
    scale: 'ratio',
    hyper: 'up',
    primary: true,
    description: 'Maximal calcium-activated tension above passive, from the fitted Hill curve (kPa = mN/mm²).',
    excludeFlagged: EXTRAPOLATED,
    carryFlags: QUALIFIERS,
  },
  {
    id: 'pCa50',
    label: 'pCa50',
    unit: '',
    scale: 'difference',
    hyper: 'up',
    primary: true,
    description: 'pCa at half-maximal activation; a positive difference from WT is calcium sensitisation.',
    excludeFlagged: EXTRAPOLATED,
    carryFlags: QUALIFIERS,
  },
  {
    id: 'nH',
    label: 'Hill coefficient nH',
    unit: '',
    scale: 'ratio',
    hyper: 'none',
    primary: false,
    description: 'Steepness of the force–pCa relation (cooperativity of activation).',
    excludeFlagged: EXTRAPOLATED,
    carryFlags: QUALIFIERS,
  },
  {
    id: 'passive',
    label: 'Passive tension',
    unit: 'kPa',
    scale: 'difference',
    hyper: 'none',
    primary: false,
    description: 'Fitted tension at low calcium (high pCa), compared as a difference in kPa: it lies near zero, where ratios are unstable, and a fit may put it below zero.',
    carryFlags: ['too-few-points'],
  },
];

/**
 * Default WT-like bands (manifest: thresholds.bands["force.<metric>"]). Common practice, no
 * source: 0.8–1.25 (±20–25%, symmetric on the log scale) for Fmax and nH is a band many labs use
 * informally. pCa50 ±0.1 is the same size on the calcium axis: a shift of 0.1 pCa units is a
 * 10^0.1 = 1.26-fold change in [Ca²⁺] at half activation. Passive tension lies near zero and is
 * compared as a difference in kPa: ±1 kPa is about half a typical passive tension (typical value
 * from memory; band common practice, no source). It is reported only,
 * never in calls.
 */
export const FORCE_BANDS: Record<string, [number, number]> = {
  fmax: [0.8, 1.25],
  pCa50: [-0.1, 0.1],
  nH: [0.8, 1.25],
  passive: [-1, 1],
};

/**
 * Typical WT ranges that fitted values are checked against (src/analysis/plausibility.ts). nH has
 * no unit, and passive tension varies too widely between preparations for a range to tell a unit
 * mistake; Fmax, from the same tension column, shows one.
 */
export const FORCE_PLAUSIBLE: Record<string, PlausibleRange | null> = {
  fmax: {
    typical: [20, 40],
    of: 'human cardiomyocytes',
    source: 'typical values of the trade (kN/m² = kPa), from memory',
    causes: [
      { kind: 'force-pca', column: 'tension', power: 1 },
      { kind: 'force-pca', column: 'force', power: 1 },
      { kind: 'force-pca', column: 'area', power: -1 },
    ],
  },
  pCa50: {
    typical: [5.5, 6.0],
    of: 'cardiac preparations',
    source: 'typical values of the trade, from memory',
    causes: [{ kind: 'force-pca', column: 'pCa', power: 0 }],
  },
  nH: null,
  passive: null,
};
