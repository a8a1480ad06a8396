import { describe, expect, it } from 'vitest';
import {
  calibrate,
  evidenceForReadout,
  evidenceLevel,
  evidenceLevelOfRatio,
  limitLevel,
  oddsPath,
  type CalibrationControl,
} from '../../src/calibrate/oddspath.js';
import { CALIBRATION } from '../../src/defaults.js';

/** Controls with perfect separation: every pathogenic reads abnormal, every benign reads normal. */
function perfect(nPathogenic: number, nBenign: number): CalibrationControl[] {
  const out: CalibrationControl[] = [];
  for (let i = 0; i < nPathogenic; i++) out.push({ id: `P${i}`, knownClass: i % 2 ? 'likely pathogenic' : 'pathogenic', readout: 'abnormal' });
  for (let i = 0; i < nBenign; i++) out.push({ id: `B${i}`, knownClass: i % 2 ? 'likely benign' : 'benign', readout: 'normal' });
  return out;
}

/** Controls from the four cells of the 2×2 table. */
function table(pa: number, pn: number, ba: number, bn: number, notCounted = 0): CalibrationControl[] {
  const out: CalibrationControl[] = [];
  const add = (n: number, knownClass: CalibrationControl['knownClass'], readout: CalibrationControl['readout']) => {
    for (let i = 0; i < n; i++) out.push({ id: `${knownClass}-${readout}-${i}`, knownClass, readout });
  };
  add(pa, 'pathogenic', 'abnormal');
  add(pn, 'pathogenic', 'normal');
  add(ba, 'benign', 'abnormal');
  add(bn, 'benign', 'normal');
  add(notCounted, 'likely pathogenic', null);
  return out;
}

describe('oddsPath formula', () => {
  it('is [P2(1 − P1)] / [(1 − P2)P1] (Brnich et al. 2020)', () => {
    // computed from Brnich et al. 2020 formula inputs: P1 = 0.5, P2 = 0.9 → 0.9·0.5/(0.1·0.5) = 9
    expect(oddsPath(0.5, 0.9)).toBeCloseTo(9, 12);
    // computed with the formula of Brnich et al. 2020: 5P+6B with the added pair, P1 = 6/13, P2 = 5/6 → 5.8333
    expect(oddsPath(6 / 13, 5 / 6)).toBeCloseTo(35 / 6, 12);
    // P2 = P1 means the readout carries no information: OddsPath 1 (follows from the formula)
    expect(oddsPath(0.3, 0.3)).toBeCloseTo(1, 12);
  });
  it('gives 0 and Infinity at the edges of P2 and rejects P1 outside (0, 1)', () => {
    expect(oddsPath(0.5, 0)).toBe(0);
    expect(oddsPath(0.5, 1)).toBe(Infinity);
    expect(() => oddsPath(0, 0.5)).toThrow(RangeError);
    expect(() => oddsPath(1, 0.5)).toThrow(RangeError);
    expect(() => oddsPath(0.5, 1.2)).toThrow(RangeError);
  });
});

describe('evidenceLevel: Table 3 of Brnich et al. 2020, strict inequalities', () => {
  const rows: Array<[number, 'abnormal' | 'normal', string]> = [
    // Brnich et al. 2020 Table 3: > 350 very strong; exactly 350 is strong
    [350.0001, 'abnormal', 'PS3 very strong'],
    [350, 'abnormal', 'PS3 strong'],
    [1e6, 'abnormal', 'PS3 very strong'],
    // > 18.7 strong; exactly 18.7 is moderate
    [18.7001, 'abnormal', 'PS3 strong'],
    [18.7, 'abnormal', 'PS3 moderate'],
    // > 4.3 moderate; exactly 4.3 is supporting
    [4.3001, 'abnormal', 'PS3 moderate'],
    [4.3, 'abnormal', 'PS3 supporting'],
    // > 2.1 supporting; exactly 2.1 is none
    [2.1001, 'abnormal', 'PS3 supporting'],
    [2.1, 'abnormal', 'none'],
    [1, 'abnormal', 'none'],
    // < 0.48 supporting; exactly 0.48 is none
    [0.4799, 'normal', 'BS3 supporting'],
    [0.48, 'normal', 'none'],
    // < 0.23 moderate; exactly 0.23 is supporting
    [0.2299, 'normal', 'BS3 moderate'],
    [0.23, 'normal', 'BS3 supporting'],
    // < 0.053 strong; exactly 0.053 is moderate
    [0.0529, 'normal', 'BS3 strong'],
    [0.053, 'normal', 'BS3 moderate'],
    [0, 'normal', 'BS3 strong'],
    [1, 'normal', 'none'],
  ];
  it.each(rows)('OddsPath %s for an %s readout → %s', (value, direction, level) => {
    expect(evidenceLevel(value, direction)).toBe(level);
  });
  it('an abnormal readout never earns BS3 and a normal readout never earns PS3 (Brnich et al. 2020)', () => {
    expect(evidenceLevel(0.01, 'abnormal')).toBe('none');
    expect(evidenceLevel(1000, 'normal')).toBe('none');
    expect(evidenceLevel(Infinity, 'normal')).toBe('none');
    expect(evidenceLevel(Number.NaN, 'abnormal')).toBe('none');
  });
  it('limitLevel keeps the side and lowers the strength', () => {
    expect(limitLevel('PS3 very strong', 'moderate')).toBe('PS3 moderate');
    expect(limitLevel('BS3 strong', 'supporting')).toBe('BS3 supporting');
    expect(limitLevel('BS3 supporting', 'strong')).toBe('BS3 supporting');
    expect(limitLevel('none', 'supporting')).toBe('none');
  });
});

describe('calibrate: closed-form check values with perfect separation (formula of Brnich et al. 2020, [C])', () => {
  // computed from Brnich et al. 2020 inputs, P1 counting the added pair:
  // OddsPath(PS3) = nP·(nB + 1)/(nP + 1), OddsPath(BS3) = (nB + 1)/(nB·(nP + 1))
  const rows: Array<{ nP: number; nB: number; ps3: number; bs3: number; levelAbnormal: string; levelNormal: string }> = [
    // 5P+6B = 11 controls, above the ≤ 10 gate: 5.8333 → PS3 moderate, 0.1944 → BS3 moderate (formula of Brnich et al. 2020)
    { nP: 5, nB: 6, ps3: 5.8333, bs3: 0.1944, levelAbnormal: 'PS3 moderate', levelNormal: 'BS3 moderate' },
    // 3P+3B = 6 controls: 3.0 and 0.3333, both supporting; the gate applies but does not lower (formula of Brnich et al. 2020)
    { nP: 3, nB: 3, ps3: 3.0, bs3: 0.3333, levelAbnormal: 'PS3 supporting', levelNormal: 'BS3 supporting' },
    // 19P+19B: 19.0 → PS3 strong, 0.0526 → BS3 strong (formula of Brnich et al. 2020)
    { nP: 19, nB: 19, ps3: 19.0, bs3: 0.0526, levelAbnormal: 'PS3 strong', levelNormal: 'BS3 strong' },
  ];
  it.each(rows)('$nP P + $nB B → $ps3 / $bs3', ({ nP, nB, ps3, bs3, levelAbnormal, levelNormal }) => {
    const cal = calibrate('atpase', perfect(nP, nB));
    expect(cal.totalControls).toBe(nP + nB);
    expect(cal.oddsPathAbnormal).toBeCloseTo(ps3, 4);
    expect(cal.oddsPathNormal).toBeCloseTo(bs3, 4);
    expect(cal.p1).toBeCloseTo((nP + 1) / (nP + nB + 2), 12);
    expect(cal.levelAbnormal).toBe(levelAbnormal);
    expect(cal.levelNormal).toBe(levelNormal);
    expect(cal.notes.some((n) => n.includes('P1 includes this added pair'))).toBe(true);
  });
  it('the other pseudo-count reading agrees with perfect separation (both add the pair when a cell is zero)', () => {
    const cal = calibrate('atpase', perfect(5, 6), { pseudoCount: 'when-any-cell-zero' });
    expect(cal.oddsPathAbnormal).toBeCloseTo(5.8333, 4); // formula of Brnich et al. 2020
    expect(cal.oddsPathNormal).toBeCloseTo(0.1944, 4); // formula of Brnich et al. 2020
  });
});

describe('calibrate: the 2×2 table and the pseudo-count rule', () => {
  it('pools likely classes, leaves null readouts out and counts them', () => {
    const cal = calibrate('motility', table(4, 1, 2, 5, 3));
    expect(cal.counts).toEqual({ pathogenicAbnormal: 4, pathogenicNormal: 1, benignAbnormal: 2, benignNormal: 5, notCounted: 3 });
    expect(cal.totalControls).toBe(12);
    expect(cal.notes.some((n) => n.startsWith('3 controls had no normal or abnormal readout'))).toBe(true);
  });
  it('always adds the pair by default: 9/1/1/9 → OddsPath a(c+d+1)/((c+1)(a+b+1)) = 4.5', () => {
    // computed from Brnich et al. 2020 formula inputs with the added pair: a=9, b=1+1, c=1+1, d=9,
    // P1 = 11/22, P2 = 9/11 → (9/11)/(2/11) = 4.5; BS3: P2 = 2/11 → (2/11)/(9/11) = 0.2222
    const cal = calibrate('atpase', table(9, 1, 1, 9));
    expect(cal.oddsPathAbnormal).toBeCloseTo(4.5, 10);
    expect(cal.oddsPathNormal).toBeCloseTo(2 / 9, 10);
    expect(cal.levelAbnormal).toBe('PS3 moderate');
    expect(cal.levelNormal).toBe('BS3 moderate');
  });
  it("'when-any-cell-zero' leaves a table without zero cells as observed: 9/1/1/9 → 9", () => {
    // computed from Brnich et al. 2020 formula inputs: P1 = 0.5, P2 = 0.9 → 9; BS3: P2 = 0.1 → 1/9
    const cal = calibrate('atpase', table(9, 1, 1, 9), { pseudoCount: 'when-any-cell-zero' });
    expect(cal.oddsPathAbnormal).toBeCloseTo(9, 10);
    expect(cal.oddsPathNormal).toBeCloseTo(1 / 9, 10);
    expect(cal.notes.some((n) => n.includes('pseudo-count'))).toBe(false);
  });
  it('the default rule is monotone: a perfect assay never scores below one with a misclassified control', () => {
    // follows from the formula; 'when-any-cell-zero' breaks this (5.0 for 10/0/1/9 against 9 for 9/1/1/9)
    const better = calibrate('x', table(10, 0, 1, 9)).oddsPathAbnormal!;
    const worse = calibrate('x', table(9, 1, 1, 9)).oddsPathAbnormal!;
    expect(better).toBeGreaterThan(worse);
    const whenZero = calibrate('x', table(10, 0, 1, 9), { pseudoCount: 'when-any-cell-zero' }).oddsPathAbnormal!;
    const whenZeroWorse = calibrate('x', table(9, 1, 1, 9), { pseudoCount: 'when-any-cell-zero' }).oddsPathAbnormal!;
    expect(whenZero).toBeLessThan(whenZeroWorse);
  });
  it('no benign control reading normal: OddsPath for a normal readout is not finite → null, none, with a note', () => {
    // 6/0/6/0: every control reads abnormal; with the pair, the normal set is one pathogenic only → P2 = 1
    const cal = calibrate('x', table(6, 0, 6, 0));
    expect(cal.oddsPathNormal).toBeNull();
    expect(cal.levelNormal).toBe('none');
    // abnormal: P1 = 7/14, P2 = 6/13 → (6/13)/(7/13) = 0.857 → none (computed from the formula)
    expect(cal.oddsPathAbnormal).toBeCloseTo(6 / 7, 10);
    expect(cal.levelAbnormal).toBe('none');
    expect(cal.notes.some((n) => n.startsWith('No benign control read normal'))).toBe(true);
    expect(cal.notes.some((n) => n.includes('not above 2.1'))).toBe(true);
    expect(JSON.parse(JSON.stringify(cal))).toEqual(cal);
  });
  it('zero pathogenic or zero benign controls counted: no OddsPath, level none, with a note', () => {
    for (const cal of [calibrate('x', table(0, 0, 4, 8)), calibrate('x', table(5, 2, 0, 0)), calibrate('x', [])]) {
      expect(cal.oddsPathAbnormal).toBeNull();
      expect(cal.oddsPathNormal).toBeNull();
      expect(cal.p1).toBeNull();
      expect(cal.levelAbnormal).toBe('none');
      expect(cal.levelNormal).toBe('none');
      expect(cal.notes.some((n) => n.startsWith('No OddsPath'))).toBe(true);
    }
    // pathogenic controls exist but all are indeterminate: still no pathogenic control counted
    const cal = calibrate('x', [...table(0, 0, 6, 6), { id: 'p', knownClass: 'pathogenic', readout: null }]);
    expect(cal.oddsPathAbnormal).toBeNull();
    expect(cal.counts.notCounted).toBe(1);
  });
});

describe('calibrate: count gate and lab cap', () => {
  it(`gate: with ≤ ${CALIBRATION.maxControlsForSupportingOnly} controls at most supporting (Brnich et al. 2020 abstract)`, () => {
    // 5P+5B = 10: PS3 = 5·6/6 = 5.0 (moderate by arithmetic), BS3 = 6/(5·6) = 0.2 (moderate) — computed with the closed form of Brnich et al. 2020
    const cal = calibrate('atpase', perfect(5, 5));
    expect(cal.oddsPathAbnormal).toBeCloseTo(5.0, 10);
    expect(cal.oddsPathNormal).toBeCloseTo(0.2, 10);
    expect(cal.levelAbnormal).toBe('PS3 supporting');
    expect(cal.levelNormal).toBe('BS3 supporting');
    const note = cal.notes.find((n) => n.startsWith('Only 10 controls with a readout'));
    expect(note).toBeDefined();
    expect(note).toContain('at most supporting evidence (Brnich et al. 2020 recommend at least 11)');
    expect(note).toContain('PS3 moderate lowered to PS3 supporting');
  });
  it('gate counts only controls with a readout: 5P+6B with one indeterminate pathogenic is 11, not 12', () => {
    const cal = calibrate('atpase', [...perfect(5, 6), { id: 'x', knownClass: 'pathogenic', readout: null }]);
    expect(cal.totalControls).toBe(11);
    expect(cal.levelAbnormal).toBe('PS3 moderate');
    // 4P+6B+1 indeterminate: 10 counted → gated; PS3 = 4·7/5 = 5.6 (closed form of Brnich et al. 2020) → supporting
    const gated = calibrate('atpase', [...perfect(4, 6), { id: 'x', knownClass: 'pathogenic', readout: null }]);
    expect(gated.totalControls).toBe(10);
    expect(gated.oddsPathAbnormal).toBeCloseTo(5.6, 10);
    expect(gated.levelAbnormal).toBe('PS3 supporting');
  });
  it('gate at 3P+3B: note present, levels already supporting', () => {
    const cal = calibrate('atpase', perfect(3, 3));
    const note = cal.notes.find((n) => n.startsWith('Only 6 controls'));
    expect(note).toBe('Only 6 controls with a readout: at most supporting evidence (Brnich et al. 2020 recommend at least 11).');
  });
  it('lab cap lowers strong to the cap and is noted; a cap above the level changes nothing', () => {
    const capped = calibrate('force', perfect(19, 19), { cap: 'moderate' });
    expect(capped.levelAbnormal).toBe('PS3 moderate');
    expect(capped.levelNormal).toBe('BS3 moderate');
    expect(capped.oddsPathAbnormal).toBeCloseTo(19.0, 4); // Brnich et al. 2020: the OddsPath itself is not capped
    expect(capped.notes.some((n) => n.includes('caps functional evidence for this gene at moderate'))).toBe(true);
    const loose = calibrate('force', perfect(19, 19), { cap: 'very strong' });
    expect(loose.levelAbnormal).toBe('PS3 strong');
    expect(loose.notes.some((n) => n.includes('no level was above the cap'))).toBe(true);
    const none = calibrate('force', perfect(19, 19));
    expect(none.notes.some((n) => n.includes('caps'))).toBe(false);
  });
  it('gate and cap together: the stricter wins', () => {
    const cal = calibrate('force', perfect(5, 5), { cap: 'moderate' });
    expect(cal.levelAbnormal).toBe('PS3 supporting');
  });
});

describe('evidenceForReadout', () => {
  const cal = calibrate('atpase', perfect(5, 6));
  it('abnormal readout: the PS3 ceiling with counts, never a classification', () => {
    const ev = evidenceForReadout(cal, 'abnormal');
    expect(ev.level).toBe('PS3 moderate');
    expect(ev.sentence).toContain('at most PS3 moderate');
    expect(ev.sentence).toContain('OddsPath 5.83'); // formula of Brnich et al. 2020: 5.8333 to 3 significant digits
    expect(ev.sentence).toContain('5 of 5 pathogenic controls and 0 of 6 benign controls read abnormal');
    expect(ev.sentence).toContain('maximum strength the calibration supports for this readout');
    expect(ev.sentence).toContain('never classifies');
    expect(ev.sentence).not.toMatch(/\b(is|likely) (pathogenic|benign)\b/);
  });
  it('normal readout: the BS3 ceiling with counts', () => {
    const ev = evidenceForReadout(cal, 'normal');
    expect(ev.level).toBe('BS3 moderate');
    expect(ev.sentence).toContain('OddsPath 0.194'); // formula of Brnich et al. 2020: 0.1944
    expect(ev.sentence).toContain('6 of 6 benign controls and 0 of 5 pathogenic controls read normal');
  });
  it('null readout: none, with the reason', () => {
    const ev = evidenceForReadout(cal, null);
    expect(ev.level).toBe('none');
    expect(ev.sentence).toContain('indeterminate, mixed or not measured');
    expect(ev.sentence).toContain('never classifies');
  });
  it('names the gate when it lowered the level', () => {
    const ev = evidenceForReadout(calibrate('atpase', perfect(5, 5)), 'abnormal');
    expect(ev.level).toBe('PS3 supporting');
    expect(ev.sentence).toContain('would give PS3 moderate');
    expect(ev.sentence).toContain('small number of controls (10');
  });
  it('names the lab cap when it lowered the level', () => {
    const ev = evidenceForReadout(calibrate('atpase', perfect(19, 19), { cap: 'supporting' }), 'normal');
    expect(ev.level).toBe('BS3 supporting');
    expect(ev.sentence).toContain("lab's cap");
  });
  it('too few controls: none, with the reason', () => {
    const ev = evidenceForReadout(calibrate('overall', table(4, 0, 0, 0)), 'abnormal');
    expect(ev.level).toBe('none');
    expect(ev.sentence).toContain('No OddsPath');
    expect(ev.sentence).toContain('across assays');
    expect(ev.sentence).toContain('maximum strength');
  });
  it('OddsPath below the threshold: none, with the number', () => {
    const ev = evidenceForReadout(calibrate('x', table(6, 0, 6, 0)), 'abnormal');
    expect(ev.level).toBe('none');
    expect(ev.sentence).toContain('OddsPath 0.857');
    expect(ev.sentence).toContain('does not reach PS3 supporting');
  });
});

describe('evidenceLevelOfRatio: exact comparison on counts', () => {
  const rows: Array<[number, number, 'abnormal' | 'normal', string]> = [
    // Brnich et al. 2020 Table 3 boundaries as exact ratios: equal to the threshold is the lower level
    [350, 1, 'abnormal', 'PS3 strong'],
    [3501, 10, 'abnormal', 'PS3 very strong'],
    [187, 10, 'abnormal', 'PS3 moderate'],
    [43, 10, 'abnormal', 'PS3 supporting'],
    [21, 10, 'abnormal', 'none'],
    [48, 100, 'normal', 'none'],
    [23, 100, 'normal', 'BS3 supporting'],
    [53, 1000, 'normal', 'BS3 moderate'],
    [52, 1000, 'normal', 'BS3 strong'],
    [1, 0, 'abnormal', 'PS3 very strong'],
    [1, 0, 'normal', 'none'],
    [0, 0, 'abnormal', 'none'],
  ];
  it.each(rows)('%s/%s for %s → %s', (num, den, dir, level) => {
    expect(evidenceLevelOfRatio(num, den, dir)).toBe(level);
  });
  it('agrees with evidenceLevel away from the boundaries', () => {
    for (let num = 0; num <= 60; num++) {
      for (let den = 1; den <= 40; den++) {
        const value = num / den;
        const boundary = [350, 18.7, 4.3, 2.1, 0.48, 0.23, 0.053].some((t) => Math.abs(value - t) < 1e-9);
        if (boundary) continue;
        expect(evidenceLevelOfRatio(num, den, 'abnormal')).toBe(evidenceLevel(value, 'abnormal'));
        expect(evidenceLevelOfRatio(num, den, 'normal')).toBe(evidenceLevel(value, 'normal'));
      }
    }
  });
  it('calibrate agrees with the oddsPath formula on its own P1 and P2', () => {
    const cal = calibrate('x', table(7, 2, 3, 8));
    expect(cal.oddsPathAbnormal).toBeCloseTo(oddsPath(cal.p1!, cal.p2Abnormal!), 12);
    expect(cal.oddsPathNormal).toBeCloseTo(oddsPath(cal.p1!, cal.p2Normal!), 12);
  });
});

describe('calibrate: the default pseudo-count is cautious and monotone (follows from the formula; exhaustive over small tables)', () => {
  it('PS3 OddsPath never above the raw counts, BS3 never below; moving a control to the right readout never lowers evidence', () => {
    const op = (pa: number, pn: number, ba: number, bn: number) => calibrate('x', table(pa, pn, ba, bn));
    for (let pa = 0; pa <= 5; pa++)
      for (let pn = 0; pn <= 5; pn++)
        for (let ba = 0; ba <= 5; ba++)
          for (let bn = 0; bn <= 5; bn++) {
            if (pa + pn === 0 || ba + bn === 0) continue;
            const cal = op(pa, pn, ba, bn);
            if (ba > 0) expect(cal.oddsPathAbnormal!).toBeLessThanOrEqual((pa * (ba + bn)) / (ba * (pa + pn)) + 1e-12);
            if (bn > 0 && pn > 0 && cal.oddsPathNormal !== null)
              expect(cal.oddsPathNormal).toBeGreaterThanOrEqual((pn * (ba + bn)) / (bn * (pa + pn)) - 1e-12);
            if (pn > 0) {
              const better = op(pa + 1, pn - 1, ba, bn);
              expect(better.oddsPathAbnormal!).toBeGreaterThan(cal.oddsPathAbnormal!);
            }
            if (ba > 0) {
              const better = op(pa, pn, ba - 1, bn + 1);
              expect(better.oddsPathNormal!).toBeLessThan(cal.oddsPathNormal ?? Infinity);
            }
          }
  });
});
