/**
 * Variant-versus-WT effect of one metric, with batch pairing and a residual variance per group.
 *
 * Model: the biological-unit values y (natural log for ratio metrics) follow
 *
 *     y = μ_batch + δ·[unit is variant] + ε,   ε ~ N(0, σ²_v) for variant units, N(0, σ²_WT) for WT units,
 *
 * a randomised block design (batches as blocks, unequal replication) in which the variant's
 * preparations may scatter more, or less, than WT's. It is generalised least squares with a
 * variance per group fitted by restricted maximum likelihood (REML; Patterson & Thompson 1971,
 * Biometrika 58:545), the model that R fits as
 * `nlme::gls(y ~ batch + group, weights = varIdent(form = ~ 1 | group), method = "REML")`
 * (Pinheiro & Bates 2000, Mixed-Effects Models in S and S-PLUS, §5.2.1).
 * WT units of batches in which the variant was not measured enter too: they inform σ²_WT (and
 * their own μ_batch) only. Variant units of a batch without WT cannot be paired and are left out
 * (named by the caller).
 *
 * Given the variances, δ̂ is the inverse-variance weighted mean of the within-batch differences,
 *
 *     δ̂ = Σ h_b·d_b / Σ h_b,   d_b = ȳ_v,b − ȳ_WT,b,   h_b = 1/(σ²_v/n_v,b + σ²_WT/n_WT,b),   Var(δ̂) = 1/Σ h_b,
 *
 * and the REML criterion has the closed form (constants dropped; W = within-batch sum of squares
 * of a group, N = units, B = batches with WT)
 *
 *     −2ℓ = N_v·ln σ²_v + N_WT·ln σ²_WT + Σ_b ln(n_WT,b/σ²_WT + n_v,b/σ²_v) + ln Σ h_b
 *           + W_v/σ²_v + W_WT/σ²_WT + Σ h_b·(d_b − δ̂)².
 *
 * With ρ = σ²_v/σ²_WT the scale profiles out (σ²_WT = Q(ρ)/(N − B − 1)), and ln ρ is found by a
 * grid over [RHO_MIN, RHO_MAX] refined by golden-section search.
 * Degrees of freedom: Satterthwaite's approximation (Satterthwaite 1946, Biometrics Bull 2:110;
 * Giesbrecht & Burns 1985, Biometrics 41:477): df = 2·Var(δ̂)²/(gᵀ·A·g), g the gradient of Var(δ̂)
 * in (ln σ²_v, ln σ²_WT) and A = 2·H⁻¹ their asymptotic covariance, H the Hessian of −2ℓ at the
 * estimate (observed information, by central differences), as R's emmeans does for gls fits
 * (`mode = "satterthwaite"`). A t interval follows.
 *
 * When the REML estimate of ρ sits at RHO_MIN (the variant's units scatter no more than WT's would
 * make them, which happens only with at most one variant unit per batch), Satterthwaite's df would
 * rest on WT's variance alone; it is then capped at the variant's own N_v − 1 (conservative).
 *
 * With one batch this is Welch's unequal-variance t test (REML gives each group's sample variance;
 * tested on R's sleep data). When a group's variance cannot be estimated on its own (one variant
 * unit, or no WT batch with two WT units) the model falls back to one pooled variance, Student's
 * randomised-block model on N − B − 1 df, and says so (`variance: 'pooled'`).
 *
 * Only biological units enter: technical replicates were summarised within their unit before this step.
 *
 * @example pairedEffect({ batches: [{ batch: 'A', variant: [1.0, 1.2, 1.1], wt: [0.5, 0.7, 0.6] }], confidenceLevel: 0.95 })
 *   // → estimate 0.5, se 0.0816 (Welch), df 4
 */
import { tQuantile } from '../stats/distributions.js';

export interface PairedEffectInput {
  /** The variant's batches: its unit values and WT's, on the analysis scale. */
  batches: Array<{ batch: string; variant: readonly number[]; wt: readonly number[] }>;
  /** WT unit values of each batch in which the variant was not measured (they inform σ²_WT only). */
  otherWt?: ReadonlyArray<readonly number[]>;
  confidenceLevel: number;
}

export interface PairedEffect {
  /** δ̂ on the analysis scale (log ratio or difference). */
  estimate: number;
  se: number | null;
  /** Satterthwaite df (separate variances) or N − B − 1 (pooled); null without an interval. */
  df: number | null;
  ciLow: number | null;
  ciHigh: number | null;
  nVariant: number;
  /** WT units of the batches used (those of `otherWt` inform σ²_WT only and are not counted here). */
  nWt: number;
  /** Batches that had both variant and WT values and entered the model. */
  batchesUsed: string[];
  /** Batches dropped because WT had no value there. */
  batchesUnpaired: string[];
  /** 'separate': a residual variance per group (REML); 'pooled': one variance for both. */
  variance: 'separate' | 'pooled';
  /** Residual SD of variant and of WT units on the analysis scale; null when not estimable. */
  sdVariant: number | null;
  sdWt: number | null;
}

/** Bounds of the variance ratio σ²_v/σ²_WT searched (a ratio beyond them is taken at the bound). */
export const RHO_MIN = 1e-4;
export const RHO_MAX = 1e4;

interface Cell {
  nv: number;
  nw: number;
  d: number;
}

interface Design {
  cells: Cell[];
  /** Within-batch sums of squares and unit counts per group, and batches with WT. */
  wv: number;
  ww: number;
  nv: number;
  nw: number;
  batches: number;
}

function meanOf(xs: readonly number[]): number {
  let s = 0;
  for (const x of xs) s += x;
  return s / xs.length;
}

function sumSq(xs: readonly number[], m: number): number {
  let s = 0;
  for (const x of xs) s += (x - m) * (x - m);
  return s;
}

/** δ̂ and Σh_b for variances (sv2, sw2); h_b and the weighted scatter of d_b. */
function gls(design: Design, sv2: number, sw2: number): { delta: number; sumH: number; scatter: number; sumLogM: number } {
  let sumH = 0;
  let sumHd = 0;
  for (const c of design.cells) {
    const h = 1 / (sv2 / c.nv + sw2 / c.nw);
    sumH += h;
    sumHd += h * c.d;
  }
  const delta = sumHd / sumH;
  let scatter = 0;
  let sumLogM = 0;
  for (const c of design.cells) {
    const h = 1 / (sv2 / c.nv + sw2 / c.nw);
    scatter += h * (c.d - delta) ** 2;
    sumLogM += Math.log(c.nw / sw2 + c.nv / sv2);
  }
  return { delta, sumH, scatter, sumLogM };
}

/** −2 × REML log-likelihood (constants dropped) at (ln σ²_v, ln σ²_WT), WT-only batches' constant terms included. */
function minus2Reml(design: Design, logSv2: number, logSw2: number): number {
  const sv2 = Math.exp(logSv2);
  const sw2 = Math.exp(logSw2);
  const g = gls(design, sv2, sw2);
  // Batches with WT only add Σ ln(n_WT,b/σ²_WT) = const − (B − B_paired)·ln σ²_WT.
  const wtOnly = design.batches - design.cells.length;
  return (
    design.nv * logSv2 +
    design.nw * logSw2 +
    g.sumLogM -
    wtOnly * logSw2 +
    Math.log(g.sumH) +
    design.wv / sv2 +
    design.ww / sw2 +
    g.scatter
  );
}

/** Profiled −2ℓ at ρ = σ²_v/σ²_WT, and the scale σ²_WT it implies. */
function profile(design: Design, rho: number): { value: number; sw2: number } {
  const resid = design.nv + design.nw - design.batches - 1;
  const g = gls(design, rho, 1);
  const q = design.ww + design.wv / rho + g.scatter;
  const sw2 = q / resid;
  return { value: minus2Reml(design, Math.log(rho * sw2), Math.log(sw2)), sw2 };
}

/** ln ρ maximising the REML likelihood on [ln RHO_MIN, ln RHO_MAX]: a grid, then golden-section search. */
function bestLogRho(design: Design): number {
  const lo = Math.log(RHO_MIN);
  const hi = Math.log(RHO_MAX);
  const steps = 80;
  let best = 0;
  let bestValue = Infinity;
  for (let i = 0; i <= steps; i++) {
    const x = lo + ((hi - lo) * i) / steps;
    const v = profile(design, Math.exp(x)).value;
    if (v < bestValue) {
      bestValue = v;
      best = i;
    }
  }
  let a = lo + ((hi - lo) * Math.max(0, best - 1)) / steps;
  let b = lo + ((hi - lo) * Math.min(steps, best + 1)) / steps;
  const ratio = (Math.sqrt(5) - 1) / 2;
  let c = b - ratio * (b - a);
  let d = a + ratio * (b - a);
  let fc = profile(design, Math.exp(c)).value;
  let fd = profile(design, Math.exp(d)).value;
  while (b - a > 1e-10) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - ratio * (b - a);
      fc = profile(design, Math.exp(c)).value;
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + ratio * (b - a);
      fd = profile(design, Math.exp(d)).value;
    }
  }
  return (a + b) / 2;
}

/** Satterthwaite df of Var(δ̂) at (σ²_v, σ²_WT), from the observed REML information. */
function satterthwaiteDf(design: Design, sv2: number, sw2: number): number {
  const [x0, x1] = [Math.log(sv2), Math.log(sw2)];
  const f = (a: number, b: number) => minus2Reml(design, a, b);
  const step = 1e-4;
  const f0 = f(x0, x1);
  const haa = (f(x0 + step, x1) - 2 * f0 + f(x0 - step, x1)) / (step * step);
  const hbb = (f(x0, x1 + step) - 2 * f0 + f(x0, x1 - step)) / (step * step);
  const hab =
    (f(x0 + step, x1 + step) - f(x0 + step, x1 - step) - f(x0 - step, x1 + step) + f(x0 - step, x1 - step)) /
    (4 * step * step);
  const det = haa * hbb - hab * hab;
  // A = 2·H⁻¹ (information = H/2 for H the Hessian of −2ℓ).
  const a11 = (2 * hbb) / det;
  const a22 = (2 * haa) / det;
  const a12 = (-2 * hab) / det;
  let sumH = 0;
  let gv = 0;
  let gw = 0;
  for (const c of design.cells) {
    const h = 1 / (sv2 / c.nv + sw2 / c.nw);
    sumH += h;
    gv += (h * h) / c.nv;
    gw += (h * h) / c.nw;
  }
  const phi = 1 / sumH;
  // ∂φ/∂ln σ²_g = σ²_g·φ²·Σ h_b²/n_g,b.
  const g1 = sv2 * phi * phi * gv;
  const g2 = sw2 * phi * phi * gw;
  const varPhi = g1 * g1 * a11 + 2 * g1 * g2 * a12 + g2 * g2 * a22;
  if (!(det > 0) || !(varPhi > 0)) return NaN;
  return (2 * phi * phi) / varPhi;
}

/**
 * Estimate the variant effect δ with the model above. Returns null when no batch has both
 * variant and WT values.
 */
export function pairedEffect(input: PairedEffectInput): PairedEffect | null {
  const cells: Cell[] = [];
  const batchesUsed: string[] = [];
  const batchesUnpaired: string[] = [];
  let wv = 0;
  let ww = 0;
  let nv = 0;
  let nw = 0;
  let nwPaired = 0;
  let batches = 0;
  let wtReplicated = false;
  const addWt = (w: readonly number[]) => {
    if (w.length === 0) return;
    ww += sumSq(w, meanOf(w));
    nw += w.length;
    batches += 1;
    if (w.length > 1) wtReplicated = true;
  };
  for (const b of input.batches) {
    const v = b.variant.filter(Number.isFinite);
    const w = b.wt.filter(Number.isFinite);
    if (w.length === 0) {
      if (v.length > 0) batchesUnpaired.push(b.batch);
      continue;
    }
    addWt(w);
    if (v.length === 0) continue;
    const mv = meanOf(v);
    wv += sumSq(v, mv);
    nv += v.length;
    nwPaired += w.length;
    cells.push({ nv: v.length, nw: w.length, d: mv - meanOf(w) });
    batchesUsed.push(b.batch);
  }
  if (cells.length === 0) return null;
  for (const w of input.otherWt ?? []) addWt(w.filter(Number.isFinite));
  const design: Design = { cells, wv, ww, nv, nw, batches };
  const base = { nVariant: nv, nWt: nwPaired, batchesUsed, batchesUnpaired };
  const resid = nv + nw - batches - 1;
  const none = (estimate: number, variance: PairedEffect['variance']): PairedEffect => ({
    estimate,
    se: null,
    df: null,
    ciLow: null,
    ciHigh: null,
    ...base,
    variance,
    sdVariant: null,
    sdWt: null,
  });
  const t = (df: number) => tQuantile(0.5 + input.confidenceLevel / 2, df);

  if (nv >= 2 && wtReplicated && resid >= 2) {
    const rho = Math.exp(bestLogRho(design));
    const sw2 = profile(design, rho).sw2;
    const sv2 = rho * sw2;
    const g = gls(design, sv2, sw2);
    const se = Math.sqrt(1 / g.sumH);
    // At the lower bound the variant's own units showed no scatter beyond WT's (possible only when it
    // has at most one unit per batch): Satterthwaite's df would then rest on WT's variance alone, so
    // it is capped at the variant's own degrees of freedom, N_v − 1 (conservative).
    const satterthwaite = satterthwaiteDf(design, sv2, sw2);
    const df = rho <= RHO_MIN * 1.01 ? Math.min(satterthwaite, nv - 1) : satterthwaite;
    if (se > 0 && Number.isFinite(df) && df > 0) {
      const half = t(df) * se;
      return {
        estimate: g.delta,
        se,
        df,
        ciLow: g.delta - half,
        ciHigh: g.delta + half,
        ...base,
        variance: 'separate',
        sdVariant: Math.sqrt(sv2),
        sdWt: Math.sqrt(sw2),
      };
    }
  }

  // One pooled variance: Student's randomised-block model.
  const pooled = gls(design, 1, 1);
  if (resid < 1) return none(pooled.delta, 'pooled');
  const s2 = (ww + wv + pooled.scatter) / resid;
  const se = Math.sqrt(s2 / pooled.sumH);
  if (!(se > 0)) return none(pooled.delta, 'pooled');
  const half = t(resid) * se;
  return {
    estimate: pooled.delta,
    se,
    df: resid,
    ciLow: pooled.delta - half,
    ciHigh: pooled.delta + half,
    ...base,
    variance: 'pooled',
    sdVariant: Math.sqrt(s2),
    sdWt: Math.sqrt(s2),
  };
}
