/**
 * Statistics against published values. Sources per check: Benjamini &
 * Hochberg 1995 (their example), R values quoted by simple-statistics' docs for var(1:10). Welch's test
 * on R's sleep data is checked where it is used: the comparison model with one batch
 * (tests/analysis/paired-effect.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { mean, median, quantile, sd, se, variance } from '../../src/stats/descriptive.js';
import { benjaminiHochberg } from '../../src/stats/bh.js';
import tQuantileLib from '@stdlib/stats-base-dists-t-quantile';
import { tQuantile } from '../../src/stats/distributions.js';
import { fTestPSanity } from './helpers.js';

const relative = (got: number, want: number) => Math.abs(got - want) / Math.abs(want);
const oneToTen = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];

describe('descriptive', () => {
  it.each([
    ['mean(1:10)', () => mean(oneToTen), 5.5, 'by hand'],
    ['var(1:10)', () => variance(oneToTen), 9.166667, 'R var(1:10), as simple-statistics quotes it'],
    ['sd(1:10)', () => sd(oneToTen), 3.0276504, 'SciPy/NumPy std(ddof = 1)'],
    ['se(1:10)', () => se(oneToTen), 3.0276504 / Math.sqrt(10), 'sd/√n'],
    ['quantile(1:10, 0.25), type 7', () => quantile(oneToTen, 0.25), 3.25, 'NumPy quantile (linear = type 7)'],
    ['median([3, 1, 4, 1])', () => median([3, 1, 4, 1]), 2, 'by hand'],
  ])('%s', (_label, compute, want) => {
    expect(relative(compute(), want)).toBeLessThan(1e-6);
  });
  it('undefined cases give NaN', () => {
    expect(mean([])).toBeNaN();
    expect(sd([1])).toBeNaN();
    expect(quantile([1, 2], 1.5)).toBeNaN();
  });
});


describe('Benjamini–Hochberg (their 1995 example [V], as R p.adjust BH)', () => {
  const p = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0];
  const want = [0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.06385714, 0.06385714, 0.0645, 0.0765, 0.486, 0.58118182, 0.714875, 0.75323077, 0.81321429, 1];
  it('adjusted values for the 15 p values', () => {
    const got = benjaminiHochberg(p);
    expect(got).toHaveLength(want.length);
    want.forEach((w, i) => expect(got[i]).toBeCloseTo(w, 7));
  });
  it('4 rejections at q = 0.05', () => {
    expect(benjaminiHochberg(p).filter((q) => q! < 0.05)).toHaveLength(4);
  });
  it('order of input does not matter, and missing values are skipped (not counted in m)', () => {
    const shuffled = [p[14], null, p[3], Number.NaN, p[0], ...p.slice(4, 14), p[1], p[2], undefined];
    const q = benjaminiHochberg(shuffled);
    expect(q[1]).toBeNull();
    expect(q[3]).toBeNull();
    expect(q[q.length - 1]).toBeNull();
    expect(q[0]).toBeCloseTo(1, 10);
    expect(q[2]).toBeCloseTo(0.035625, 7);
    expect(q[4]).toBeCloseTo(0.0015, 7);
  });
});

describe('distribution wrappers', () => {
  it('F upper tail keeps precision in the far tail', () => fTestPSanity());

  it('tQuantile (memoised) gives the library value every time, for each probability and df, also once its memo is emptied', () => {
    // Reference: the library itself (@stdlib/stats-base-dists-t-quantile), called directly.
    const pairs: Array<[number, number]> = [];
    for (const p of [0.975, 0.95, 0.995, 0.5]) for (const df of [1, 2, 3.5, 10, 44, 1000, 0, NaN]) pairs.push([p, df]);
    for (let round = 0; round < 2; round++) for (const [p, df] of pairs) expect(Object.is(tQuantile(p, df), tQuantileLib(p, df))).toBe(true);
    // More distinct pairs than the memo keeps, then the first ones again.
    for (let df = 1; df <= 10_050; df++) tQuantile(0.9, df);
    for (const [p, df] of pairs) expect(Object.is(tQuantile(p, df), tQuantileLib(p, df))).toBe(true);
    expect(tQuantile(0.9, 10_050)).toBe(tQuantileLib(0.9, 10_050));
  });
});
