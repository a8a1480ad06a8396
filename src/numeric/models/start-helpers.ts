/**
 * Helpers for data-driven starting values.
 *
 * Method: "variable projection" for starting values (Golub & Pereyra 1973, SIAM J Numer
 * Anal 10:413; Golub & Pereyra 2003, Inverse Problems 19:R1): for a model that is linear
 * in some parameters once the nonlinear ones are fixed, scan the nonlinear ones over a
 * grid, solve the linear ones by least squares at each grid point, and keep the grid
 * point with the lowest residual sum of squares. No user guess is needed and the scan
 * cannot diverge. Each linear solve is in closed form (lineOnBasis, solveSymmetric3) with
 * no allocation per grid point. The exponential models refine their grid's best rate(s)
 * by one-dimensional Brent minimisation (brentMinimise); the lowest RSS seen wins, so the
 * refinement never makes a start worse than its grid. Grids are kept dense where a
 * coarser one was seen to find worse local optima (Hill, double exponential).
 */
import { dampedLeastSquares } from '../linalg.js';

/**
 * Ordinary least squares of y on the given basis columns (no intercept unless a column
 * of ones is passed). Returns coefficients and RSS, or null when the basis is singular.
 * @example linearLeastSquares([[1, 1, 1], [0, 1, 2]], [1, 3, 5]) // → { coefficients: [1, 2], rss: 0 }
 */
export function linearLeastSquares(
  columns: readonly (readonly number[])[],
  y: readonly number[],
): { coefficients: number[]; rss: number } | null {
  const n = y.length;
  const k = columns.length;
  for (const [j, column] of columns.entries()) {
    if (column.length !== n) throw new RangeError(`linearLeastSquares: basis column ${j} has ${column.length} values for ${n} observations`);
  }
  if (n < k) return null;
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) rows.push(columns.map((c) => c[i]!));
  const coefficients = dampedLeastSquares(rows, y.slice(), new Array<number>(k).fill(0));
  if (!coefficients || !coefficients.every(Number.isFinite)) return null;
  let rss = 0;
  for (const [i, yi] of y.entries()) {
    let f = 0;
    for (const [j, column] of columns.entries()) f += coefficients[j]! * column[i]!;
    rss += (yi - f) ** 2;
  }
  return { coefficients, rss };
}

/**
 * `count` values spaced evenly on a log scale from `low` to `high` (both > 0).
 * @example logGrid(1, 100, 3) // → [1, 10, 100]
 */
export function logGrid(low: number, high: number, count: number): number[] {
  if (count === 1) return [Math.sqrt(low * high)];
  const step = Math.log(high / low) / (count - 1);
  return Array.from({ length: count }, (_, i) => low * Math.exp(step * i));
}

/**
 * `count` values spaced evenly from `low` to `high`.
 * @example linearGrid(0, 1, 3) // → [0, 0.5, 1]
 */
export function linearGrid(low: number, high: number, count: number): number[] {
  if (count === 1) return [(low + high) / 2];
  return Array.from({ length: count }, (_, i) => low + ((high - low) * i) / (count - 1));
}

/** Smallest and largest finite value of a list. */
export function range(values: readonly number[]): [number, number] {
  let low = Infinity;
  let high = -Infinity;
  for (const v of values) {
    if (v < low) low = v;
    if (v > high) high = v;
  }
  return [low, high];
}

/**
 * Solve a 3×3 linear system by Cramer's rule; null when the determinant is zero relative
 * to the entries (used only for starting values, where a crude solve is enough).
 * @example solve3([[2, 0, 0], [0, 3, 0], [0, 0, 4]], [2, 3, 4]) // → [1, 1, 1]
 */
export function solve3(a: readonly (readonly number[])[], b: readonly number[]): number[] | null {
  const [row0, row1, row2] = a;
  if (a.length !== 3 || !isTriple(row0) || !isTriple(row1) || !isTriple(row2) || !isTriple(b)) {
    throw new RangeError(`solve3: needs a 3×3 matrix and 3 right-hand sides; got ${a.length} rows of ${a.map((row) => row.length).join(', ')} and ${b.length}`);
  }
  const d = det3(row0, row1, row2);
  const scale = Math.max(...a.flat().map(Math.abs));
  if (!(Math.abs(d) > 1e-13 * scale * scale * scale)) return null;
  // Cramer's rule: column c of the matrix replaced by b.
  const [a00, a01, a02] = row0;
  const [a10, a11, a12] = row1;
  const [a20, a21, a22] = row2;
  const [b0, b1, b2] = b;
  return [
    det3([b0, a01, a02], [b1, a11, a12], [b2, a21, a22]) / d,
    det3([a00, b0, a02], [a10, b1, a12], [a20, b2, a22]) / d,
    det3([a00, a01, b0], [a10, a11, b1], [a20, a21, b2]) / d,
  ];
}

type Triple = readonly [number, number, number];

function isTriple(row: readonly number[] | undefined): row is Triple {
  return row !== undefined && row.length === 3;
}

/** Determinant of the 3×3 matrix with the given rows, by cofactor expansion along the first row. */
function det3([m00, m01, m02]: Triple, [m10, m11, m12]: Triple, [m20, m21, m22]: Triple): number {
  return m00 * (m11 * m22 - m12 * m21) - m01 * (m10 * m22 - m12 * m20) + m02 * (m10 * m21 - m11 * m20);
}

/**
 * Closed-form least squares of y on one basis column g, with or without an intercept:
 * y ≈ a + b·g (intercept) or y ≈ b·g. The same solution as `linearLeastSquares([ones, g], y)`
 * or `linearLeastSquares([g], y)`, by centred sums (simple linear regression, e.g. Draper &
 * Smith, Applied Regression Analysis, 3rd ed., §1.2) instead of a QR factorisation, so a
 * start scan costs a few passes over the data per grid point. RSS by a second pass over
 * the residuals (never negative). Null when g has no spread (is zero without intercept).
 * @example lineOnBasis([0, 1, 2], [1, 3, 5], true) // → { a: 1, b: 2, rss: 0 }
 */
export function lineOnBasis(
  g: ArrayLike<number>,
  y: ArrayLike<number>,
  intercept: boolean,
): { a: number; b: number; rss: number } | null {
  const n = y.length;
  if (g.length !== n) throw new RangeError(`lineOnBasis: the basis has ${g.length} values for ${n} observations`);
  let a = 0;
  let b: number;
  if (intercept) {
    let mg = 0;
    let my = 0;
    for (let i = 0; i < n; i++) {
      mg += g[i]!;
      my += y[i]!;
    }
    mg /= n;
    my /= n;
    let sgg = 0;
    let sgy = 0;
    for (let i = 0; i < n; i++) {
      const dg = g[i]! - mg;
      sgg += dg * dg;
      sgy += dg * (y[i]! - my);
    }
    if (!(sgg > 0)) return null;
    b = sgy / sgg;
    a = my - b * mg;
  } else {
    let sgg = 0;
    let sgy = 0;
    for (let i = 0; i < n; i++) {
      const gi = g[i]!;
      sgg += gi * gi;
      sgy += gi * y[i]!;
    }
    if (!(sgg > 0)) return null;
    b = sgy / sgg;
  }
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const e = y[i]! - a - b * g[i]!;
    rss += e * e;
  }
  if (!Number.isFinite(a) || !Number.isFinite(b) || !Number.isFinite(rss)) return null;
  return { a, b, rss };
}

/** 1 − (√5 − 1)/2: the fraction of an interval taken by a golden-section step. */
const GOLDEN_STEP = (3 - Math.sqrt(5)) / 2;

/**
 * Minimise a function of one variable on [low, high] without derivatives; stops when the
 * minimum is located to within about ±`tolerance` (absolute) and returns the best point
 * evaluated and its value. If the function is not unimodal on the interval the answer is
 * a local minimum (callers keep their grid's best when it is lower). Non-finite values are
 * treated as worse than any finite one.
 * Method: Brent's method, golden-section steps combined with parabolic interpolation
 * (Brent 1973, "Algorithms for Minimization without Derivatives", ch. 5; as in Press et al.,
 * Numerical Recipes, 3rd ed., §10.3), at most 100 evaluations.
 * @example brentMinimise((u) => (u - 2) ** 2, 0, 5, 1e-8) // → { at ≈ 2, value ≈ 0 } in about 5 evaluations
 */
export function brentMinimise(fn: (u: number) => number, low: number, high: number, tolerance: number): { at: number; value: number } {
  const f = (u: number) => {
    const value = fn(u);
    return Number.isNaN(value) ? Infinity : value;
  };
  let a = Math.min(low, high);
  let b = Math.max(low, high);
  let x = a + GOLDEN_STEP * (b - a);
  let w = x;
  let v = x;
  let fx = f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  const tol1 = tolerance;
  const tol2 = 2 * tolerance;
  for (let evaluation = 1; evaluation < 100; evaluation++) {
    const xm = 0.5 * (a + b);
    if (Math.abs(x - xm) <= tol2 - 0.5 * (b - a)) break;
    let golden = true;
    if (Math.abs(e) > tol1) {
      // Parabola through (v, fv), (w, fw), (x, fx).
      const r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      q = Math.abs(q);
      const previous = e;
      e = d;
      if (Number.isFinite(p) && q > 0 && Math.abs(p) < Math.abs(0.5 * q * previous) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = xm - x >= 0 ? tol1 : -tol1;
        golden = false;
      }
    }
    if (golden) {
      e = x >= xm ? a - x : b - x;
      d = GOLDEN_STEP * e;
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d >= 0 ? tol1 : -tol1);
    const fu = f(u);
    if (fu <= fx) {
      if (u >= x) a = x;
      else b = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { at: x, value: fx };
}

/**
 * Solve the symmetric 3×3 system [[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]]·c = b
 * by Cramer's rule without allocating (the same rule and singularity test as `solve3`);
 * writes c into `out` and returns false when the determinant is zero relative to the
 * entries. Used only for starting values.
 * @example solveSymmetric3(2, 0, 0, 3, 0, 4, 2, 3, 4, out) // → true, out = [1, 1, 1]
 */
export function solveSymmetric3(
  a00: number,
  a01: number,
  a02: number,
  a11: number,
  a12: number,
  a22: number,
  b0: number,
  b1: number,
  b2: number,
  out: Float64Array,
): boolean {
  const m11 = a11 * a22 - a12 * a12;
  const m12 = a01 * a22 - a12 * a02;
  const m13 = a01 * a12 - a11 * a02;
  const det = a00 * m11 - a01 * m12 + a02 * m13;
  const scale = Math.max(Math.abs(a00), Math.abs(a01), Math.abs(a02), Math.abs(a11), Math.abs(a12), Math.abs(a22));
  if (!(Math.abs(det) > 1e-13 * scale * scale * scale)) return false;
  out[0] = (b0 * m11 - a01 * (b1 * a22 - a12 * b2) + a02 * (b1 * a12 - a11 * b2)) / det;
  out[1] = (a00 * (b1 * a22 - a12 * b2) - b0 * m12 + a02 * (a01 * b2 - b1 * a02)) / det;
  out[2] = (a00 * (a11 * b2 - b1 * a12) - a01 * (a01 * b2 - b1 * a02) + b0 * m13) / det;
  return true;
}

/**
 * The common step Δ > 0 when t_0 < t_1 < … are evenly spaced and increasing
 * (|t_i − (t_0 + i·Δ)| ≤ 1e-9·(t_last − t_0) for every i, at least 3 points), else null.
 * Used to build decays by recurrence.
 * @example evenStep([0, 4.5, 9, 13.5]) // → 4.5; evenStep([0, 1, 3]) // → null
 */
export function evenStep(t: readonly number[]): number | null {
  const n = t.length;
  const first = t[0];
  const last = t[n - 1];
  if (n < 3 || first === undefined || last === undefined) return null;
  const span = last - first;
  const step = span / (n - 1);
  if (!(step > 0) || !Number.isFinite(step)) return null;
  const slack = 1e-9 * span;
  for (let i = 1; i < n - 1; i++) if (!(Math.abs(t[i]! - (first + i * step)) <= slack)) return null;
  return step;
}

/**
 * exp(−k·t_i) for every t_i, written into `out`. With `step` from evenStep the values are
 * built by the recurrence e_{i+1} = e_i·exp(−k·Δ) (two calls to exp instead of one per
 * point); the relative error then grows to about i·ε (≈ 1e-13 at 400 points), ample for
 * starting values; without it, Math.exp per point.
 * @example decayInto([0, 1, 2], 0.5, 1, out) // out → [1, 0.60653, 0.36788]
 */
export function decayInto(t: readonly number[], k: number, step: number | null, out: Float64Array): void {
  const n = t.length;
  if (step === null) {
    for (let i = 0; i < n; i++) out[i] = Math.exp(-k * t[i]!);
    return;
  }
  const first = t[0];
  if (first === undefined) return;
  const q = Math.exp(-k * step);
  let e = Math.exp(-k * first);
  for (let i = 0; i < n; i++) {
    out[i] = e;
    e *= q;
  }
}

/**
 * Σ_i exp(−s·t_i) over n evenly spaced times t_i = t_0 + i·Δ in closed form: the geometric
 * series exp(−s·t_0)·(1 − exp(−n·s·Δ))/(1 − exp(−s·Δ)), both differences by expm1 so that
 * slow decays (s·Δ ≪ 1) keep their digits; n when s = 0. Lets a start scan form its Gram
 * sums (Σe_a, Σe_a·e_b = Σexp(−(k_a + k_b)·t)) without a pass over the data.
 * @example geometricDecaySum(0.5, 0, 1, 3) // → 1 + e^−0.5 + e^−1 = 1.974410
 */
export function geometricDecaySum(s: number, t0: number, step: number, n: number): number {
  if (s === 0) return n;
  return Math.exp(-s * t0) * (Math.expm1(-n * s * step) / Math.expm1(-s * step));
}
