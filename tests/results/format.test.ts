/**
 * The one number formatter (src/results/format.ts). Check values are worked by hand from the
 * rules; sources beside them:
 * - significant figures and rounding: JavaScript's Number.prototype.toPrecision / toFixed
 *   (ECMA-262, the general-purpose reference implementation the formatter builds on);
 * - the minus sign is U+2212 MINUS SIGN (The Unicode Standard, Mathematical Operators block);
 * - writing a range as 'a to b' when an end may be negative, because a dash reads as a minus:
 *   ISO 80000-1 advice on ranges, from memory;
 * - an interval reported at the precision of its estimate: common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { MINUS, NONE, decimalsFor, effectDecimals, fixed, fmt, fmtBand, fmtCi, fmtEffect, fmtEffectCi, fmtP, fmtRange, fmtValue, signed } from '../../src/results/format.js';

describe('fmt: significant figures', () => {
  it('keeps trailing zeros and uses the minus sign', () => {
    expect(fmt(1.1)).toBe('1.10');
    expect(fmt(1.23456)).toBe('1.23');
    expect(fmt(-0.0391)).toBe(`${MINUS}0.0391`);
    expect(fmt(0.05, 2)).toBe('0.050');
    expect(fmt(0)).toBe('0');
    expect(fmt(-0)).toBe('0');
  });
  it('rounds large whole numbers instead of writing an exponent, and writes tiny or huge values in scientific form', () => {
    expect(fmt(1234)).toBe('1230');
    expect(fmt(999.6)).toBe('1000');
    expect(fmt(24)).toBe('24.0');
    expect(fmt(0.000123456)).toBe('1.23 × 10⁻⁴');
    expect(fmt(-2.5e7)).toBe(`${MINUS}2.50 × 10⁷`);
  });
  it("writes '—' for no value", () => {
    for (const x of [null, undefined, NaN, Infinity, -Infinity]) expect(fmt(x)).toBe(NONE);
    expect(NONE).toBe('—');
  });
  it('never writes a hyphen-minus', () => {
    for (const x of [-1e-9, -0.5, -12.345, -1e9]) expect(fmt(x)).not.toContain('-');
  });
});

describe('fixed, signed and decimalsFor', () => {
  it('round to fixed decimals, with no sign on a value that rounds to zero', () => {
    expect(fixed(-0.0391, 3)).toBe(`${MINUS}0.039`);
    expect(fixed(-0.0004, 3)).toBe('0.000');
    expect(signed(0.00505, 3)).toBe('+0.005');
    expect(signed(-0.00505, 3)).toBe(`${MINUS}0.005`);
    expect(signed(0.0001, 3)).toBe('0.000');
  });
  it('finds the decimals of 3 significant figures, after rounding', () => {
    expect(decimalsFor(0.1, 3)).toBe(3); // 0.100
    expect(decimalsFor(1.459, 3)).toBe(2); // 1.46
    expect(decimalsFor(0.0999, 3)).toBe(4); // 0.0999
    expect(decimalsFor(0.09999, 3)).toBe(3); // rounds to 0.100
    expect(decimalsFor(250, 3)).toBe(0);
  });
});

describe('p and q values', () => {
  it("write '< 0.001' below 0.001 and 2 significant figures otherwise", () => {
    expect(fmtP(0.0004)).toBe('< 0.001');
    expect(fmtP(0.01234)).toBe('0.012');
    expect(fmtP(1)).toBe('1.0');
    expect(fmtP(0.5)).toBe('0.50');
    expect(fmtP(null)).toBe(NONE);
  });
});

describe('effects at one precision per scale', () => {
  it('gives a ratio 3 significant figures and its CI the same decimals', () => {
    expect(effectDecimals('ratio', 1.459)).toBe(2);
    expect(fmtEffect(1.459, 'ratio')).toBe('1.46×');
    expect(fmtEffectCi(1.31, 1.625, 'ratio', 1.459)).toBe('1.31 to 1.63');
    // 0.934 to 1.10, not '0.934–1.1': the estimate's 3 decimals, trailing zero kept.
    expect(fmtEffectCi(0.934, 1.1, 'ratio', 0.963)).toBe('0.934 to 1.100');
  });
  it("gives a difference the decimals of its band's half-width (the issue's pCa50 example)", () => {
    // pCa50 band ±0.1: 3 decimals; '+0.00505' and '-0.0391–0.0492' become:
    expect(fmtEffect(0.00505, 'difference', [-0.1, 0.1])).toBe('+0.005');
    expect(fmtEffectCi(-0.0391, 0.0492, 'difference', 0.00505, [-0.1, 0.1])).toBe(`${MINUS}0.039 to 0.049`);
    // A band of ±1 kPa gives 2 decimals; of ±0.01 s⁻¹ gives 4.
    expect(fmtEffect(0.1587, 'difference', [-1, 1])).toBe('+0.16');
    expect(fmtEffect(-0.001021, 'difference', [-0.01, 0.01])).toBe(`${MINUS}0.0010`);
  });
  it('writes the band itself at the same precision', () => {
    expect(fmtBand([0.8, 1.25], 'ratio')).toBe('0.80 to 1.25');
    expect(fmtBand([0.67, 1.5], 'ratio')).toBe('0.67 to 1.50');
    expect(fmtBand([-0.1, 0.1], 'difference')).toBe(`${MINUS}0.100 to 0.100`);
  });
  it('writes absolute values in their unit, a difference metric at its effect precision', () => {
    expect(fmtValue(6.636, 's⁻¹', 'ratio')).toBe('6.64 s⁻¹');
    expect(fmtValue(0.003372, 's⁻¹', 'ratio')).toBe('0.00337 s⁻¹');
    expect(fmtValue(5.962, '', 'difference', [-0.1, 0.1])).toBe('5.962');
    expect(fmtValue(null, 'kPa', 'ratio')).toBe(NONE);
  });
  it("writes ranges as 'low to high', and '—' when an end is missing", () => {
    expect(fmtRange(-2, -1)).toBe(`${MINUS}2.00 to ${MINUS}1.00`);
    expect(fmtCi(0.5, null)).toBe(NONE);
    expect(fmtEffect(null, 'ratio')).toBe(NONE);
  });
});
