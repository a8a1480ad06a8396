/**
 * Variant-versus-WT effect with batch pairing: the batch-stratified linear model.
 *
 * Method: for one metric, the biological-unit values y (log-transformed for ratio
 * metrics) of the variant and of WT in the batches where the variant was measured
 * follow the additive two-way model
 *
 *     y = μ_batch + δ·[unit is variant] + ε,   ε ~ N(0, σ²)
 *
 * i.e. a randomised block design with batches as blocks and unequal replication
 * (Montgomery, Design and Analysis of Experiments, ch. 4, randomised complete block
 * design; Cochran & Cox, Experimental Designs, 1957). The least-squares estimate of δ
 * is the weighted mean of the within-batch differences of means,
 *
 *     δ̂ = Σ w_b·d_b / Σ w_b,   d_b = ȳ_variant,b − ȳ_WT,b,   w_b = n_v,b·n_w,b / (n_v,b + n_w,b),
 *
 * with Var(δ̂) = σ²/Σ w_b. The residual sum of squares is the within-group sum of
 * squares plus Σ w_b·(d_b − δ̂)² (batch-to-batch variation of the effect counts as
 * error, which widens the interval honestly), on N − B − 1 degrees of freedom.
 * A t interval and a two-sided t test follow. Only biological units enter: technical
 * replicates were summarised within their unit before this step (no pseudoreplication).
 *
 * Both the variant's and WT's uncertainty are in σ²/Σ w_b; the batch pairing is in μ_batch.
 * With one batch this is Student's two-sample t test with pooled variance.
 *
 * Example: batch A variant [1.0, 1.2], WT [0.5, 0.7]; batch B variant [2.0], WT [1.4, 1.6]
 * → d = (0.6, 0.5), w = (1, 2/3), δ̂ = 0.56, df = 7 − 2 − 1 = 4.
 */
import { tCdf, tQuantile } from '../stats/distributions.js';

export interface PairedEffectInput {
  /** Values by batch: the variant's and WT's biological-unit values (already on the analysis scale). */
  batches: Array<{ batch: string; variant: readonly number[]; wt: readonly number[] }>;
  confidenceLevel: number;
}

export interface PairedEffect {
  /** δ̂ on the analysis scale (log ratio or difference). */
  estimate: number;
  se: number | null;
  df: number;
  ciLow: number | null;
  ciHigh: number | null;
  p: number | null;
  nVariant: number;
  nWt: number;
  /** Batches that had both variant and WT values and entered the model. */
  batchesUsed: string[];
  /** Batches dropped because one side had no value. */
  batchesUnpaired: string[];
}

function mean(xs: readonly number[]): number {
  let s = 0;
  for (const x of xs) s += x;
  return s / xs.length;
}

function sumSq(xs: readonly number[], m: number): number {
  let s = 0;
  for (const x of xs) s += (x - m) * (x - m);
  return s;
}

/**
 * Estimate the variant effect δ with the batch-stratified model above.
 * Returns null when no batch has both variant and WT values.
 */
export function pairedEffect(input: PairedEffectInput): PairedEffect | null {
  const used: Array<{ d: number; w: number }> = [];
  const batchesUsed: string[] = [];
  const batchesUnpaired: string[] = [];
  let within = 0;
  let nVariant = 0;
  let nWt = 0;
  for (const b of input.batches) {
    const v = b.variant.filter(Number.isFinite);
    const w = b.wt.filter(Number.isFinite);
    if (v.length === 0 || w.length === 0) {
      if (v.length > 0) batchesUnpaired.push(b.batch);
      continue;
    }
    const mv = mean(v);
    const mw = mean(w);
    within += sumSq(v, mv) + sumSq(w, mw);
    used.push({ d: mv - mw, w: (v.length * w.length) / (v.length + w.length) });
    batchesUsed.push(b.batch);
    nVariant += v.length;
    nWt += w.length;
  }
  if (used.length === 0) return null;
  const sumW = used.reduce((s, u) => s + u.w, 0);
  const estimate = used.reduce((s, u) => s + u.w * u.d, 0) / sumW;
  const between = used.reduce((s, u) => s + u.w * (u.d - estimate) ** 2, 0);
  const df = nVariant + nWt - used.length - 1;
  if (df < 1) {
    return { estimate, se: null, df, ciLow: null, ciHigh: null, p: null, nVariant, nWt, batchesUsed, batchesUnpaired };
  }
  const sigma2 = (within + between) / df;
  const se = Math.sqrt(sigma2 / sumW);
  if (!(se > 0)) {
    return { estimate, se: null, df, ciLow: null, ciHigh: null, p: null, nVariant, nWt, batchesUsed, batchesUnpaired };
  }
  const t = tQuantile(0.5 + input.confidenceLevel / 2, df);
  const stat = estimate / se;
  const p = 2 * tCdf(-Math.abs(stat), df);
  return {
    estimate,
    se,
    df,
    ciLow: estimate - t * se,
    ciHigh: estimate + t * se,
    p,
    nVariant,
    nWt,
    batchesUsed,
    batchesUnpaired,
  };
}
