/**
 * Test helpers for the assay modules: seeded random sources (only for synthetic data with
 * known truth), a minimal Study builder, and a chart check.
 */
import { compile } from 'vega-lite';
import { expect } from 'vitest';
import type { ChartSpec } from '../../src/assays/types.js';
import { createRandom } from '../../src/stats/random.js';
import type { InputFile, RowsByKind, SourceRef, Study } from '../../src/study/types.js';

/** Seeded uniform source (src/stats/random.ts, mulberry32), for synthetic data with known truth. */
export function mulberry32(seed: number): () => number {
  const random = createRandom(seed);
  return () => random.uniform();
}

/** Seeded normal deviates (src/stats/random.ts, Box–Muller). */
export function normalSource(seed: number): (mean?: number, sd?: number) => number {
  const random = createRandom(seed);
  return (mean = 0, sd = 1) => random.normal(mean, sd);
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
