import { describe, expect, it } from 'vitest';
import { pairedEffect } from '../../src/analysis/paired-effect.js';
import { tCdf, tQuantile } from '../../src/stats/distributions.js';

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
      xty[i] += r.x[i] * r.y;
      for (let j = 0; j < p; j++) xtx[i][j] += r.x[i] * r.x[j];
    }
  }
  // Invert X'X by Gauss–Jordan.
  const aug = xtx.map((row, i) => [...row, ...[...Array(p)].map((_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < p; c++) {
    let piv = c;
    for (let r = c + 1; r < p; r++) if (Math.abs(aug[r][c]) > Math.abs(aug[piv][c])) piv = r;
    [aug[c], aug[piv]] = [aug[piv], aug[c]];
    const d = aug[c][c];
    for (let j = 0; j < 2 * p; j++) aug[c][j] /= d;
    for (let r = 0; r < p; r++) {
      if (r === c) continue;
      const f = aug[r][c];
      for (let j = 0; j < 2 * p; j++) aug[r][j] -= f * aug[c][j];
    }
  }
  const inv = aug.map((row) => row.slice(p));
  const beta = inv.map((row) => row.reduce((s, v, j) => s + v * xty[j], 0));
  const rss = rows.reduce((s, r) => s + (r.y - r.x.reduce((t, v, j) => t + v * beta[j], 0)) ** 2, 0);
  const df = rows.length - p;
  const se = Math.sqrt((rss / df) * inv[p - 1][p - 1]);
  return { delta: beta[p - 1], se, df };
}

describe('pairedEffect (batch-stratified model)', () => {
  it('matches an ordinary least-squares solve of the same model with unequal replication', () => {
    // Invented values for an algebra check (no external source needed: two implementations of one model).
    const batches = [
      { batch: 'A', variant: [1.0, 1.2], wt: [0.5, 0.7] },
      { batch: 'B', variant: [2.0], wt: [1.4, 1.6, 1.3] },
      { batch: 'C', variant: [0.9, 1.1, 1.3], wt: [0.2] },
    ];
    const ours = pairedEffect({ batches, confidenceLevel: 0.95 })!;
    const ref = olsBatchModel(batches);
    expect(ours.estimate).toBeCloseTo(ref.delta, 12);
    expect(ours.se!).toBeCloseTo(ref.se, 12);
    expect(ours.df).toBe(ref.df);
    const t = tQuantile(0.975, ref.df);
    expect(ours.ciLow!).toBeCloseTo(ref.delta - t * ref.se, 12);
    expect(ours.p!).toBeCloseTo(2 * tCdf(-Math.abs(ref.delta / ref.se), ref.df), 12);
  });

  it('reduces to Student’s pooled two-sample t test with one batch (R sleep data)', () => {
    // Data: R datasets::sleep (REFERENCES.md §3). Expected values computed from those inputs with the
    // textbook pooled-variance formula below (computed from REFERENCES.md §3 inputs).
    const g1 = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
    const g2 = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
    const m = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    const ss = (xs: number[]) => xs.reduce((a, x) => a + (x - m(xs)) ** 2, 0);
    const sp2 = (ss(g1) + ss(g2)) / 18;
    const se = Math.sqrt(sp2 * (1 / 10 + 1 / 10));
    const r = pairedEffect({ batches: [{ batch: 'one', variant: g1, wt: g2 }], confidenceLevel: 0.95 })!;
    expect(r.estimate).toBeCloseTo(m(g1) - m(g2), 12); // −1.58
    expect(r.se!).toBeCloseTo(se, 12);
    expect(r.df).toBe(18);
    expect(r.estimate / r.se!).toBeCloseTo(-1.860813, 5); // same t as Welch here, equal n (REFERENCES.md §3)
  });

  it('gives no interval when there are no residual degrees of freedom', () => {
    const r = pairedEffect({ batches: [{ batch: 'A', variant: [1], wt: [2] }], confidenceLevel: 0.95 })!;
    expect(r.df).toBe(0);
    expect(r.se).toBeNull();
    expect(r.ciLow).toBeNull();
    expect(r.p).toBeNull();
  });

  it('skips batches that lack WT or variant values and names them', () => {
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
