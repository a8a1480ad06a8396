import { describe, expect, it } from 'vitest';
import { RHO_MIN, pairedEffect } from '../../src/analysis/paired-effect.js';
import { tQuantile } from '../../src/stats/distributions.js';

/**
 * Independent check: ordinary least squares of y = Σ μ_b·[batch b] + δ·[variant] by the
 * normal equations, solved by Gauss–Jordan elimination written here from scratch.
 */
function olsBatchModel(batches: Array<{ batch: string; variant: number[]; wt: number[] }>) {
  const rows: Array<{ x: number[]; y: number }> = [];
  const B = batches.length;
  batches.forEach((b, i) => {
    for (const y of b.variant) rows.push({ x: [...Array(B)].map((_, j) => (j === i ? 1 : 0)).concat(1), y });
    for (const y of b.wt) rows.push({ x: [...Array(B)].map((_, j) => (j === i ? 1 : 0)).concat(0), y });
  });
  const p = B + 1;
  const xtx = [...Array(p)].map(() => Array(p).fill(0));
  const xty = Array(p).fill(0);
  for (const r of rows) {
    for (let i = 0; i < p; i++) {
      xty[i] += r.x[i]! * r.y;
      for (let j = 0; j < p; j++) xtx[i]![j] += r.x[i]! * r.x[j]!;
    }
  }
  // Invert X'X by Gauss–Jordan.
  const aug = xtx.map((row, i) => [...row, ...[...Array(p)].map((_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < p; c++) {
    let piv = c;
    for (let r = c + 1; r < p; r++) if (Math.abs(aug[r]![c]) > Math.abs(aug[piv]![c])) piv = r;
    [aug[c], aug[piv]] = [aug[piv]!, aug[c]!];
    const d = aug[c]![c];
    for (let j = 0; j < 2 * p; j++) aug[c]![j] /= d;
    for (let r = 0; r < p; r++) {
      if (r === c) continue;
      const f = aug[r]![c];
      for (let j = 0; j < 2 * p; j++) aug[r]![j] -= f * aug[c]![j];
    }
  }
  const inv = aug.map((row) => row.slice(p));
  const beta = inv.map((row) => row.reduce((s, v, j) => s + v * xty[j], 0));
  const rss = rows.reduce((s, r) => s + (r.y - r.x.reduce((t, v, j) => t + v * beta[j], 0)) ** 2, 0);
  const df = rows.length - p;
  const se = Math.sqrt((rss / df) * inv[p - 1]![p - 1]);
  return { delta: beta[p - 1], se, df };
}

/** Relative difference |a − b|/|b|. */
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('pairedEffect (batch pairing, a residual variance per group)', () => {
  it('is Welch’s unequal-variance t test with one batch (R sleep data)', () => {
    // R datasets::sleep and t.test(extra ~ group, data = sleep) ([V]; full-precision df computed [C]).
    const g1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
    const g2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
    const r = pairedEffect({ batches: [{ batch: 'one', variant: g1, wt: g2 }], confidenceLevel: 0.95 })!;
    expect(r.variance).toBe('separate');
    expect(r.estimate).toBeCloseTo(-1.58, 12);
    expect(r.estimate / r.se!).toBeCloseTo(-1.860813, 5);
    expect(rel(r.df!, 17.776474)).toBeLessThan(1e-6);
    expect(r.ciLow!).toBeCloseTo(-3.3654832, 6);
    expect(r.ciHigh!).toBeCloseTo(0.2054832, 6);
  });

  // Reference values computed once with R 4.2.2: nlme 3.1-162 gls(y ~ batch + group, weights = varIdent(~ 1 | group),
  // method = "REML") for estimate, SE and SDs; Satterthwaite df from the inverse Hessian of nlme's REML log-likelihood
  // and the Jacobian of the contrast's variance by numDeriv 2016.8-1.1 (script: tests/analysis/reference/paired-effect.R).
  // emmeans 1.8.4 (mode = "satterthwaite") gives 6.0656 and 2.0114: its covariance of the variance parameters is nlme's
  // apVar, a cruder numerical Hessian (fdHess), so it is a check to 1e-2 only.
  it.each([
    {
      design: 'three batches with the variant (3, 2, 1 units) and one of WT only',
      batches: [
        { batch: 'A', variant: [1.0, 1.2, 1.35], wt: [0.5, 0.7, 0.62] },
        { batch: 'B', variant: [2.0, 1.5], wt: [1.4, 1.6, 1.3, 1.45] },
        { batch: 'C', variant: [0.9], wt: [0.2, 0.35] },
      ],
      otherWt: [[0.8, 0.95, 0.9]],
      estimate: 0.493213095888,
      se: 0.103827235061,
      sdVariant: 0.237505755007,
      sdWt: 0.105781848925,
      df: 6.06507967086,
      dfEmmeans: 6.06558266234,
    },
    {
      design: 'one variant unit in each of three batches',
      batches: [
        { batch: 'A', variant: [0.31], wt: [0.02, -0.05, 0.04] },
        { batch: 'B', variant: [0.52], wt: [0.21, 0.18, 0.27] },
        { batch: 'C', variant: [0.05], wt: [-0.12, -0.2, -0.15] },
      ],
      otherWt: [],
      estimate: 0.271111111111,
      se: 0.0322796431081,
      sdVariant: 0.0496282492672,
      sdWt: 0.0445969601736,
      df: 1.99999992657,
      dfEmmeans: 2.01136424125,
    },
  ])('matches R nlme gls with varIdent (REML) and its Satterthwaite df: $design', (c) => {
    const r = pairedEffect({ batches: c.batches, otherWt: c.otherWt, confidenceLevel: 0.95 })!;
    expect(r.variance).toBe('separate');
    expect(rel(r.estimate, c.estimate)).toBeLessThan(1e-8);
    expect(rel(r.se!, c.se)).toBeLessThan(1e-7);
    expect(rel(r.sdVariant!, c.sdVariant)).toBeLessThan(1e-7);
    expect(rel(r.sdWt!, c.sdWt)).toBeLessThan(1e-7);
    expect(rel(r.df!, c.df)).toBeLessThan(1e-6);
    expect(rel(r.df!, c.dfEmmeans)).toBeLessThan(1e-2);
    const t = tQuantile(0.975, r.df!);
    expect(r.ciLow!).toBeCloseTo(r.estimate - t * r.se!, 12);
    expect(r.nWt).toBe(c.batches.reduce((s, b) => s + b.wt.length, 0));
  });

  it('falls back to one pooled variance (the randomised-block model solved by least squares) with a single variant unit', () => {
    // Invented values for an algebra check (two implementations of one model: the OLS solve above).
    const batches = [
      { batch: 'A', variant: [1.0], wt: [0.5, 0.7] },
      { batch: 'B', variant: [], wt: [1.4, 1.6, 1.3] },
      { batch: 'C', variant: [], wt: [0.2, 0.3] },
    ];
    const ours = pairedEffect({ batches, confidenceLevel: 0.95 })!;
    const ref = olsBatchModel(batches);
    expect(ours.variance).toBe('pooled');
    expect(ours.estimate).toBeCloseTo(ref.delta, 12);
    expect(ours.se!).toBeCloseTo(ref.se, 12);
    expect(ours.df).toBe(ref.df);
    expect(ours.nWt).toBe(2);
  });

  it('caps the df at the variant’s own N − 1 when its variance estimate sits at the lower bound', () => {
    // Two variant units, one per batch, whose batch differences agree exactly: REML puts σ²_v at the bound.
    const r = pairedEffect({
      batches: [
        { batch: 'A', variant: [1.1], wt: [0.9, 1.0, 1.1] },
        { batch: 'B', variant: [2.1], wt: [1.9, 2.0, 2.1] },
      ],
      confidenceLevel: 0.95,
    })!;
    expect(r.variance).toBe('separate');
    expect((r.sdVariant! / r.sdWt!) ** 2).toBeLessThan(2 * RHO_MIN);
    expect(r.df).toBe(1);
  });

  it('gives no interval when there are no residual degrees of freedom', () => {
    const r = pairedEffect({ batches: [{ batch: 'A', variant: [1], wt: [2] }], confidenceLevel: 0.95 })!;
    expect(r.df).toBeNull();
    expect(r.se).toBeNull();
    expect(r.ciLow).toBeNull();
  });

  it('skips batches that lack WT and names them', () => {
    const r = pairedEffect({
      batches: [
        { batch: 'A', variant: [1, 1.1], wt: [0.9, 1.0] },
        { batch: 'B', variant: [5], wt: [] },
      ],
      confidenceLevel: 0.95,
    })!;
    expect(r.batchesUsed).toEqual(['A']);
    expect(r.batchesUnpaired).toEqual(['B']);
    expect(r.nVariant).toBe(2);
  });

  it('returns null when no batch pairs variant with WT', () => {
    expect(pairedEffect({ batches: [{ batch: 'A', variant: [1], wt: [] }], confidenceLevel: 0.95 })).toBeNull();
  });
});
