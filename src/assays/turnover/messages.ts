/**
 * The single-turnover assay's messages, in one place: every flag code its analysis can raise, in
 * plain words (the glossary page), and the message of each flag (what happened to one trace, with
 * its numbers).
 */
import type { SourceRef } from '../../results/source.js';
import { FIT_FLAG_WORDS } from '../fit-flags.js';
import type { FlagOf, FlagWords } from '../types.js';

export const TURNOVER_FLAG_WORDS = {
  'not-converged': FIT_FLAG_WORDS['not-converged'],
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
} satisfies Record<string, FlagWords>;

/** A flag the turnover assay raises. */
export type TurnoverFlag = FlagOf<keyof typeof TURNOVER_FLAG_WORDS>;

/** How a one-phase trace was placed and refitted (resolveOnePhase), for its message. */
export interface OnePhasePlacement {
  /** Why two phases were not kept, in words. */
  reason: string;
  /** The one resolved rate (s⁻¹). */
  kSingle: number;
  /** Is it taken as the fast phase? */
  isFast: boolean;
  /** √(kFast·kSlow) of the batch's WT traces (s⁻¹). */
  midpoint: number;
  /** Where the WT rates come from, in words. */
  source: string;
  /** The other phase's rate, fixed at WT's (s⁻¹). */
  fixedRate: number;
  slowFraction: number;
  /** Its standard error (NaN when the refit gives none). */
  slowFractionSe: number;
}

export const TURNOVER_MSG = {
  windowTooShort: (label: string, durationS: number, minSlowTimeConstants: number, kSlow: number, at: SourceRef | undefined): TurnoverFlag => ({
    code: 'window-too-short',
    severity: 'warning',
    message: `${label} lasts ${durationS.toPrecision(3)} s, less than ${minSlowTimeConstants} slow-phase time constant(s) (1/kSlow = ${(1 / kSlow).toPrecision(3)} s): the slow phase is not followed long enough.`,
    at,
  }),
  noFit: (label: string, stopReason: string, at: SourceRef | undefined): TurnoverFlag => ({
    code: 'not-converged',
    severity: 'warning',
    message: `Neither the double nor the single exponential fit of ${label} converged (${stopReason}); the trace gives no values.`,
    at,
  }),
  onePhase: (label: string, reason: string, k: number, at: SourceRef | undefined): TurnoverFlag => ({
    code: 'one-phase-trace',
    severity: 'warning',
    message: `${label}: ${reason}; one phase (k = ${k.toPrecision(3)} s⁻¹) was resolved.`,
    at,
  }),
  noReferenceRates: (label: string, at: SourceRef | undefined): TurnoverFlag => ({
    code: 'no-reference-rates',
    severity: 'warning',
    message: `${label}: the batch has no WT trace with two resolved phases, so the one phase cannot be placed; the trace gives no slow fraction.`,
    at,
  }),
  refitNotConverged: (label: string, otherPhase: 'fast' | 'slow', fixedRate: number, stopReason: string, at: SourceRef | undefined): TurnoverFlag => ({
    code: 'not-converged',
    severity: 'warning',
    message: `${label}: the refit with the ${otherPhase} rate fixed at WT's ${fixedRate.toPrecision(3)} s⁻¹ did not converge (${stopReason}); the trace gives no slow fraction.`,
    at,
  }),
  onePhasePlaced: (label: string, p: OnePhasePlacement, at: SourceRef | undefined): TurnoverFlag => ({
    code: 'one-phase-trace',
    severity: 'warning',
    message:
      `${label}: ${p.reason}; the one resolved phase (k = ${p.kSingle.toPrecision(3)} s⁻¹) is taken as the ${p.isFast ? 'fast' : 'slow'} phase, ` +
      `${p.isFast ? 'at or above' : 'below'} √(kFast·kSlow) = ${p.midpoint.toPrecision(3)} s⁻¹ of WT (${p.source}); ` +
      `refitted with the ${p.isFast ? 'slow' : 'fast'} rate fixed at WT's ${p.fixedRate.toPrecision(3)} s⁻¹: slow fraction ${p.slowFraction.toFixed(3)}` +
      (Number.isFinite(p.slowFractionSe) ? ` ± ${p.slowFractionSe.toFixed(3)} (SE)` : '') +
      '.',
    at,
  }),
};
