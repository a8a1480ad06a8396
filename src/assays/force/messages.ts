/**
 * The force assay's messages, in one place: every flag code its analysis can raise, in plain words
 * (the glossary page), and the message of each flag (what happened to one preparation, with its
 * numbers); the problems only its input kind can have.
 */
import { type MessageText, type SourceRef, shown } from '../../results/source.js';
import { FIT_FLAG_WORDS } from '../fit-flags.js';
import type { FlagOf, FlagWords } from '../types.js';

export const FORCE_FLAG_WORDS = {
  ...FIT_FLAG_WORDS,
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
} satisfies Record<string, FlagWords>;

/** A flag the force assay raises. */
export type ForceFlag = FlagOf<keyof typeof FORCE_FLAG_WORDS>;

export const FORCE_MSG = {
  tooFewPoints: (distinct: number, minPoints: number, at: SourceRef): ForceFlag => ({
    code: 'too-few-points',
    severity: 'warning',
    message: `Only ${distinct} distinct pCa values (at least ${minPoints} recommended for a four-parameter Hill fit).`,
    at,
  }),
  notConverged: (stopReason: string, at: SourceRef): ForceFlag => ({
    code: 'not-converged',
    severity: 'warning',
    message: `The Hill fit did not converge (${stopReason}); Fmax, pCa50, nH and passive tension are not reported for this preparation.`,
    at,
  }),
  pCa50OutOfRange: (pCa50: number, lowPCa: number, highPCa: number, at: SourceRef): ForceFlag => ({
    code: 'pca50-out-of-range',
    severity: 'warning',
    message: `pCa50 (${pCa50.toFixed(2)}) lies outside the measured pCa range ${lowPCa}–${highPCa}: it is an extrapolation.`,
    at,
  }),
  noActivation: (at: SourceRef): ForceFlag => ({
    code: 'force-no-activation',
    severity: 'warning',
    message: 'The fitted calcium-activated tension is not positive: check the pCa and tension columns.',
    at,
  }),
  /** pCa50's standard error `se` (pCa units) is `relative` × [Ca²⁺]50, above `limit` (fractions). */
  pCa50PoorlyDetermined: (se: number, relative: number, limit: number): ForceFlag => ({
    code: 'poorly-determined',
    severity: 'warning',
    message: `pCa50 is poorly determined (SE ${se.toFixed(3)} pCa units, i.e. ${(relative * 100).toFixed(0)}% of [Ca²⁺]50; limit ${(limit * 100).toFixed(0)}%).`,
  }),
  pCa50NoStandardError: (): ForceFlag => ({
    code: 'poorly-determined',
    severity: 'warning',
    message: 'pCa50 has no standard error (the fit’s Jacobian is singular at the optimum).',
  }),
};

/** Input problems only force-pca files can have. */
export const FORCE_INPUT_MSG = {
  needsCrossSection: (unit: string): MessageText => ({
    severity: 'error',
    code: 'csv.needs-cross-section',
    message: `Force is given without a cross-sectional area for preparation '${shown(unit)}'.`,
    fix: 'Add an area column, or "crossSection" (value or byPreparation) to the file entry, or give tension instead.',
  }),
};
