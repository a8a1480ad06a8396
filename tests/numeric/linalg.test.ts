/**
 * Linear algebra of the solver's inner loop: the in-place QR, the damped solve that
 * rotates damping rows into R (MINPACK qrsolv, Moré 1978), the scaled norm, and the
 * column-stored inverse of the normal matrix. Each fast routine is checked against the
 * plain augmented-QR routine it replaces on the same inputs ("computed from the same
 * inputs", common practice, no source) and against exact identities.
 */
import { describe, expect, it } from 'vitest';
import {
  dampedLeastSquares,
  dampedSolveFromQr,
  householderQr,
  householderQrInPlace,
  inverseNormalMatrix,
  inverseNormalMatrixColumns,
  scaledNorm,
  solveUpper,
} from '../../src/numeric/linalg.js';
import { createRandom } from '../../src/stats/random.js';
import { at, entry } from './checked.js';

const relative = (got: number, want: number) => Math.abs(got - want) / Math.max(Math.abs(want), 1e-300);

function randomMatrix(seed: number, m: number, k: number): number[][] {
  const random = createRandom(seed);
  return Array.from({ length: m }, () => Array.from({ length: k }, () => random.normal(0, 1)));
}

function columns(a: number[][]): Float64Array {
  const m = a.length;
  const k = a[0]?.length ?? 0;
  const out = new Float64Array(m * k);
  a.forEach((row, i) => row.forEach((v, c) => (out[c * m + i] = v)));
  return out;
}

/** QR once, then the damped solve for the given d; null when singular. */
function viaQr(a: number[][], b: number[], d: number[]): number[] | null {
  const m = a.length;
  const k = d.length;
  const qr = columns(a);
  const rhs = Float64Array.from(b);
  householderQrInPlace(qr, m, k, rhs);
  const out = new Float64Array(k);
  return dampedSolveFromQr(qr, m, k, rhs, Float64Array.from(d), out, new Float64Array(k * k + 2 * k)) ? Array.from(out) : null;
}

describe('scaledNorm (exact identities)', () => {
  it('3-4-5 at ordinary, huge and tiny scales, without overflow or underflow', () => {
    expect(scaledNorm(Float64Array.of(3, 4), 0, 2)).toBe(5);
    expect(relative(scaledNorm(Float64Array.of(3e200, 4e200), 0, 2), 5e200)).toBeLessThan(1e-15);
    expect(relative(scaledNorm(Float64Array.of(3e-200, 4e-200), 0, 2), 5e-200)).toBeLessThan(1e-15);
    expect(scaledNorm(Float64Array.of(0, 0), 0, 2)).toBe(0);
    expect(scaledNorm(Float64Array.of(9, 3, 4), 1, 3)).toBe(5);
  });
});

describe('householderQrInPlace', () => {
  it('doc example: [3; 4] → R = −5, Qᵀb = −2.2 (hand computation)', () => {
    const a = Float64Array.of(3, 4);
    const b = Float64Array.of(1, 2);
    householderQrInPlace(a, 2, 1, b);
    expect(a[0]).toBeCloseTo(-5, 14);
    expect(b[0]).toBeCloseTo(-2.2, 14);
  });

  it('RᵀR = AᵀA and the wrapper householderQr agrees (computed from the same inputs)', () => {
    const a = randomMatrix(11, 40, 5);
    const qr = columns(a);
    householderQrInPlace(qr, 40, 5, new Float64Array(40));
    const { r } = householderQr(a, new Array(40).fill(0));
    for (let i = 0; i < 5; i++) {
      for (let j = 0; j < 5; j++) {
        let ata = 0;
        let rtr = 0;
        for (let l = 0; l < 40; l++) ata += entry(a, l, i) * entry(a, l, j);
        for (let l = 0; l <= Math.min(i, j); l++) rtr += at(qr, i * 40 + l) * at(qr, j * 40 + l);
        expect(Math.abs(rtr - ata)).toBeLessThan(1e-12 * 40);
        if (j >= i) expect(entry(r, i, j)).toBe(at(qr, j * 40 + i));
      }
    }
  });

  it('columns near 1e200 and 1e-200 factor without overflow (|R₀₀| = column norm)', () => {
    const big = Float64Array.of(3e200, 4e200);
    householderQrInPlace(big, 2, 1, new Float64Array(2));
    expect(relative(Math.abs(at(big, 0)), 5e200)).toBeLessThan(1e-15);
    const tiny = Float64Array.of(3e-200, 4e-200);
    householderQrInPlace(tiny, 2, 1, new Float64Array(2));
    expect(relative(Math.abs(at(tiny, 0)), 5e-200)).toBeLessThan(1e-15);
  });
});

describe('dampedSolveFromQr equals the augmented QR of [A; diag(d)]', () => {
  it('doc example: A = [1; 1], b = [1, 3], d = 0 → x = 2', () => {
    expect(at(viaQr([[1], [1]], [1, 3], [0])!, 0)).toBeCloseTo(2, 14);
  });

  it.each([
    { seed: 1, m: 12, k: 3, d: [0, 0, 0] },
    { seed: 2, m: 400, k: 5, d: [0.1, 2, 0, 1e-4, 30] },
    { seed: 3, m: 9, k: 4, d: [1e-8, 1e-8, 1e-8, 1e-8] },
    { seed: 4, m: 24, k: 3, d: [1e3, 1e3, 1e3] },
  ])('seed $seed, $m × $k', ({ seed, m, k, d }) => {
    const a = randomMatrix(seed, m, k);
    const b = randomMatrix(seed + 100, m, 1).map((row) => at(row, 0));
    const want = dampedLeastSquares(a, b, d)!;
    const got = viaQr(a, b, d)!;
    expect(got).toHaveLength(want.length);
    got.forEach((v, j) => expect(Math.abs(v - at(want, j))).toBeLessThan(1e-11 * Math.max(1, Math.abs(at(want, j)))));
  });

  it('a zero column is solvable with damping and singular without', () => {
    const a = [
      [1, 0],
      [2, 0],
      [3, 0],
    ];
    const b = [1, 2, 3];
    expect(viaQr(a, b, [0, 0])).toBeNull();
    const damped = viaQr(a, b, [0, 1])!;
    const want = dampedLeastSquares(a, b, [0, 1])!;
    expect(damped[0]).toBeCloseTo(at(want, 0), 14);
    expect(damped[1]).toBe(0);
  });
});

describe('inverseNormalMatrixColumns', () => {
  it('doc example and agreement with the row version (computed from the same inputs)', () => {
    const doc = inverseNormalMatrixColumns(Float64Array.of(1, 0, 0, 0, 2, 0), 3, 2)!;
    expect(entry(doc.inverse, 0, 0)).toBeCloseTo(1, 14);
    expect(entry(doc.inverse, 1, 1)).toBeCloseTo(0.25, 14);
    expect(entry(doc.inverse, 0, 1)).toBeCloseTo(0, 14);
    expect(doc.condition).toBeCloseTo(1, 14);
    const a = randomMatrix(7, 30, 4);
    const rows = inverseNormalMatrix(a)!;
    const cols = inverseNormalMatrixColumns(columns(a), 30, 4)!;
    expect(cols.condition).toBe(rows.condition);
    cols.inverse.forEach((row, i) => row.forEach((v, j) => expect(v).toBe(entry(rows.inverse, i, j))));
  });

  it('is null for a zero column', () => {
    expect(inverseNormalMatrixColumns(Float64Array.of(1, 2, 0, 0), 2, 2)).toBeNull();
  });
});

describe('householderQrInPlace: columns updated two at a time', () => {
  it('gives exactly the R and Qᵀb of one column at a time (5 columns: a pair, a pair, a single)', () => {
    const random = createRandom(7);
    const m = 9;
    const k = 5;
    const a = Float64Array.from({ length: m * k }, () => random.normal(0, 1));
    const b = Float64Array.from({ length: m }, () => random.normal(0, 1));
    householderQrInPlace(a, m, k, b);
    const r: number[] = [];
    for (let c = 0; c < k; c++) for (let i = 0; i <= c; i++) r.push(at(a, c * m + i));
    // Regression pin: output of the one-column-at-a-time implementation (commit 7e6da64), recorded;
    // each dot product still adds its terms in the same order, so no bit may change.
    expect(r).toEqual([
      -3.2117570378675735, -0.8526722431465099, -2.34035190007145, -0.482564000780632, 0.48165714813875193, -1.2550067252238661, -1.7919436265417965,
      -0.03853280350165866, 0.3862540272487811, 2.055091921185911, 0.6046007032055265, 1.0154940897270843, -0.7608574255991958, -0.8593231980197524,
      -1.7938826258414484,
    ]);
    expect(Array.from(b.subarray(0, k))).toEqual([-1.0739512300118188, -0.11274745440966738, 0.678946622671385, -0.6562811088064702, 0.1161746434856663]);
  });
});

describe('sizes that do not fit are refused (a RangeError naming the routine, not NaN)', () => {
  it('ragged rows', () => {
    expect(() => householderQr([[1, 2], [3]], [1, 2])).toThrow(/householderQr: row 1 has 1 entries where row 0 has 2/);
    expect(() => inverseNormalMatrix([[1, 2], [3, 4, 5]])).toThrow(/inverseNormalMatrix: row 1 has 3 entries/);
    expect(() => dampedLeastSquares([[1, 2], [3, 4], [5, 6]], [1, 2, 3], [0, 0, 1])).toThrow(/row 3 has 3 entries where row 0 has 2/);
    expect(solveUpper([[2, 1], [0, 4]], [5, 8])).toEqual([1.5, 2]);
    expect(() => solveUpper([[2, 1]], [5, 8])).toThrow(/solveUpper: R needs 2 rows of 2 entries; row 1 has none/);
    expect(() => solveUpper([[2, 1], [4]], [5, 8])).toThrow(/solveUpper: R needs 2 rows of 2 entries; row 1 has 1/);
  });
  it('a right-hand side or buffer shorter than the sizes given', () => {
    expect(() => householderQr([[1], [2]], [1])).toThrow(/householderQr: the right-hand side has 1 entries for 2 rows/);
    expect(() => householderQrInPlace(new Float64Array(5), 3, 2, new Float64Array(3))).toThrow(/householderQrInPlace: the matrix has 5 entries, needs at least 6/);
    expect(() => householderQrInPlace(new Float64Array(6), 3, 2, new Float64Array(2))).toThrow(/householderQrInPlace: the right-hand side has 2 entries, needs at least 3/);
    const r = Float64Array.of(1, 0, 0, 1);
    expect(() => dampedSolveFromQr(r, 2, 2, new Float64Array(2), new Float64Array(2), new Float64Array(2), new Float64Array(7))).toThrow(/dampedSolveFromQr: work has 7 entries, needs at least 8/);
    expect(() => dampedSolveFromQr(r, 2, 2, new Float64Array(2), new Float64Array(1), new Float64Array(2), new Float64Array(8))).toThrow(/dampedSolveFromQr: d has 1 entries/);
    expect(() => inverseNormalMatrixColumns(new Float64Array(3), 2, 2)).toThrow(/inverseNormalMatrixColumns: the matrix has 3 entries, needs at least 4/);
    expect(() => scaledNorm(Float64Array.of(3, 4), 0, 3)).toThrow(/scaledNorm: the vector has 2 entries, needs at least 3/);
  });
  it('entry outside a matrix', () => {
    expect(entry([[1, 2], [3, 4]], 1, 0)).toBe(3);
    expect(() => entry([[1, 2], [3, 4]], 2, 0)).toThrow(/entry \(2, 0\) is outside the matrix/);
    expect(() => entry([[1, 2], [3, 4]], 0, 2)).toThrow(/entry \(0, 2\) is outside the matrix/);
  });
});
