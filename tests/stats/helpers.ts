import { expect } from 'vitest';
import { fUpperP, tQuantile } from '../../src/stats/distributions.js';

/** Distribution spot checks; expected values from SciPy 1.17 (stats.f.sf, t.ppf). */
export function fTestPSanity(): void {
  expect(fUpperP(3, 2, 10)).toBeCloseTo(0.09536743, 8);
  expect(fUpperP(9, 2, 18)).toBeCloseTo(0.001953125, 9);
  expect(fUpperP(0, 2, 18)).toBe(1);
  // SciPy stats.f.sf(7716.5, 2, 176) ≈ 3.9e-172: far tail must not round to 0.
  expect(fUpperP(7716.5, 2, 176)).toBeGreaterThan(0);
  expect(tQuantile(0.975, 10)).toBeCloseTo(2.228138852, 8);
  expect(tQuantile(0.95, 10)).toBeCloseTo(1.812461123, 8);
}
