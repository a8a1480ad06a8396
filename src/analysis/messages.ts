/**
 * The flags the analysis itself raises, in one place: on a comparison of one variant's metric with
 * paired WT (normalise.ts, the control charts) and on a variant as a whole (analyse-study.ts). Each
 * code has its plain words (the glossary page: flag-words.ts) and each flag its message. The
 * assays' unit flags are in their own folders (src/assays/<id>/messages.ts); a comparison may pass
 * a unit flag on under the unit flag's code (`passedOn`, `carried`).
 */
import type { FlagOf, FlagWords } from '../assays/types.js';
import type { Flag } from '../results/types.js';

export const ANALYSIS_FLAG_WORDS = {
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

/** A flag of the analysis's own codes. */
export type AnalysisFlag = FlagOf<keyof typeof ANALYSIS_FLAG_WORDS>;

const plural = (n: number, word: string) => `${word}${n === 1 ? '' : 's'}`;

export const ANALYSIS_MSG = {
  // ---- comparisons (normalise.ts) ----
  /** `units`: the preparations without a value, listed. */
  unitsNotEstimable: (n: number, of: number, metric: string, units: string): AnalysisFlag => ({
    code: 'units-not-estimable',
    severity: 'warning',
    message: `${n} of ${of} variant preparations gave no ${metric} value (${units}) and were left out of the comparison.`,
  }),
  /** `first`: the unit flag that left the first of them out. */
  wtUnitsLeftOut: (n: number, units: string, first: Flag): AnalysisFlag => ({
    code: 'wt-units-left-out',
    severity: 'warning',
    message: `${n} ${plural(n, 'WT preparation')} of these batches (${units}) left out: ${first.message}`,
  }),
  /** The variant's extrapolated preparations stop the comparison, under the code of the unit flag `first` (e.g. km-above-range). */
  passedOn: (first: Flag, n: number, of: number, units: string, metric: string): Flag => ({
    code: first.code,
    severity: 'warning',
    message: `${n} of ${of} variant preparations (${units}) are flagged: ${first.message} ${metric} would rest on extrapolated values, so it is not compared.`,
  }),
  batchWithoutWt: (batches: readonly string[], metric: string): AnalysisFlag => ({
    code: 'batch-without-wt',
    severity: 'warning',
    message: `Batch ${batches.join(', ')} had no WT ${metric} value, so the variant's preparations there were not compared.`,
  }),
  noResidualDf: (nVariant: number, nWt: number): AnalysisFlag => ({
    code: 'no-residual-df',
    severity: 'warning',
    message: `Too few preparations for a confidence interval (${nVariant} variant, ${nWt} WT; at least one more is needed).`,
  }),
  variancePooled: (nVariant: number): AnalysisFlag => ({
    code: 'variance-pooled',
    severity: 'info',
    message: `One residual variance for variant and WT: ${
      nVariant < 2 ? 'the variant has one preparation' : 'no batch has two WT preparations'
    }, so the interval assumes the variant's preparations scatter as WT's do.`,
  }),
  /** A unit flag that qualifies the values (MetricDef.carryFlags), counted on the comparison under its own code; `sample` is one of them. */
  carried: (sample: Flag, nVariant: number, ofVariant: number, nWt: number, ofWt: number): Flag => ({
    code: sample.code,
    severity: sample.severity === 'reject' ? 'warning' : sample.severity,
    message: `${nVariant} of ${ofVariant} variant and ${nWt} of ${ofWt} WT preparations carry this flag; for example: ${sample.message}`,
  }),
  // ---- control charts (analyse-study.ts) ----
  /** On a comparison made in batches whose WT broke Westgard rules. */
  comparedInRejectedBatch: (batches: readonly string[], metric: string, rules: readonly string[]): AnalysisFlag => ({
    code: 'wt-qc-rejected',
    severity: 'warning',
    message: `Compared in batch ${batches.join(', ')}, whose WT ${metric} values broke Westgard ${plural(rules.length, 'rule')} ${rules.join(', ')}: the batch's WT may be out of control.`,
  }),
  // ---- variants as a whole (analyse-study.ts) ----
  variantInRejectedBatch: (assay: string, metric: string, batch: string, rules: readonly string[]): AnalysisFlag => ({
    code: 'wt-qc-rejected',
    severity: 'reject',
    message: `${assay} ${metric}: compared in batch ${batch}, whose WT control values broke Westgard ${plural(rules.length, 'rule')} ${rules.join(', ')}.`,
  }),
  excluded: (assay: string, unit: string, batch: string, reason: string): AnalysisFlag => ({
    code: 'excluded',
    severity: 'info',
    message: `${assay}: preparation ${unit} (batch ${batch}) excluded: ${reason}`,
  }),
};
