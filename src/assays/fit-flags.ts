/**
 * Unit flags that several assays raise about a curve fit, in one place: their plain words, which
 * each raising assay takes into its own catalogue (src/assays/<id>/messages.ts), and the message of
 * a poorly determined parameter (relativeSeFlags in assay-common.ts). Messages that name an
 * assay's own model or data are written in that assay's messages.ts.
 */
import type { FlagOf, FlagWords } from './types.js';

export const FIT_FLAG_WORDS = {
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
} satisfies Record<string, FlagWords>;

/** A flag of the shared fit codes. */
export type FitFlag = FlagOf<keyof typeof FIT_FLAG_WORDS>;

export const FIT_MSG = {
  /** A parameter whose standard error is `relative` × its value, above `limit` (both fractions). */
  poorlyDetermined: (parameter: string, relative: number, limit: number): FitFlag => ({
    code: 'poorly-determined',
    severity: 'warning',
    message: `${parameter} is poorly determined (standard error ${(relative * 100).toFixed(0)}% of the value; limit ${(limit * 100).toFixed(0)}%).`,
  }),
  /** A parameter without a standard error. */
  noStandardError: (parameter: string): FitFlag => ({
    code: 'poorly-determined',
    severity: 'warning',
    message: `${parameter} has no standard error (the fit's Jacobian is singular at the optimum).`,
  }),
};
