/**
 * The ATPase assay's messages, in one place: every flag code its analysis can raise, in plain words
 * (the glossary page), and the message of each flag (what happened to one preparation or well,
 * with its numbers); the problems only its input kinds can have.
 */
import type { MessageText, SourceRef } from '../../results/source.js';
import { FIT_FLAG_WORDS } from '../fit-flags.js';
import type { FlagOf, FlagWords } from '../types.js';

export const ATPASE_FLAG_WORDS = {
  ...FIT_FLAG_WORDS,
  'km-above-range': {
    label: 'KM above the actin range',
    explanation:
      'The fitted KM lies above the highest actin concentration measured, so kcat and KM are extrapolations beyond the data. A WT preparation with it is left out of the comparison; a variant with it gets no kcat or KM comparison.',
    levels: ['unit', 'comparison'],
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
} satisfies Record<string, FlagWords>;

/** A flag the ATPase assay raises. */
export type AtpaseFlag = FlagOf<keyof typeof ATPASE_FLAG_WORDS>;

export const ATPASE_MSG = {
  tooFewPoints: (concentrations: number, minPoints: number): AtpaseFlag => ({
    code: 'too-few-points',
    severity: 'warning',
    message: `Only ${concentrations} actin concentrations (at least ${minPoints} recommended for a three-parameter curve).`,
  }),
  notConverged: (stopReason: string): AtpaseFlag => ({
    code: 'not-converged',
    severity: 'warning',
    message: `The Michaelis–Menten fit did not converge (${stopReason}); kcat, KM, kcat/KM and basal are not reported for this preparation.`,
  }),
  kmAboveRange: (km: number, maxActin: number): AtpaseFlag => ({
    code: 'km-above-range',
    severity: 'warning',
    message: `KM (${km.toPrecision(3)} µM) is above the highest actin concentration measured (${maxActin} µM): kcat and KM are extrapolations.`,
  }),
  nadhTooFewReadings: (well: string, batch: string, minReadings: number, windowS: number, at: SourceRef): AtpaseFlag => ({
    code: 'nadh-too-few-readings',
    severity: 'reject',
    message: `Well ${well} (batch ${batch}) has fewer than ${minReadings} A340 readings within the first ${windowS} s; no rate was computed.`,
    at,
  }),
  nadhNoHeads: (well: string, batch: string, headsUM: number, at: SourceRef): AtpaseFlag => ({
    code: 'nadh-no-heads',
    severity: 'reject',
    message: `Sample well ${well} (batch ${batch}) has a myosin head concentration of ${headsUM} µM; a rate per head cannot be computed.`,
    at,
  }),
  nadhNoBackground: (well: string, batch: string, actinUM: number, at: SourceRef): AtpaseFlag => ({
    code: 'nadh-no-background',
    severity: 'warning',
    message: `No actin-only well in batch ${batch} at ${actinUM} µM actin for well ${well}; its rate is not background-subtracted and reads high by the actin-only ATPase.`,
    at,
  }),
};

/** Input problems only the ATPase's input kinds can have. */
export const ATPASE_INPUT_MSG = {
  needsPathLength: (): MessageText => ({
    severity: 'error',
    code: 'csv.needs-path-length',
    message: 'No optical path length: the file has no path column and the manifest no pathLength.',
    fix: 'Add "pathLength": {"value": …, "unit": "cm"} to the file entry or a path column.',
  }),
  needsVariantUnit: (column: string): MessageText => ({
    severity: 'error',
    code: 'csv.empty-cell',
    message: `The cell in '${column}' is empty, but sample wells need it.`,
    fix: `Fill in '${column}' (only actin-only wells leave variant and preparation empty).`,
  }),
};
