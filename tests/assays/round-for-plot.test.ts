/**
 * roundForPlot must give exactly Number(v.toPrecision(12)) (the definition of the plot
 * rounding; ECMAScript Number.prototype.toPrecision), on random values of every magnitude,
 * on values built to sit on or next to a 12-digit rounding tie, and on edge cases.
 * Common practice, no source: equality with the reference definition.
 */
import { describe, expect, it } from 'vitest';
import { roundForPlot } from '../../src/assays/assay-common.js';
import { createRandom } from '../../src/stats/random.js';

const reference = (v: number) => (Number.isFinite(v) ? Number(v.toPrecision(12)) : v);

function mismatches(values: number[]): number[] {
  return values.filter((v) => roundForPlot(v) !== reference(v));
}

describe('roundForPlot equals Number(v.toPrecision(12))', () => {
  it('random values from 1e-40 to 1e40, both signs', () => {
    const random = createRandom(17);
    const values = Array.from({ length: 200000 }, () => (random.uniform() - 0.5) * 2 * 10 ** (Math.floor(random.uniform() * 80) - 40));
    expect(mismatches(values)).toEqual([]);
  });

  it('values on and next to 12-digit rounding ties', () => {
    const random = createRandom(18);
    const values: number[] = [];
    for (let i = 0; i < 50000; i++) {
      const e = Math.floor(random.uniform() * 60) - 30;
      const digits = Math.floor(random.uniform() * 9e12) + 1e12; // 13 digits, last one 5 below
      const tie = (Math.floor(digits / 10) * 10 + 5) * 10 ** (e - 12);
      values.push(tie, -tie, tie * (1 + 2 ** -52), tie * (1 - 2 ** -53));
    }
    expect(mismatches(values)).toEqual([]);
  });

  it('edge cases', () => {
    const values = [1e-320, 5e-324, 1.7976931348623157e308, 1, 10, 0.1, 0.3, 0.1 + 0.2, 999999999999.5, 99999999999.95, 9.999999999995, 1e22, 1e23, 1e-11, 1e-12, 123456789012345];
    expect(mismatches(values)).toEqual([]);
    expect(roundForPlot(0.1 + 0.2)).toBe(0.3);
    expect(roundForPlot(NaN)).toBeNaN();
    expect(roundForPlot(Infinity)).toBe(Infinity);
    expect(Object.is(roundForPlot(-0), 0)).toBe(true);
  });
});
