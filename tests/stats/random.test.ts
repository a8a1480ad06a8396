/**
 * Seeded generator. Expected values: properties of the uniform and normal distributions
 * (mean 1/2, variance 1/12; mean 0, SD 1) within sampling error.
 */
import { describe, expect, it } from 'vitest';
import { createRandom } from '../../src/stats/random.js';
import { mean, sd, variance } from '../../src/stats/descriptive.js';

describe('createRandom', () => {
  it('equal seeds give equal streams; different seeds differ', () => {
    const a = createRandom(7);
    const b = createRandom(7);
    const c = createRandom(8);
    const sa = Array.from({ length: 10 }, () => a.uniform());
    expect(Array.from({ length: 10 }, () => b.uniform())).toEqual(sa);
    expect(Array.from({ length: 10 }, () => c.uniform())).not.toEqual(sa);
  });
  it('uniforms lie in [0, 1) with mean 1/2 and variance 1/12 (±4 SE over 100,000 draws)', () => {
    const random = createRandom(1);
    const u = Array.from({ length: 100_000 }, () => random.uniform());
    expect(Math.min(...u)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...u)).toBeLessThan(1);
    expect(Math.abs(mean(u) - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / 1e5));
    expect(Math.abs(variance(u) - 1 / 12)).toBeLessThan(0.002);
  });
  it('normals have mean 0, SD 1 and 95% within ±1.96 (100,000 draws)', () => {
    const random = createRandom(2);
    const z = Array.from({ length: 100_000 }, () => random.normal());
    expect(Math.abs(mean(z))).toBeLessThan(4 / Math.sqrt(1e5));
    expect(Math.abs(sd(z) - 1)).toBeLessThan(0.01);
    const inside = z.filter((v) => Math.abs(v) < 1.959964).length / z.length;
    expect(Math.abs(inside - 0.95)).toBeLessThan(0.003);
  });
  it('integer(n) covers 0..n−1 evenly', () => {
    const random = createRandom(3);
    const counts = new Map<number, number>();
    for (let i = 0; i < 40_000; i++) {
      const value = random.integer(4);
      counts.set(value, (counts.get(value) ?? 0) + 1);
    }
    expect([...counts.keys()].sort()).toEqual([0, 1, 2, 3]);
    for (const c of counts.values()) expect(Math.abs(c - 10_000)).toBeLessThan(400);
  });
});
