/**
 * Helpers for data-driven starting values.
 *
 * Method: "variable projection" for starting values (Golub & Pereyra 1973, SIAM J Numer
 * Anal 10:413; Golub & Pereyra 2003, Inverse Problems 19:R1): for a model that is linear
 * in some parameters once the nonlinear ones are fixed, scan the nonlinear ones over a
 * grid, solve the linear ones by least squares at each grid point, and keep the grid
 * point with the lowest residual sum of squares. No user guess is needed and the scan
 * cannot diverge.
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
  if (n < k) return null;
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) rows.push(columns.map((c) => c[i]));
  const coefficients = dampedLeastSquares(rows, y.slice(), new Array(k).fill(0));
  if (!coefficients || !coefficients.every(Number.isFinite)) return null;
  let rss = 0;
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < k; j++) f += coefficients[j] * columns[j][i];
    rss += (y[i] - f) ** 2;
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
  const det = (m: readonly (readonly number[])[]) =>
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
    m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
    m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
  const d = det(a);
  const scale = Math.max(...a.flat().map(Math.abs));
  if (!(Math.abs(d) > 1e-13 * scale * scale * scale)) return null;
  const out: number[] = [];
  for (let c = 0; c < 3; c++) {
    const m = a.map((row, i) => row.map((v, j) => (j === c ? b[i] : v)));
    out.push(det(m) / d);
  }
  return out;
}
