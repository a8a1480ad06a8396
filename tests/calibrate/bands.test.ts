import { describe, expect, it } from 'vitest';
import { bandFromBenignControls } from '../../src/calibrate/bands.js';

/**
 * Independent t quantiles from the closed forms of Student's t for 2 and 4 degrees of freedom
 * (Hill, Commun ACM 1970;13:617; also the table of quantile functions in standard texts):
 * ν = 2: t = (2p − 1)/√(2p(1 − p)); ν = 4: α = 4p(1 − p), q = cos(arccos(√α)/3)/√α, t = 2√(q − 1).
 */
function t2(p: number): number {
  return (2 * p - 1) / Math.sqrt(2 * p * (1 - p));
}
function t4(p: number): number {
  const alpha = 4 * p * (1 - p);
  const q = Math.cos(Math.acos(Math.sqrt(alpha)) / 3) / Math.sqrt(alpha);
  return 2 * Math.sqrt(q - 1);
}
function meanSd(x: number[]): [number, number] {
  const m = x.reduce((a, b) => a + b, 0) / x.length;
  const s = Math.sqrt(x.reduce((a, b) => a + (b - m) ** 2, 0) / (x.length - 1));
  return [m, s];
}

describe('bandFromBenignControls: 95% prediction interval of benign effects', () => {
  it('closed-form t quantiles used as oracles are right (t(0.975, 2) = 4.302653, t(0.975, 4) = 2.776445; t tables, from memory)', () => {
    expect(t2(0.975)).toBeCloseTo(4.302653, 6);
    expect(t4(0.975)).toBeCloseTo(2.776445, 6);
  });
  it('ratio scale: three benign controls 0.95, 1.00, 1.05 → [0.77920, 1.28122] (computed from these inputs, closed-form t for 2 df)', () => {
    const d = bandFromBenignControls([0.95, 1.0, 1.05], 'ratio');
    expect(d.band).not.toBeNull();
    const [m, s] = meanSd([0.95, 1.0, 1.05].map(Math.log));
    const half = t2(0.975) * s * Math.sqrt(1 + 1 / 3);
    expect(d.band![0]).toBeCloseTo(Math.exp(m - half), 10);
    expect(d.band![1]).toBeCloseTo(Math.exp(m + half), 10);
    expect(d.band![0]).toBeCloseTo(0.7792, 4); // computed by hand (python statistics module) from the same inputs
    expect(d.band![1]).toBeCloseTo(1.28122, 4);
    expect(d.n).toBe(3);
    if (d.band) expect(d.rule).toContain('Derived from 3 benign controls: 95% prediction interval');
  });
  it('difference scale: five benign controls → mean ± t(0.975, 4)·SD·√(1.2) (computed from these inputs, closed-form t for 4 df)', () => {
    const effects = [0.02, 0.05, 0.08, 0.03, 0.07];
    const d = bandFromBenignControls(effects, 'difference');
    const [m, s] = meanSd(effects);
    const half = t4(0.975) * s * Math.sqrt(1.2);
    expect(d.band![0]).toBeCloseTo(m - half, 10);
    expect(d.band![1]).toBeCloseTo(m + half, 10);
    expect(d.band![0]).toBeCloseTo(-0.027542, 5);
    expect(d.band![1]).toBeCloseTo(0.127542, 5);
  });
  it('widens to contain no change when the benign controls sit away from it', () => {
    const d = bandFromBenignControls([1.3, 1.35, 1.4], 'ratio');
    expect(d.band![0]).toBe(1);
    expect(d.band![1]).toBeGreaterThan(1.4);
    if (d.band) expect(d.rule).toContain('widened to include no change (ratio 1)');
    const diff = bandFromBenignControls([-0.3, -0.31, -0.29], 'difference');
    expect(diff.band![1]).toBe(0);
  });
  it('widens to contain the default band when asked', () => {
    const d = bandFromBenignControls([0.02, 0.05, 0.08, 0.03, 0.07], 'difference', { atLeast: [-0.1, 0.1] });
    expect(d.band![0]).toBe(-0.1);
    expect(d.band![1]).toBeCloseTo(0.127542, 5);
    if (d.band) expect(d.rule).toContain('the default band −0.100 to 0.100');
  });
  it('fewer than three usable benign controls: null with the reason', () => {
    const d = bandFromBenignControls([0.9, 1.1], 'ratio');
    expect(d.band).toBeNull();
    if (!d.band) expect(d.reason).toContain('only 2 benign controls with an effect; at least 3 are needed');
    const bad = bandFromBenignControls([0.9, 1.1, Number.NaN, -1], 'ratio');
    expect(bad.band).toBeNull();
    if (!bad.band) expect(bad.reason).toContain('2 effects left out');
    expect(bandFromBenignControls([], 'difference').band).toBeNull();
  });
  it('a band narrows as benign controls agree more closely and widens with fewer of them', () => {
    const few = bandFromBenignControls([0.9, 1.0, 1.1], 'ratio').band!;
    const many = bandFromBenignControls([0.9, 1.0, 1.1, 0.9, 1.0, 1.1, 0.9, 1.0, 1.1], 'ratio').band!;
    expect(many[1] - many[0]).toBeLessThan(few[1] - few[0]);
  });
});
