/**
 * Small dense linear algebra for the nonlinear least-squares solver: Householder QR
 * least squares (with an optional diagonal damping block) and the inverse of RᵀR.
 *
 * Why QR and not the normal equations: forming JᵀJ squares the condition number,
 * which costs digits on ill-conditioned problems such as NIST MGH09; solving the
 * augmented system [J; √λ·D^½]·δ ≈ [−r; 0] by QR keeps them (Nocedal & Wright,
 * Numerical Optimization, 2nd ed., §10.3; Moré 1978, "The Levenberg–Marquardt
 * algorithm: implementation and theory", LNM 630).
 *
 * Matrices are arrays of rows (number[][]); sizes here are small (points × ≤ 6).
 */

/**
 * Householder QR factorisation of an m×k matrix (m ≥ k), applied at the same time to a
 * right-hand side. Returns the k×k upper triangle R and Qᵀb (first k entries), or the
 * diagonal of R containing a zero when the matrix is rank-deficient.
 *
 * Method: Householder reflections, column by column (Golub & Van Loan, Matrix
 * Computations, 4th ed., Algorithm 5.2.1), no pivoting.
 * @example householderQr([[3],[4]], [1, 2]) // → R = [[-5]], qtb = [-2.2]
 */
export function householderQr(
  a: readonly (readonly number[])[],
  b: readonly number[],
): { r: number[][]; qtb: number[] } {
  const m = a.length;
  const k = m > 0 ? a[0].length : 0;
  // Work on contiguous columns (faster than rows for column-wise reflections).
  const cols: Float64Array[] = [];
  for (let c = 0; c < k; c++) {
    const col = new Float64Array(m);
    for (let i = 0; i < m; i++) col[i] = a[i][c];
    cols.push(col);
  }
  const rhs = Float64Array.from(b);
  const v = new Float64Array(m);
  for (let j = 0; j < k; j++) {
    const x = cols[j];
    let norm = 0;
    for (let i = j; i < m; i++) norm = Math.hypot(norm, x[i]);
    if (norm === 0) continue;
    const alpha = x[j] > 0 ? -norm : norm;
    // v = x − alpha·e1 (entries j..m−1).
    let vv = 0;
    for (let i = j; i < m; i++) {
      v[i] = x[i];
      if (i === j) v[i] -= alpha;
      vv += v[i] * v[i];
    }
    if (vv === 0) continue;
    for (let c = j; c < k; c++) {
      const col = cols[c];
      let dot = 0;
      for (let i = j; i < m; i++) dot += v[i] * col[i];
      const s = (2 * dot) / vv;
      for (let i = j; i < m; i++) col[i] -= s * v[i];
    }
    let dotB = 0;
    for (let i = j; i < m; i++) dotB += v[i] * rhs[i];
    const sB = (2 * dotB) / vv;
    for (let i = j; i < m; i++) rhs[i] -= sB * v[i];
  }
  const r: number[][] = [];
  for (let i = 0; i < k; i++) {
    const row = new Array(k).fill(0);
    for (let c = i; c < k; c++) row[c] = cols[c][i];
    r.push(row);
  }
  return { r, qtb: Array.from(rhs.subarray(0, k)) };
}

/**
 * Solve the upper-triangular system R·x = b by back substitution; null if a diagonal entry is 0.
 * @example solveUpper([[2, 1], [0, 4]], [5, 8]) // → [1.5, 2]
 */
export function solveUpper(r: readonly (readonly number[])[], b: readonly number[]): number[] | null {
  const k = b.length;
  const x = new Array(k).fill(0);
  for (let i = k - 1; i >= 0; i--) {
    if (r[i][i] === 0 || !Number.isFinite(r[i][i])) return null;
    let s = b[i];
    for (let c = i + 1; c < k; c++) s -= r[i][c] * x[c];
    x[i] = s / r[i][i];
  }
  return x;
}

/**
 * Least-squares solution of min ‖A·x − b‖² + Σ d_j²·x_j², by QR of the augmented matrix
 * [A; diag(d)]. With d = 0 this is ordinary least squares. Returns null when singular.
 * @example dampedLeastSquares([[1],[1]], [1, 3], [0]) // → [2]
 */
export function dampedLeastSquares(
  a: readonly (readonly number[])[],
  b: readonly number[],
  d: readonly number[],
): number[] | null {
  const k = d.length;
  const rows: (readonly number[])[] = a.slice();
  const rhs = b.slice();
  for (let j = 0; j < k; j++) {
    if (d[j] === 0) continue;
    const row = new Array(k).fill(0);
    row[j] = d[j];
    rows.push(row);
    rhs.push(0);
  }
  if (rows.length < k) return null;
  const { r, qtb } = householderQr(rows, rhs);
  return solveUpper(r, qtb);
}

/**
 * (AᵀA)⁻¹ from the QR factor of A, with columns scaled to unit norm first (Jacobi
 * scaling) so that the conditioning estimate measures collinearity, not units.
 * Returns the inverse and the estimated condition number of the scaled A (ratio of
 * largest to smallest |R_jj|, a lower bound on the 2-norm condition number).
 * Returns null when a column is zero or R is singular.
 * @example inverseNormalMatrix([[1, 0], [0, 2], [0, 0]]) // → inverse [[1, 0], [0, 0.25]], condition 1
 */
export function inverseNormalMatrix(
  a: readonly (readonly number[])[],
): { inverse: number[][]; condition: number } | null {
  const m = a.length;
  const k = m > 0 ? a[0].length : 0;
  if (m < k) return null;
  const scale = new Array(k).fill(0);
  for (let j = 0; j < k; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s = Math.hypot(s, a[i][j]);
    if (s === 0 || !Number.isFinite(s)) return null;
    scale[j] = s;
  }
  const scaled = a.map((row) => row.map((v, j) => v / scale[j]));
  const { r } = householderQr(scaled, new Array(m).fill(0));
  let maxDiag = 0;
  let minDiag = Infinity;
  for (let j = 0; j < k; j++) {
    const d = Math.abs(r[j][j]);
    maxDiag = Math.max(maxDiag, d);
    minDiag = Math.min(minDiag, d);
  }
  if (minDiag === 0) return null;
  // R⁻¹ column by column, then (RᵀR)⁻¹ = R⁻¹·R⁻ᵀ.
  const rInv: number[][] = [];
  for (let j = 0; j < k; j++) rInv.push(new Array(k).fill(0));
  for (let c = 0; c < k; c++) {
    const e = new Array(k).fill(0);
    e[c] = 1;
    const col = solveUpper(r, e);
    if (!col) return null;
    for (let i = 0; i < k; i++) rInv[i][c] = col[i];
  }
  const inverse: number[][] = [];
  for (let i = 0; i < k; i++) {
    const row = new Array(k).fill(0);
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = Math.max(i, j); l < k; l++) s += rInv[i][l] * rInv[j][l];
      row[j] = s / (scale[i] * scale[j]);
    }
    inverse.push(row);
  }
  return { inverse, condition: maxDiag / minDiag };
}
