/**
 * Seeded pseudo-random numbers, so that simulations are reproducible.
 *
 * Uniforms: mulberry32 (Tommy Ettinger, 2017, public domain; a 32-bit state generator
 * with period 2³² that passes gjrand and PractRand to moderate sizes), giving multiples
 * of 2⁻³² in [0, 1). Good enough for simulation tests here; not for
 * cryptography and not for streams longer than ~10⁸ draws.
 * Normal deviates: Box–Muller transform (Box & Muller 1958, Ann Math Stat 29:610), both
 * deviates of each pair used.
 * @example
 * const random = createRandom(42);
 * random.uniform(); // → the same number on every run and machine for seed 42
 */

export interface Random {
  /** Uniform deviate in [0, 1). */
  uniform(): number;
  /** Normal deviate with the given mean (default 0) and SD (default 1). */
  normal(mean?: number, sd?: number): number;
  /** Uniform integer in 0..n−1. */
  integer(n: number): number;
}

/** A seeded generator; equal seeds give equal streams. The seed is taken modulo 2³². */
export function createRandom(seed: number): Random {
  let state = seed >>> 0;
  let spare: number | null = null;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const standardNormal = (): number => {
    if (spare !== null) {
      const value = spare;
      spare = null;
      return value;
    }
    const u1 = 1 - uniform(); // in (0, 1]: log is finite
    const u2 = uniform();
    const radius = Math.sqrt(-2 * Math.log(u1));
    spare = radius * Math.sin(2 * Math.PI * u2);
    return radius * Math.cos(2 * Math.PI * u2);
  };
  return {
    uniform,
    normal: (mean = 0, sd = 1) => mean + sd * standardNormal(),
    integer: (n: number) => Math.floor(uniform() * n),
  };
}
