/**
 * Every flag code myofolio writes on a unit, a comparison or a variant, in plain words: a short
 * label for tables (the index, a report's metric rows) and a sentence for the glossary page and a
 * report's flag list. The one catalogue of flag explanations: tests/results/flag-words.test.ts
 * collects every code emitted in src/ and fails when one has no entry here.
 *
 * A flag's own message (Flag.message) says what happened to one record, with its numbers; the
 * words here say what the code means wherever it appears.
 */

/** Where a flag code is attached: a biological unit's fit, a variant-versus-WT comparison, or the variant as a whole. */
export type FlagLevel = 'unit' | 'comparison' | 'variant';

export interface FlagWords {
  /** A few words for a table cell, e.g. 'KM above the actin range'. */
  label: string;
  /** What the flag means and what it does to the result, in one or two plain sentences. */
  explanation: string;
  /** Levels the code is attached at. */
  levels: readonly FlagLevel[];
}

const entries = {
  // Units: fits and data of one biological preparation.
  'not-converged': {
    label: 'fit did not converge',
    explanation:
      'The curve fit of this preparation did not reach a stable optimum, so it gives no values for the metrics the fit estimates; the preparation is left out of those comparisons.',
    levels: ['unit'],
  },
  'too-few-points': {
    label: 'few concentrations or pCa values',
    explanation:
      'Fewer distinct concentrations (or pCa values) were measured than the curve needs to be well determined; the values are reported but rest on a thin curve.',
    levels: ['unit'],
  },
  'poorly-determined': {
    label: 'parameter poorly determined',
    explanation:
      'A fitted parameter has a standard error larger than the limit set for it relative to its value (or none at all), so that value is uncertain even though the fit converged.',
    levels: ['unit'],
  },
  'km-above-range': {
    label: 'KM above the actin range',
    explanation:
      'The fitted KM lies above the highest actin concentration measured, so kcat and KM are extrapolations beyond the data. A WT preparation with it is left out of the comparison; a variant with it gets no kcat or KM comparison.',
    levels: ['unit', 'comparison'],
  },
  'pca50-out-of-range': {
    label: 'pCa50 outside the measured range',
    explanation:
      'The fitted pCa50 lies outside the pCa range measured, so it and the Hill parameters are extrapolations. A WT preparation with it is left out; a variant with it gets no comparison of those metrics.',
    levels: ['unit', 'comparison'],
  },
  'force-no-activation': {
    label: 'no calcium-activated tension',
    explanation: 'The fitted calcium-activated tension is zero or negative; the pCa and tension columns of this fibre should be checked.',
    levels: ['unit'],
  },
  'nadh-too-few-readings': {
    label: 'well with too few readings',
    explanation: 'An NADH-coupled well has too few absorbance readings in the analysis window to give a rate; the well gives no value.',
    levels: ['unit'],
  },
  'nadh-no-heads': {
    label: 'well without myosin heads',
    explanation: 'A sample well gives no positive myosin head concentration, so no rate per head can be computed for it.',
    levels: ['unit'],
  },
  'nadh-no-background': {
    label: 'no actin-only background well',
    explanation:
      'No actin-only well matches this sample well, so its rate is not background-subtracted and reads high by the ATPase of actin alone.',
    levels: ['unit'],
  },
  'motility-short-tracks': {
    label: 'short filament tracks left out',
    explanation: 'Some filament tracks had too few frames to give a velocity and were left out; the other filaments of the preparation were used.',
    levels: ['unit'],
  },
  'motility-duplicate-frames': {
    label: 'repeated frame times',
    explanation: 'Some track rows repeat the time of an earlier frame of the same filament; the first row was kept and the repeats ignored.',
    levels: ['unit'],
  },
  'motility-both-inputs': {
    label: 'tracks and velocities both given',
    explanation:
      'The preparation has both centroid tracks and ready-made velocities; velocities computed from the tracks were used and the velocity rows ignored. Nothing is wrong with the result.',
    levels: ['unit'],
  },
  'motility-invalid-velocity': {
    label: 'invalid velocities left out',
    explanation: 'Some filament velocities were negative or not numbers and were left out.',
    levels: ['unit'],
  },
  'motility-too-few-filaments': {
    label: 'few filaments',
    explanation: 'Fewer filaments were analysed than recommended for one preparation, so its velocity is less certain.',
    levels: ['unit'],
  },
  'motility-no-moving-filaments': {
    label: 'no moving filaments',
    explanation: 'No filament moved faster than the immobility threshold, so the preparation gives no velocity.',
    levels: ['unit'],
  },
  'motility-high-immobile-fraction': {
    label: 'many immobile filaments',
    explanation:
      'More filaments were immobile than the limit set for a sound preparation, which often means damaged (dead) heads; the preparation should be checked.',
    levels: ['unit'],
  },
  'window-too-short': {
    label: 'trace too short for the slow phase',
    explanation:
      'The single-turnover trace was not followed for enough slow-phase time constants, so the slow rate and the slow-phase fraction are less certain.',
    levels: ['unit'],
  },
  'one-phase-trace': {
    label: 'one phase resolved',
    explanation:
      'Only one exponential phase could be resolved in the single-turnover trace; the slow-phase fraction was estimated with the other rate fixed at the WT value of the same batch.',
    levels: ['unit'],
  },
  'no-reference-rates': {
    label: 'no WT rates to place one phase',
    explanation:
      'The trace resolved one phase, and no WT trace of its batch resolved two, so the phase cannot be placed and the trace gives no slow-phase fraction.',
    levels: ['unit'],
  },
  // Comparisons: one variant's metric against WT of the same batches.
  'units-not-estimable': {
    label: 'preparations without a value',
    explanation:
      'Some of the variant’s preparations gave no value of this metric and were left out of the comparison; the comparison rests on the others.',
    levels: ['comparison'],
  },
  'wt-units-left-out': {
    label: 'WT preparations left out',
    explanation: 'Some WT preparations of the paired batches were left out of this comparison, for the reason given (usually an extrapolated value).',
    levels: ['comparison'],
  },
  'batch-without-wt': {
    label: 'batch without WT',
    explanation: 'A batch had no WT value of this metric, so the variant’s preparations in that batch could not be paired and were not compared.',
    levels: ['comparison'],
  },
  'no-residual-df': {
    label: 'too few preparations for an interval',
    explanation: 'Too few preparations to estimate the spread between them, so the effect has no confidence interval and no call beyond not estimable or indeterminate.',
    levels: ['comparison'],
  },
  'variance-pooled': {
    label: 'one variance for variant and WT',
    explanation:
      'The variant and WT preparations could not each give their own spread, so one spread was used for both; the interval assumes the variant scatters as WT does.',
    levels: ['comparison'],
  },
  'wt-qc-rejected': {
    label: 'WT control out of control',
    explanation:
      'The variant was compared in a batch whose WT values broke a Westgard rejection rule on the control chart, so that batch’s WT may not be a sound reference.',
    levels: ['comparison', 'variant'],
  },
  // Variants as a whole.
  excluded: {
    label: 'preparation excluded',
    explanation: 'The lab excluded a preparation of this variant in the study manifest, with the reason given; it is shown but not used in any statistic.',
    levels: ['variant'],
  },
} satisfies Record<string, FlagWords>;

/** Every flag code with its words. */
export const FLAG_WORDS: Readonly<Record<string, FlagWords>> = entries;

/** The words of a flag code, or undefined for a code this version does not know (e.g. from another tool version's results). */
export function flagWords(code: string): FlagWords | undefined {
  return Object.prototype.hasOwnProperty.call(FLAG_WORDS, code) ? FLAG_WORDS[code] : undefined;
}

/** Anchor id of a code's entry on the glossary page. Example: flagAnchor('km-above-range') → 'flag-km-above-range'. */
export function flagAnchor(code: string): string {
  return `flag-${code.replace(/[^A-Za-z0-9_-]/g, '-')}`;
}
