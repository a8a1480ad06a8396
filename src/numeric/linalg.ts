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
 * Matrices are arrays of rows (number[][]) in the convenience functions, and flat
 * Float64Arrays stored column by column in the in-place routines the solver's inner loop
 * uses (no allocation per iteration); sizes here are small (points × ≤ 6).
 *
 * Sizes are checked once on entry (a RangeError names the routine and the sizes), so every
 * index inside the loops is in range; the `!` on those reads records that, at no cost.
 */

/** Throws a RangeError naming the routine when a buffer is shorter than the sizes need. */
function needLength(routine: string, name: string, buffer: ArrayLike<number>, needed: number): void {
  if (buffer.length < needed) throw new RangeError(`${routine}: ${name} has ${buffer.length} entries, needs at least ${needed}`);
}

/**
 * An m×k matrix given as rows (k = length of the first row) copied column by column into a
 * Float64Array (cols[c·m + i] = A[i][c]); throws a RangeError when a row has another length.
 */
function columnsOf(routine: string, a: readonly (readonly number[])[]): { cols: Float64Array; m: number; k: number } {
  const m = a.length;
  const k = a[0]?.length ?? 0;
  const cols = new Float64Array(m * k);
  for (const [i, row] of a.entries()) {
    if (row.length !== k) throw new RangeError(`${routine}: row ${i} has ${row.length} entries where row 0 has ${k}`);
    for (const [c, v] of row.entries()) cols[c * m + i] = v;
  }
  return { cols, m, k };
}

/** The k×k upper triangle R held in the first k rows of a column-stored m×k factor, as rows (zeros below the diagonal). */
function upperRows(factor: Float64Array, m: number, k: number): number[][] {
  const r: number[][] = [];
  for (let i = 0; i < k; i++) {
    const row = new Array<number>(k).fill(0);
    for (let c = i; c < k; c++) row[c] = factor[c * m + i]!;
    r.push(row);
  }
  return r;
}

/**
 * Entry (i, j) of a matrix given as rows; a RangeError when there is none (a caller's mistake),
 * never undefined.
 * @example entry([[1, 2], [3, 4]], 1, 0) // → 3
 */
export function entry(matrix: readonly (readonly number[])[], i: number, j: number): number {
  const value = matrix[i]?.[j];
  if (value === undefined) throw new RangeError(`entry (${i}, ${j}) is outside the matrix (${matrix.length} rows, row ${i} has ${matrix[i]?.length ?? 'none'})`);
  return value;
}

/**
 * Householder QR factorisation of an m×k matrix (m ≥ k), applied at the same time to a
 * right-hand side. Returns the k×k upper triangle R and Qᵀb (first k entries), or the
 * diagonal of R containing a zero when the matrix is rank-deficient.
 *
 * Method: Householder reflections, column by column (Golub & Van Loan, Matrix
 * Computations, 4th ed., Algorithm 5.2.1), no pivoting; a wrapper around
 * `householderQrInPlace` for arrays of rows.
 * @example householderQr([[3],[4]], [1, 2]) // → R = [[-5]], qtb = [-2.2]
 */
export function householderQr(
  a: readonly (readonly number[])[],
  b: readonly number[],
): { r: number[][]; qtb: number[] } {
  const { cols, m, k } = columnsOf('householderQr', a);
  if (b.length !== m) throw new RangeError(`householderQr: the right-hand side has ${b.length} entries for ${m} rows`);
  const rhs = Float64Array.from(b);
  householderQrInPlace(cols, m, k, rhs);
  return { r: upperRows(cols, m, k), qtb: Array.from(rhs.subarray(0, k)) };
}
/**
 * Euclidean norm of v[from..to) without overflow or harmful underflow: the entries are
 * scaled by the largest magnitude first (the two-pass form of LAPACK's dnrm2 idea;
 * Blue 1978, ACM TOMS 4:15, in its simplest variant).
 * @example scaledNorm(Float64Array.of(3, 4), 0, 2) // → 5
 */
export function scaledNorm(v: Float64Array, from: number, to: number): number {
  if (from < 0) throw new RangeError(`scaledNorm: the range starts at ${from}`);
  needLength('scaledNorm', 'the vector', v, to);
  let big = 0;
  for (let i = from; i < to; i++) {
    const a = Math.abs(v[i]!);
    if (a > big) big = a;
  }
  if (big === 0 || !Number.isFinite(big)) return big;
  let s = 0;
  for (let i = from; i < to; i++) {
    const a = v[i]! / big;
    s += a * a;
  }
  return big * Math.sqrt(s);
}

/** A plain sum of squares strictly inside (1e-290, 1e300) lost nothing to overflow and nothing that matters to underflow; outside it the scaled norm is used. */
const SAFE_SQUARES_LOW = 1e-290;
const SAFE_SQUARES_HIGH = 1e300;

/**
 * In-place Householder QR of an m×k matrix stored column by column in `a`
 * (a[c·m + i] = A[i][c]), applied at the same time to `b` (length m). Afterwards the upper
 * triangle R sits in a[c·m + i] for i ≤ c, and b[0..k) holds the first k entries of Qᵀb.
 * Entries below the diagonal are left as scratch. A column whose remaining part is zero is
 * skipped (its R_jj is then 0: rank-deficient).
 *
 * Method: Householder reflections column by column (Golub & Van Loan, Matrix Computations,
 * 4th ed., Algorithm 5.2.1), no pivoting, each reflector scaled by the column norm so that
 * any finite column factors without overflow; on a flat Float64Array with no allocation,
 * for the solver's inner loop (`householderQr` is the wrapper for arrays of rows).
 * @example
 * const a = Float64Array.of(3, 4); const b = Float64Array.of(1, 2);
 * householderQrInPlace(a, 2, 1, b) // → a[0] = −5 (R), b[0] = −2.2 (Qᵀb)
 */
export function householderQrInPlace(a: Float64Array, m: number, k: number, b: Float64Array): void {
  needLength('householderQrInPlace', 'the matrix', a, m * k);
  needLength('householderQrInPlace', 'the right-hand side', b, m);
  for (let j = 0; j < k; j++) {
    const xo = j * m;
    // ‖x‖ by a plain sum of squares; the scaled two-pass norm only when that over- or underflows.
    let squares = 0;
    for (let i = j; i < m; i++) {
      const x = a[xo + i]!;
      squares += x * x;
    }
    const norm = squares > SAFE_SQUARES_LOW && squares < SAFE_SQUARES_HIGH ? Math.sqrt(squares) : scaledNorm(a, xo + j, xo + m);
    if (norm === 0) continue;
    const xj = a[xo + j]!;
    const alpha = xj > 0 ? -norm : norm;
    // Reflector u = (x − alpha·e1)/norm (entries j..m−1), held in place of x below the
    // diagonal, u_j separately; dividing by the norm keeps every product finite for any
    // finite column. ‖u‖² = 2·(1 + |x_j|/norm), as alpha = −sign(x_j)·norm.
    const inv = 1 / norm;
    const uj = xj * inv - alpha * inv;
    const halfUu = 1 + Math.abs(xj) * inv;
    for (let i = j + 1; i < m; i++) a[xo + i]! *= inv;
    // Columns two at a time: one pass for both dot products and one for both updates (each
    // dot still adds its terms in order, each entry gets the same update: identical results).
    let c = j + 1;
    for (; c + 1 < k; c += 2) {
      const c0 = c * m;
      const c1 = c0 + m;
      let dot0 = uj * a[c0 + j]!;
      let dot1 = uj * a[c1 + j]!;
      for (let i = j + 1; i < m; i++) {
        const u = a[xo + i]!;
        dot0 += u * a[c0 + i]!;
        dot1 += u * a[c1 + i]!;
      }
      const s0 = dot0 / halfUu;
      const s1 = dot1 / halfUu;
      a[c0 + j]! -= s0 * uj;
      a[c1 + j]! -= s1 * uj;
      for (let i = j + 1; i < m; i++) {
        const u = a[xo + i]!;
        a[c0 + i]! -= s0 * u;
        a[c1 + i]! -= s1 * u;
      }
    }
    for (; c < k; c++) {
      const co = c * m;
      let dot = uj * a[co + j]!;
      for (let i = j + 1; i < m; i++) dot += a[xo + i]! * a[co + i]!;
      const s = dot / halfUu;
      a[co + j]! -= s * uj;
      for (let i = j + 1; i < m; i++) a[co + i]! -= s * a[xo + i]!;
    }
    let dotB = uj * b[j]!;
    for (let i = j + 1; i < m; i++) dotB += a[xo + i]! * b[i]!;
    const sB = dotB / halfUu;
    b[j]! -= sB * uj;
    for (let i = j + 1; i < m; i++) b[i]! -= sB * a[xo + i]!;
    // The column itself becomes alpha·e1.
    a[xo + j] = alpha;
  }
}

/**
 * Given the QR factor of A (upper triangle R of a k×k block stored column by column with
 * leading dimension `ld`, and qtb = first k entries of Qᵀb), solve
 * min ‖A·x − b‖² + Σ d_j²·x_j² without refactoring A: the rows diag(d) are rotated into R
 * by Givens rotations, one damping row at a time, then back substitution. Writes x into
 * `out` and returns true, or returns false when the damped triangle is singular.
 *
 * Method: the "qrsolv" step of MINPACK's lmpar (Moré 1978, LNM 630, §3; Moré, Garbow &
 * Hillstrom 1980, ANL-80-74), without column pivoting: QR([A; D]) = QR([R; D]) since
 * Qᵀ maps A to [R; 0], so each Levenberg–Marquardt trial costs O(k³), not O(m·k²).
 * `work` must hold at least k·k + 2k numbers.
 * @example
 * // A = [[1],[1]], b = [1, 3]: R = [[−√2]], qtb = [−2√2]; with d = [0] → x = [2]
 * dampedSolveFromQr(Float64Array.of(-Math.SQRT2), 1, 1, Float64Array.of(-2 * Math.SQRT2), Float64Array.of(0), out, work) // out[0] → 2
 */
export function dampedSolveFromQr(
  r: Float64Array,
  ld: number,
  k: number,
  qtb: Float64Array,
  d: Float64Array,
  out: Float64Array,
  work: Float64Array,
): boolean {
  needLength('dampedSolveFromQr', 'R', r, k > 0 ? (k - 1) * ld + k : 0);
  needLength('dampedSolveFromQr', 'qtb', qtb, k);
  needLength('dampedSolveFromQr', 'd', d, k);
  needLength('dampedSolveFromQr', 'out', out, k);
  needLength('dampedSolveFromQr', 'work', work, k * k + 2 * k);
  // s: k×k upper triangle row-major copy of R; z: right-hand side; w: the damping row.
  const s = work;
  const z = k * k;
  const w = z + k;
  for (let i = 0; i < k; i++) {
    for (let c = 0; c < k; c++) s[i * k + c] = c >= i ? r[c * ld + i]! : 0;
    work[z + i] = qtb[i]!;
  }
  for (let j = 0; j < k; j++) {
    const dj = d[j]!;
    if (dj === 0) continue;
    for (let c = 0; c < k; c++) work[w + c] = 0;
    work[w + j] = dj;
    let wRhs = 0;
    for (let l = j; l < k; l++) {
      const wl = work[w + l]!;
      if (wl === 0) continue;
      const sll = s[l * k + l]!;
      // Givens rotation zeroing w_l against s_ll.
      let cos: number;
      let sin: number;
      if (Math.abs(sll) < Math.abs(wl)) {
        const cot = sll / wl;
        sin = 1 / Math.sqrt(1 + cot * cot);
        cos = sin * cot;
      } else {
        const tan = wl / sll;
        cos = 1 / Math.sqrt(1 + tan * tan);
        sin = cos * tan;
      }
      for (let c = l; c < k; c++) {
        const a = s[l * k + c]!;
        const b = work[w + c]!;
        s[l * k + c] = cos * a + sin * b;
        work[w + c] = -sin * a + cos * b;
      }
      const zl = work[z + l]!;
      work[z + l] = cos * zl + sin * wRhs;
      wRhs = -sin * zl + cos * wRhs;
    }
  }
  for (let i = k - 1; i >= 0; i--) {
    const dii = s[i * k + i]!;
    if (dii === 0 || !Number.isFinite(dii)) return false;
    let acc = work[z + i]!;
    for (let c = i + 1; c < k; c++) acc -= s[i * k + c]! * out[c]!;
    out[i] = acc / dii;
  }
  return true;
}

/**
 * Solve the upper-triangular system R·x = b by back substitution; null if a diagonal entry is
 * 0 or not finite. R must have at least b.length rows of at least b.length entries (RangeError otherwise).
 * @example solveUpper([[2, 1], [0, 4]], [5, 8]) // → [1.5, 2]
 */
export function solveUpper(r: readonly (readonly number[])[], b: readonly number[]): number[] | null {
  const k = b.length;
  const x = new Array<number>(k).fill(0);
  for (let i = k - 1; i >= 0; i--) {
    const row = r[i];
    if (!row || row.length < k) throw new RangeError(`solveUpper: R needs ${k} rows of ${k} entries; row ${i} has ${row ? row.length : 'none'}`);
    const rii = row[i]!;
    if (rii === 0 || !Number.isFinite(rii)) return null;
    let s = b[i]!;
    for (let c = i + 1; c < k; c++) s -= row[c]! * x[c]!;
    x[i] = s / rii;
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
  for (const [j, dj] of d.entries()) {
    if (dj === 0) continue;
    const row = new Array<number>(k).fill(0);
    row[j] = dj;
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
  const { cols, m, k } = columnsOf('inverseNormalMatrix', a);
  return inverseNormalMatrixColumns(cols, m, k);
}

/**
 * `inverseNormalMatrix` for an m×k matrix stored column by column (a[c·m + i] = A[i][c]);
 * `a` is left unchanged. Same method and result.
 * @example inverseNormalMatrixColumns(Float64Array.of(1, 0, 0, 0, 2, 0), 3, 2) // → inverse [[1, 0], [0, 0.25]], condition 1
 */
export function inverseNormalMatrixColumns(
  a: Float64Array,
  m: number,
  k: number,
): { inverse: number[][]; condition: number } | null {
  if (m < k) return null;
  needLength('inverseNormalMatrixColumns', 'the matrix', a, m * k);
  const scale = new Float64Array(k);
  const scaled = new Float64Array(m * k);
  for (let j = 0; j < k; j++) {
    const s = scaledNorm(a, j * m, (j + 1) * m);
    if (s === 0 || !Number.isFinite(s)) return null;
    scale[j] = s;
    for (let i = 0; i < m; i++) scaled[j * m + i] = a[j * m + i]! / s;
  }
  householderQrInPlace(scaled, m, k, new Float64Array(m));
  const r = upperRows(scaled, m, k);
  let maxDiag = 0;
  let minDiag = Infinity;
  for (const [j, row] of r.entries()) {
    const d = Math.abs(row[j]!);
    maxDiag = Math.max(maxDiag, d);
    minDiag = Math.min(minDiag, d);
  }
  if (minDiag === 0) return null;
  // R⁻¹ column by column (R·x = e_c), then (RᵀR)⁻¹ = R⁻¹·R⁻ᵀ: entry (i, j) sums R⁻¹[i][l]·R⁻¹[j][l].
  const rInvColumns: number[][] = [];
  for (let c = 0; c < k; c++) {
    const e = new Array<number>(k).fill(0);
    e[c] = 1;
    const col = solveUpper(r, e);
    if (!col) return null;
    rInvColumns.push(col);
  }
  const inverse: number[][] = [];
  for (let i = 0; i < k; i++) {
    const row = new Array<number>(k).fill(0);
    const scaleI = scale[i]!;
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let l = Math.max(i, j); l < k; l++) {
        const column = rInvColumns[l]!;
        s += column[i]! * column[j]!;
      }
      row[j] = s / (scaleI * scale[j]!);
    }
    inverse.push(row);
  }
  return { inverse, condition: maxDiag / minDiag };
}
