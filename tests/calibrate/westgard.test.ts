import { describe, expect, it } from 'vitest';
import { controlChart, establishedFromValues, westgard, type ControlValue } from '../../src/calibrate/westgard.js';

/** With mean 0 and SD 1 the values are their own z scores (the check vectors are written this way). */
const UNIT = { mean: 0, sd: 1 };

/** One value per batch b0, b1, … in run order. */
function series(values: number[]): ControlValue[] {
  return values.map((value, i) => ({ batch: `b${i}`, value }));
}

function rulesAt(values: number[]): string[][] {
  return westgard(series(values), UNIT).points.map((p) => p.rules);
}

describe('westgard: check vectors constructed from the rules of Westgard et al. 1981 [C]', () => {
  it('[1.2, 1.5, 1.1, 1.3] → 4-1s (Westgard et al. 1981 rules)', () => {
    const r = westgard(series([1.2, 1.5, 1.1, 1.3]), UNIT);
    expect(r.points[3]!.rules).toEqual(['4-1s']);
    expect(r.points.slice(0, 3).every((p) => p.rules.length === 0)).toBe(true);
    expect(r.rejectedBatches).toEqual(['b3']);
  });
  it('[1.2, 1.5, 0.9, 1.3] → not 4-1s (Westgard et al. 1981 rules)', () => {
    const r = westgard(series([1.2, 1.5, 0.9, 1.3]), UNIT);
    expect(r.points.flatMap((p) => p.rules)).toEqual([]);
    expect(r.rejectedBatches).toEqual([]);
  });
  it('ten values in (0, 1) → 10-x; nine → not (Westgard et al. 1981 rules)', () => {
    const ten = [0.1, 0.5, 0.9, 0.3, 0.7, 0.2, 0.8, 0.4, 0.6, 0.05];
    const r = westgard(series(ten), UNIT);
    expect(r.points[9]!.rules).toEqual(['10-x']);
    expect(r.points.slice(0, 9).every((p) => p.rules.length === 0)).toBe(true);
    expect(r.rejectedBatches).toEqual(['b9']);
    expect(westgard(series(ten.slice(0, 9)), UNIT).rejectedBatches).toEqual([]);
  });
  it('a run with +2.1 and −2.2 → R-4s; the same pair in two runs → not R-4s (Westgard et al. 1981 rules)', () => {
    const oneRun = westgard(
      [
        { batch: 'B1', value: 2.1 },
        { batch: 'B1', value: -2.2 },
      ],
      UNIT,
    );
    expect(oneRun.points.map((p) => p.rules)).toEqual([
      ['1-2s', 'R-4s'],
      ['1-2s', 'R-4s'],
    ]);
    expect(oneRun.rejectedBatches).toEqual(['B1']);
    const twoRuns = westgard(
      [
        { batch: 'B1', value: 2.1 },
        { batch: 'B2', value: -2.2 },
      ],
      UNIT,
    );
    expect(twoRuns.points.map((p) => p.rules)).toEqual([['1-2s'], ['1-2s']]);
    expect(twoRuns.rejectedBatches).toEqual([]);
    expect(twoRuns.warningBatches).toEqual(['B1', 'B2']);
  });
});

describe('westgard: each rule triggered and not triggered (common practice, constructed z values)', () => {
  it('1-2s is a warning only; exactly 2 SD is not beyond the limit', () => {
    const r = westgard(series([0.3, 2.5, -0.4]), UNIT);
    expect(r.points[1]!.rules).toEqual(['1-2s']);
    expect(r.rejectedBatches).toEqual([]);
    expect(r.warningBatches).toEqual(['b1']);
    expect(rulesAt([0.3, 1.9, -2, 2])).toEqual([[], [], [], []]);
  });
  it('1-3s: one value beyond ±3 SD rejects; 2.9 does not', () => {
    const r = westgard(series([0.2, -3.1]), UNIT);
    expect(r.points[1]!.rules).toEqual(['1-2s', '1-3s']);
    expect(r.rejectedBatches).toEqual(['b1']);
    expect(r.warningBatches).toEqual([]);
    expect(rulesAt([0.2, 2.9])[1]).toEqual(['1-2s']);
    expect(rulesAt([0.2, 3])[1]).toEqual(['1-2s']);
  });
  it('2-2s: two consecutive beyond the same limit; not on opposite sides, not with a value between', () => {
    expect(rulesAt([2.1, 2.3])).toEqual([['1-2s'], ['1-2s', '2-2s']]);
    expect(rulesAt([-2.4, -2.05])[1]).toEqual(['1-2s', '2-2s']);
    expect(rulesAt([2.1, -2.3])).toEqual([['1-2s'], ['1-2s']]);
    expect(rulesAt([2.1, 1.0, 2.3])).toEqual([['1-2s'], [], ['1-2s']]);
    // across two batches the two values are still consecutive: the second batch is rejected
    const r = westgard(series([2.1, 2.3]), UNIT);
    expect(r.rejectedBatches).toEqual(['b1']);
    expect(r.warningBatches).toEqual(['b0']);
  });
  it('R-4s: several WT units in one batch are one run; an explicit run splits a batch', () => {
    const units: ControlValue[] = [
      { batch: 'B1', value: 0.1 },
      { batch: 'B2', value: 2.5 },
      { batch: 'B2', value: 0.4 },
      { batch: 'B2', value: -2.6 },
      { batch: 'B3', value: 0.2 },
    ];
    const r = westgard(units, UNIT);
    expect(r.points.map((p) => p.rules)).toEqual([[], ['1-2s', 'R-4s'], [], ['1-2s', 'R-4s'], []]);
    expect(r.rejectedBatches).toEqual(['B2']);
    const split = westgard(
      units.map((u, i) => ({ ...u, run: i === 3 ? 'B2-second' : u.batch })),
      UNIT,
    );
    expect(split.points.flatMap((p) => p.rules)).toEqual(['1-2s', '1-2s']);
    // one value above +2 SD and one just inside −2 SD in the same run: not R-4s
    expect(
      westgard(
        [
          { batch: 'B1', value: 2.5 },
          { batch: 'B1', value: -1.9 },
        ],
        UNIT,
      ).rejectedBatches,
    ).toEqual([]);
  });
  it('4-1s: four consecutive below −1 SD; four beyond ±1 SD on mixed sides do not', () => {
    expect(rulesAt([-1.2, -1.5, -1.1, -1.3])[3]).toEqual(['4-1s']);
    expect(rulesAt([1.2, 1.5, -1.1, 1.3]).flat()).toEqual([]);
    // a fifth value keeps the rule on
    expect(rulesAt([1.2, 1.5, 1.1, 1.3, 1.4]).map((r) => r.includes('4-1s'))).toEqual([false, false, false, true, true]);
  });
  it('10-x: ten below the mean; a value exactly at the mean breaks the series', () => {
    const below = Array.from({ length: 10 }, (_, i) => -0.1 - i * 0.05);
    expect(rulesAt(below)[9]).toContain('10-x');
    const broken = [...below.slice(0, 5), 0, ...below.slice(5)];
    expect(rulesAt(broken).flat()).not.toContain('10-x');
    const mixed = [0.1, 0.2, 0.3, 0.4, 0.5, -0.1, 0.6, 0.7, 0.8, 0.9];
    expect(rulesAt(mixed).flat()).toEqual([]);
  });
  it('z uses the established mean and SD', () => {
    // computed: z = (x − 5)/0.5
    const r = westgard(
      [
        { batch: 'A', value: 5.5 },
        { batch: 'B', value: 3.4 },
        { batch: 'C', value: 6.2 },
      ],
      { mean: 5, sd: 0.5 },
    );
    expect(r.points.map((p) => p.z)).toEqual([1, expect.closeTo(-3.2, 12), expect.closeTo(2.4, 12)]);
    expect(r.points[1]!.rules).toEqual(['1-2s', '1-3s']);
    expect(r.rejectedBatches).toEqual(['B']);
    expect(r.warningBatches).toEqual(['C']);
  });
  it('a batch both warned and rejected is listed as rejected only', () => {
    const r = westgard(
      [
        { batch: 'A', value: 2.2 },
        { batch: 'A', value: 3.5 },
      ],
      UNIT,
    );
    expect(r.rejectedBatches).toEqual(['A']);
    expect(r.warningBatches).toEqual([]);
  });
  it('rejects an SD that is not positive and values that are not finite', () => {
    expect(() => westgard(series([1]), { mean: 0, sd: 0 })).toThrow(RangeError);
    expect(() => westgard(series([Number.NaN]), UNIT)).toThrow(RangeError);
  });
});

describe('establishedFromValues', () => {
  it('mean and sample SD of 1..10 (closed form: sample variance of 1..n is n(n+1)/12 = 9.1667)', () => {
    const e = establishedFromValues([1, 2, 3, 4, 5, 6, 7, 8, 9, 10])!;
    expect(e.mean).toBeCloseTo(5.5, 14);
    expect(e.sd).toBeCloseTo(Math.sqrt(110 / 12), 12);
  });
  it('stays accurate with a large offset (same closed form, values 1e9 + 1..10)', () => {
    const e = establishedFromValues(Array.from({ length: 10 }, (_, i) => 1e9 + i + 1))!;
    expect(e.mean).toBe(1e9 + 5.5);
    expect(Math.abs(e.sd / Math.sqrt(110 / 12) - 1)).toBeLessThan(1e-12);
  });
  it('null with fewer than two values or no spread', () => {
    expect(establishedFromValues([])).toBeNull();
    expect(establishedFromValues([4.2])).toBeNull();
    expect(establishedFromValues([3, 3, 3])).toBeNull();
    expect(() => establishedFromValues([1, Number.POSITIVE_INFINITY])).toThrow(RangeError);
  });
});

describe('controlChart', () => {
  const values: ControlValue[] = [
    { batch: 'B1', value: 5.0 },
    { batch: 'B1', value: 5.2 },
    { batch: 'B2', value: 4.8 },
    { batch: 'B3', value: 5.1 },
    { batch: 'B4', value: 9.0 },
  ];
  it('without a baseline: mean and sample SD of all WT values, said in words', () => {
    const chart = controlChart('atpase', 'kcat', values);
    const e = establishedFromValues(values.map((v) => v.value))!;
    expect(chart.mean).toBe(e.mean);
    expect(chart.sd).toBe(e.sd);
    expect(chart.baseline).toContain('sample SD');
    expect(chart.baseline).toContain('all 5 WT values');
    expect(chart.baseline).toContain('no lab-declared baseline');
    expect(chart.points).toHaveLength(5);
    expect(chart.assay).toBe('atpase');
    expect(chart.metric).toBe('kcat');
  });
  it('with a lab-declared baseline the values are judged against it', () => {
    const chart = controlChart('atpase', 'kcat', values, { mean: 5, sd: 0.2, source: 'WT preparations 2023–2024' });
    expect(chart.mean).toBe(5);
    expect(chart.sd).toBe(0.2);
    expect(chart.baseline).toContain('declared by the lab, from: WT preparations 2023–2024. The values');
    // z of 9.0 is (9 − 5)/0.2 = 20 → 1-3s; computed from the inputs
    expect(chart.points[4]!.rules).toContain('1-3s');
    expect(chart.rejectedBatches).toEqual(['B4']);
  });
  it('too few values: no mean, no SD, no points, and the reason', () => {
    const chart = controlChart('force', 'pCa50', [{ batch: 'B1', value: 5.8 }]);
    expect(chart.mean).toBeNull();
    expect(chart.sd).toBeNull();
    expect(chart.points).toEqual([]);
    expect(chart.baseline).toContain('Too few WT values (1)');
  });
  it('sample SD of two values (computed: |7 − 5|/√2 = 1.41421)', () => {
    expect(controlChart('a', 'm', [{ batch: 'B1', value: 5 }, { batch: 'B2', value: 7 }]).sd).toBeCloseTo(Math.SQRT2, 12);
  });
});
