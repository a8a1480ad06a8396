/**
 * The assays' message catalogues (src/assays/<id>/messages.ts, src/assays/fit-flags.ts) write each
 * flag and input problem as the assay modules wrote them inline before the catalogues existed: each
 * expected text below is that old template filled in by hand with the inputs given (computed from
 * the inputs; the formatting is JavaScript's toPrecision/toFixed).
 */
import { describe, expect, it } from 'vitest';
import { ATPASE_INPUT_MSG, ATPASE_MSG } from '../../src/assays/atpase/messages.js';
import { FIT_MSG } from '../../src/assays/fit-flags.js';
import { FORCE_INPUT_MSG, FORCE_MSG } from '../../src/assays/force/messages.js';
import { MOTILITY_INPUT_MSG, MOTILITY_MSG } from '../../src/assays/motility/messages.js';
import { TURNOVER_MSG } from '../../src/assays/turnover/messages.js';

const at = { file: 'a.csv', line: 7 };

describe('the assays’ flag messages', () => {
  it('shared fit flags', () => {
    expect(FIT_MSG.poorlyDetermined('KM', 0.634, 0.5)).toEqual({ code: 'poorly-determined', severity: 'warning', message: 'KM is poorly determined (standard error 63% of the value; limit 50%).' });
    expect(FIT_MSG.noStandardError('kcat')).toEqual({ code: 'poorly-determined', severity: 'warning', message: "kcat has no standard error (the fit's Jacobian is singular at the optimum)." });
  });

  it('ATPase', () => {
    expect(ATPASE_MSG.tooFewPoints(3, 5)).toEqual({ code: 'too-few-points', severity: 'warning', message: 'Only 3 actin concentrations (at least 5 recommended for a three-parameter curve).' });
    expect(ATPASE_MSG.notConverged('max-iterations').message).toBe('The Michaelis–Menten fit did not converge (max-iterations); kcat, KM, kcat/KM and basal are not reported for this preparation.');
    expect(ATPASE_MSG.kmAboveRange(123.456, 40)).toEqual({ code: 'km-above-range', severity: 'warning', message: 'KM (123 µM) is above the highest actin concentration measured (40 µM): kcat and KM are extrapolations.' });
    expect(ATPASE_MSG.nadhTooFewReadings('A1', 'B1', 3, 60, at)).toEqual({ code: 'nadh-too-few-readings', severity: 'reject', message: 'Well A1 (batch B1) has fewer than 3 A340 readings within the first 60 s; no rate was computed.', at });
    expect(ATPASE_MSG.nadhNoHeads('A2', 'B1', 0, at)).toEqual({ code: 'nadh-no-heads', severity: 'reject', message: 'Sample well A2 (batch B1) has a myosin head concentration of 0 µM; a rate per head cannot be computed.', at });
    expect(ATPASE_MSG.nadhNoBackground('A3', 'B1', 10, at)).toEqual({ code: 'nadh-no-background', severity: 'warning', message: 'No actin-only well in batch B1 at 10 µM actin for well A3; its rate is not background-subtracted and reads high by the actin-only ATPase.', at });
  });

  it('force', () => {
    expect(FORCE_MSG.tooFewPoints(4, 6, at)).toEqual({ code: 'too-few-points', severity: 'warning', message: 'Only 4 distinct pCa values (at least 6 recommended for a four-parameter Hill fit).', at });
    expect(FORCE_MSG.notConverged('singular', at).message).toBe('The Hill fit did not converge (singular); Fmax, pCa50, nH and passive tension are not reported for this preparation.');
    expect(FORCE_MSG.pCa50OutOfRange(4.1234, 4.5, 9, at).message).toBe('pCa50 (4.12) lies outside the measured pCa range 4.5–9: it is an extrapolation.');
    expect(FORCE_MSG.noActivation(at)).toEqual({ code: 'force-no-activation', severity: 'warning', message: 'The fitted calcium-activated tension is not positive: check the pCa and tension columns.', at });
    // 0.1 pCa units: ln(10) × 0.1 = 0.2303 of [Ca²⁺]50.
    expect(FORCE_MSG.pCa50PoorlyDetermined(0.1, 0.2303, 0.2)).toEqual({ code: 'poorly-determined', severity: 'warning', message: 'pCa50 is poorly determined (SE 0.100 pCa units, i.e. 23% of [Ca²⁺]50; limit 20%).' });
    expect(FORCE_MSG.pCa50NoStandardError().message).toBe('pCa50 has no standard error (the fit’s Jacobian is singular at the optimum).');
  });

  it('motility', () => {
    expect(MOTILITY_MSG.shortTracks(2, 5, undefined)).toEqual({ code: 'motility-short-tracks', severity: 'info', message: '2 track(s) with fewer than 5 frames gave no velocity and were left out.', at: undefined });
    expect(MOTILITY_MSG.duplicateFrames(3, at).message).toBe('3 track row(s) repeat the time of an earlier frame of the same filament; the first was kept.');
    expect(MOTILITY_MSG.bothInputs(12, at)).toEqual({ code: 'motility-both-inputs', severity: 'info', message: 'This preparation has both centroid tracks and 12 velocity row(s); the velocities from tracks were used and the velocity rows ignored.', at });
    expect(MOTILITY_MSG.invalidVelocity(1, at).message).toBe('1 filament velocity value(s) are negative or not numbers and were left out.');
    expect(MOTILITY_MSG.tooFewFilaments(8, 20, at).message).toBe('Only 8 filament(s) analysed (at least 20 recommended per preparation).');
    expect(MOTILITY_MSG.noMovingFilaments(0.05, at).message).toBe('No filament moved at or above 0.05 µm/s; velocity is not estimable for this preparation.');
    expect(MOTILITY_MSG.highImmobileFraction(0.4567, 0.3, at)).toEqual({ code: 'motility-high-immobile-fraction', severity: 'warning', message: '45.7% of filaments are immobile (above 30%): check the preparation for dead heads.', at });
  });

  it('single turnover', () => {
    expect(TURNOVER_MSG.windowTooShort('Trace t1', 600, 3, 0.0034, at).message).toBe('Trace t1 lasts 600 s, less than 3 slow-phase time constant(s) (1/kSlow = 294 s): the slow phase is not followed long enough.');
    expect(TURNOVER_MSG.noFit('Trace t1', 'max-iterations', at)).toEqual({ code: 'not-converged', severity: 'warning', message: 'Neither the double nor the single exponential fit of Trace t1 converged (max-iterations); the trace gives no values.', at });
    expect(TURNOVER_MSG.onePhase('Trace t1', 'phases not separated (p = 0.4)', 0.03012, at).message).toBe('Trace t1: phases not separated (p = 0.4); one phase (k = 0.0301 s⁻¹) was resolved.');
    expect(TURNOVER_MSG.noReferenceRates('Trace t1', at).message).toBe('Trace t1: the batch has no WT trace with two resolved phases, so the one phase cannot be placed; the trace gives no slow fraction.');
    expect(TURNOVER_MSG.refitNotConverged('Trace t1', 'slow', 0.0034, 'singular', at).message).toBe("Trace t1: the refit with the slow rate fixed at WT's 0.00340 s⁻¹ did not converge (singular); the trace gives no slow fraction.");
    // √(0.03 × 0.0034) = 0.0100995 s⁻¹.
    const placement = { reason: 'phases not separated (p = 0.4)', kSingle: 0.03012, midpoint: Math.sqrt(0.03 * 0.0034), source: 'geometric means of 6 WT traces of batch B1', slowFraction: 0.01234, slowFractionSe: 0.0456 };
    expect(TURNOVER_MSG.onePhasePlaced('Trace t1', { ...placement, isFast: true, fixedRate: 0.0034 }, at)).toEqual({
      code: 'one-phase-trace',
      severity: 'warning',
      message:
        "Trace t1: phases not separated (p = 0.4); the one resolved phase (k = 0.0301 s⁻¹) is taken as the fast phase, at or above √(kFast·kSlow) = 0.0101 s⁻¹ of WT (geometric means of 6 WT traces of batch B1); refitted with the slow rate fixed at WT's 0.00340 s⁻¹: slow fraction 0.012 ± 0.046 (SE).",
      at,
    });
    expect(TURNOVER_MSG.onePhasePlaced('Trace t1', { ...placement, kSingle: 0.004, isFast: false, fixedRate: 0.03, slowFractionSe: NaN }, at).message).toBe(
      "Trace t1: phases not separated (p = 0.4); the one resolved phase (k = 0.00400 s⁻¹) is taken as the slow phase, below √(kFast·kSlow) = 0.0101 s⁻¹ of WT (geometric means of 6 WT traces of batch B1); refitted with the fast rate fixed at WT's 0.0300 s⁻¹: slow fraction 0.012.",
    );
  });
});

describe('the assays’ input problems', () => {
  it('keep their codes, texts and fixes', () => {
    expect(ATPASE_INPUT_MSG.needsPathLength()).toEqual({
      severity: 'error',
      code: 'csv.needs-path-length',
      message: 'No optical path length: the file has no path column and the manifest no pathLength.',
      fix: 'Add "pathLength": {"value": …, "unit": "cm"} to the file entry or a path column.',
    });
    expect(ATPASE_INPUT_MSG.needsVariantUnit('preparation')).toEqual({
      severity: 'error',
      code: 'csv.empty-cell',
      message: "The cell in 'preparation' is empty, but sample wells need it.",
      fix: "Fill in 'preparation' (only actin-only wells leave variant and preparation empty).",
    });
    expect(FORCE_INPUT_MSG.needsCrossSection('F1')).toEqual({
      severity: 'error',
      code: 'csv.needs-cross-section',
      message: "Force is given without a cross-sectional area for preparation 'F1'.",
      fix: 'Add an area column, or "crossSection" (value or byPreparation) to the file entry, or give tension instead.',
    });
    expect(MOTILITY_INPUT_MSG.needsFrameInterval()).toEqual({
      severity: 'error',
      code: 'csv.needs-frame-interval',
      message: 'Tracks are given by frame but the manifest gives no frameInterval for this file.',
      fix: 'Add "frameInterval": {"value": …, "unit": "s"} to the file entry, or give a time column.',
    });
  });

  it('cut a label from the input as every other message does (src/results/source.ts shown)', () => {
    expect(FORCE_INPUT_MSG.needsCrossSection('F'.repeat(5000)).message).toBe(`Force is given without a cross-sectional area for preparation '${'F'.repeat(39)}… (5,000 characters)'.`);
  });
});
