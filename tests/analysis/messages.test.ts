/**
 * The analysis's flag catalogue (src/analysis/messages.ts) writes each comparison and variant flag
 * as normalise.ts and analyse-study.ts wrote them inline before the catalogue existed: each
 * expected text below is that old template filled in by hand with the inputs given (computed from
 * the inputs).
 */
import { describe, expect, it } from 'vitest';
import { ANALYSIS_MSG } from '../../src/analysis/messages.js';
import type { Flag } from '../../src/results/types.js';

const km: Flag = { code: 'km-above-range', severity: 'warning', message: 'KM (123 µM) is above the highest actin concentration measured (40 µM): kcat and KM are extrapolations.' };
const nadh: Flag = { code: 'nadh-too-few-readings', severity: 'reject', message: 'Well A1 (batch B1) has fewer than 3 A340 readings within the first 60 s; no rate was computed.' };

describe('the analysis’s flag messages', () => {
  it('on comparisons', () => {
    expect(ANALYSIS_MSG.unitsNotEstimable(1, 3, 'kcat', 'p2 (B1)')).toEqual({ code: 'units-not-estimable', severity: 'warning', message: '1 of 3 variant preparations gave no kcat value (p2 (B1)) and were left out of the comparison.' });
    expect(ANALYSIS_MSG.wtUnitsLeftOut(1, 'w1 (B1)', km).message).toBe(`1 WT preparation of these batches (w1 (B1)) left out: ${km.message}`);
    expect(ANALYSIS_MSG.wtUnitsLeftOut(2, 'w1 (B1), w2 (B2)', km).message).toBe(`2 WT preparations of these batches (w1 (B1), w2 (B2)) left out: ${km.message}`);
    expect(ANALYSIS_MSG.passedOn(km, 1, 3, 'p1 (B1)', 'kcat')).toEqual({ code: 'km-above-range', severity: 'warning', message: `1 of 3 variant preparations (p1 (B1)) are flagged: ${km.message} kcat would rest on extrapolated values, so it is not compared.` });
    expect(ANALYSIS_MSG.batchWithoutWt(['B2', 'B3'], 'Fmax').message).toBe("Batch B2, B3 had no WT Fmax value, so the variant's preparations there were not compared.");
    expect(ANALYSIS_MSG.noResidualDf(1, 1)).toEqual({ code: 'no-residual-df', severity: 'warning', message: 'Too few preparations for a confidence interval (1 variant, 1 WT; at least one more is needed).' });
    expect(ANALYSIS_MSG.variancePooled(1)).toEqual({ code: 'variance-pooled', severity: 'info', message: "One residual variance for variant and WT: the variant has one preparation, so the interval assumes the variant's preparations scatter as WT's do." });
    expect(ANALYSIS_MSG.variancePooled(3).message).toBe("One residual variance for variant and WT: no batch has two WT preparations, so the interval assumes the variant's preparations scatter as WT's do.");
    // A rejecting unit flag is carried as a warning, under its own code.
    expect(ANALYSIS_MSG.carried(nadh, 1, 3, 0, 4)).toEqual({ code: 'nadh-too-few-readings', severity: 'warning', message: `1 of 3 variant and 0 of 4 WT preparations carry this flag; for example: ${nadh.message}` });
    expect(ANALYSIS_MSG.carried(km, 1, 3, 2, 4).severity).toBe('warning');
    expect(ANALYSIS_MSG.comparedInRejectedBatch(['B2'], 'kcat', ['1-3s']).message).toBe("Compared in batch B2, whose WT kcat values broke Westgard rule 1-3s: the batch's WT may be out of control.");
    expect(ANALYSIS_MSG.comparedInRejectedBatch(['B2', 'B3'], 'kcat', ['1-3s', 'R-4s']).message).toBe("Compared in batch B2, B3, whose WT kcat values broke Westgard rules 1-3s, R-4s: the batch's WT may be out of control.");
  });

  it('on variants', () => {
    expect(ANALYSIS_MSG.variantInRejectedBatch('atpase', 'kcat', 'B2', ['2-2s'])).toEqual({ code: 'wt-qc-rejected', severity: 'reject', message: 'atpase kcat: compared in batch B2, whose WT control values broke Westgard rule 2-2s.' });
    expect(ANALYSIS_MSG.excluded('Actin-activated ATPase', 'p3', 'B1', 'bubbles in the cuvette')).toEqual({ code: 'excluded', severity: 'info', message: 'Actin-activated ATPase: preparation p3 (batch B1) excluded: bubbles in the cuvette' });
  });
});
