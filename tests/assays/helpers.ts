/**
 * Test helpers for the assay modules: a seeded PRNG (used only for synthetic data with
 * known truth), a minimal Study builder, and a chart check.
 */
import { compile } from 'vega-lite';
import { expect } from 'vitest';
import type { ChartSpec } from '../../src/assays/types.js';
import type { InputFile, RowsByKind, SourceRef, Study } from '../../src/study/types.js';

/**
 * mulberry32: a small 32-bit seeded PRNG (Tommy Ettinger's public-domain generator),
 * uniform on [0, 1). Used only in tests; src/stats/random.ts did not exist when written.
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by the Box–Muller transform on a seeded uniform source. */
export function normalSource(seed: number): (mean?: number, sd?: number) => number {
  const uniform = mulberry32(seed);
  return (mean = 0, sd = 1) => {
    const u1 = Math.max(uniform(), 1e-300);
    const u2 = uniform();
    return mean + sd * Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
}

/** A source reference on a made-up CSV line. */
export function at(file: string, line: number): SourceRef {
  return { file, line };
}

/** A minimal synthetic Study holding the given rows. */
export function makeStudy(rows: Partial<RowsByKind>, settings: Study['settings'] = {}, files: InputFile[] = []): Study {
  return {
    title: 'Synthetic test study',
    lab: 'Test lab (invented)',
    dates: [],
    synthetic: true,
    genes: [],
    variants: [],
    direction: 'either',
    thresholds: {},
    exclusions: [],
    caveats: [],
    settings,
    files,
    rows,
    manifestRaw: {},
    manifestSha256: '',
  };
}

/** A chart spec must compile with vega-lite and carry a title and a text description. */
export function expectChartCompiles(spec: ChartSpec): void {
  expect(() => compile(spec as never)).not.toThrow();
  expect(typeof spec.title === 'string' && (spec.title as string).length > 0).toBe(true);
  expect(typeof spec.description === 'string' && (spec.description as string).length > 20).toBe(true);
}
