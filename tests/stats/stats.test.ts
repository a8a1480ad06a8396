/**
 * Statistics against published values. Sources per check: REFERENCES.md §3 (Welch on
 * R datasets::sleep; Benjamini & Hochberg 1995 example; Fieller examples from the DCSTATS
 * README), SciPy 1.17 where named (computed from the same inputs), R values quoted by
 * simple-statistics' docs for var(1:10).
 */
import { describe, expect, it } from 'vitest';
import { mean, median, quantile, sd, se, variance } from '../../src/stats/descriptive.js';
import { studentTTest, welchTTest } from '../../src/stats/ttest.js';
import { benjaminiHochberg } from '../../src/stats/bh.js';
import { fiellerInterval } from '../../src/stats/fieller.js';
import { logRatioInterval } from '../../src/stats/logratio.js';
import tQuantileLib from '@stdlib/stats-base-dists-t-quantile';
import { tQuantile } from '../../src/stats/distributions.js';
import { fTestPSanity } from './helpers.js';

const relative = (got: number, want: number) => Math.abs(got - want) / Math.abs(want);
const oneToTen = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];

describe('descriptive', () => {
  it.each([
    ['mean(1:10)', () => mean(oneToTen), 5.5, 'by hand'],
    ['var(1:10)', () => variance(oneToTen), 9.166667, 'R var(1:10), quoted in STYLE.md (simple-statistics)'],
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

const sleep1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
const sleep2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];

describe('t tests on R datasets::sleep', () => {
  it('Welch: t −1.860813, df 17.776474, p 0.079394, CI −3.3654832 to 0.2054832 (REFERENCES.md §3 [V]/[C])', () => {
    const r = welchTTest(sleep1, sleep2);
    expect(r.t).toBeCloseTo(-1.860813, 6);
    expect(r.df).toBeCloseTo(17.776474, 6);
    expect(r.p).toBeCloseTo(0.079394, 6);
    expect(r.ciLow).toBeCloseTo(-3.3654832, 6);
    expect(r.ciHigh).toBeCloseTo(0.2054832, 6);
    expect(r.difference).toBeCloseTo(-1.58, 12);
  });
  it('Student: t −1.8608135, df 18, p 0.0791867, CI −3.3638740 to 0.2038740 (SciPy ttest_ind equal_var = True)', () => {
    const r = studentTTest(sleep1, sleep2);
    expect(r.t).toBeCloseTo(-1.8608135, 6);
    expect(r.df).toBe(18);
    expect(r.p).toBeCloseTo(0.0791867, 6);
    expect(r.ciLow).toBeCloseTo(-3.363874, 6);
    expect(r.ciHigh).toBeCloseTo(0.203874, 6);
  });
});

describe('Benjamini–Hochberg (REFERENCES.md §3 [V], as R p.adjust BH)', () => {
  const p = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0];
  const want = [0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.06385714, 0.06385714, 0.0645, 0.0765, 0.486, 0.58118182, 0.714875, 0.75323077, 0.81321429, 1];
  it('adjusted values for the 15 p values', () => {
    benjaminiHochberg(p).forEach((q, i) => expect(q!).toBeCloseTo(want[i], 7));
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

describe("Fieller's interval (REFERENCES.md §3)", () => {
  it('worked example [V]: a 14, b 7, SEa 3, SEb 2, df 10, 90% → g 0.268164, 1.051413 to 4.414296', () => {
    const r = fiellerInterval({ numerator: 14, seNumerator: 3, denominator: 7, seDenominator: 2, df: 10, level: 0.9 });
    expect(r.bounded).toBe(true);
    // The source rounds t to 1.812461, so agreement is to ~6 significant digits.
    expect(relative(r.g, 0.268164)).toBeLessThan(5e-6);
    expect(relative(r.low, 1.051413)).toBeLessThan(2e-6);
    expect(relative(r.high, 4.414296)).toBeLessThan(2e-6);
  });
  it.each([
    [0.9, 1.54, 2.64],
    [0.95, 1.46, 2.83],
    [0.99, 1.27, 3.36],
  ])('second example [V, C]: means 14 (SD 3) and 7 (SD 2), n 6 each, df 10, %d → %d to %d', (level, low, high) => {
    const r = fiellerInterval({ numerator: 14, seNumerator: 3 / Math.sqrt(6), denominator: 7, seDenominator: 2 / Math.sqrt(6), df: 10, level });
    expect(r.low).toBeCloseTo(low, 2);
    expect(r.high).toBeCloseTo(high, 2);
  });
  it('g ≥ 1: no bounded interval', () => {
    // g = 1.959964²·4/1 > 1: denominator 1 with SE 2 (constructed).
    const r = fiellerInterval({ numerator: 14, seNumerator: 3, denominator: 1, seDenominator: 2, df: Infinity, level: 0.95 });
    expect(r.bounded).toBe(false);
    expect(r.low).toBe(-Infinity);
    expect(r.high).toBe(Infinity);
  });
});

describe('log-ratio interval (delta method)', () => {
  it('a 14, b 7, SEa 3, SEb 2, normal 95% → 0.9931834 to 4.0274536 (SciPy norm.ppf, computed from REFERENCES.md §3 Fieller inputs)', () => {
    const r = logRatioInterval({ numerator: 14, seNumerator: 3, denominator: 7, seDenominator: 2, df: Infinity, level: 0.95 });
    expect(r.seLog).toBeCloseTo(0.3571429, 7);
    expect(r.low).toBeCloseTo(0.9931834, 6);
    expect(r.high).toBeCloseTo(4.0274536, 6);
  });
  it('non-positive inputs give NaN limits', () => {
    expect(logRatioInterval({ numerator: -1, seNumerator: 1, denominator: 2, seDenominator: 1, df: 5, level: 0.95 }).low).toBeNaN();
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
