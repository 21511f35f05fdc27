import { describe, expect, it } from 'vitest';
import { applyQ, applyQt, newQrWork, qrPivoted, solveUpper, solveUpperTransposed } from '../../src/plant/dense.js';

// Column-major helpers: entry (i, j) of a rows x cols matrix at j * ld + i.
function fromRows(rows: number[][], ld = rows.length): Float64Array {
  const a = new Float64Array(ld * rows[0].length);
  rows.forEach((r, i) => r.forEach((v, j) => (a[j * ld + i] = v)));
  return a;
}

describe('pivoted Householder QR (Golub and Van Loan, 4th ed., Alg. 5.4.1)', () => {
  // Third column = first + second: rank 2 (by construction).
  const M = [
    [1, 2, 3],
    [4, 5, 9],
    [7, 8, 15],
    [1, 0, 1],
  ];

  it('finds the rank of a matrix with a dependent column and reproduces A P = Q R', () => {
    const ld = 6;
    const a = fromRows(M, ld);
    const w = newQrWork(3);
    const r = qrPivoted(a, 4, 3, ld, 1e-10, w);
    expect(r).toBe(2);
    // Diagonal of R decreasing in magnitude.
    expect(Math.abs(a[0])).toBeGreaterThanOrEqual(Math.abs(a[1 * ld + 1]));
    // Q R e_j (j < rank, R upper trapezoidal in the first r rows) equals column perm[j] of A.
    for (let j = 0; j < 3; j++) {
      const col = new Float64Array(4);
      for (let i = 0; i < Math.min(r, j + 1); i++) col[i] = a[j * ld + i];
      applyQ(a, 4, ld, w.beta, r, col);
      for (let i = 0; i < 4; i++) expect(col[i]).toBeCloseTo(M[i][w.perm[j]], 12);
    }
  });

  it('Q is orthogonal: Q\'Q y = y', () => {
    const ld = 4;
    const a = fromRows(M, ld);
    const w = newQrWork(3);
    const r = qrPivoted(a, 4, 3, ld, 1e-10, w);
    const y = Float64Array.from([0.3, -1, 2, 5]);
    const z = Float64Array.from(y);
    applyQt(a, 4, ld, w.beta, r, z);
    const norm = (v: Float64Array) => Math.hypot(...v);
    expect(norm(z)).toBeCloseTo(norm(y), 12);
    applyQ(a, 4, ld, w.beta, r, z);
    for (let i = 0; i < 4; i++) expect(z[i]).toBeCloseTo(y[i], 12);
  });

  it('solves with R and with R\'', () => {
    const ld = 3;
    // R = [[2, 1, -1], [0, 3, 2], [0, 0, 4]] stored column-major.
    const R = fromRows([[2, 1, -1], [0, 3, 2], [0, 0, 4]], ld);
    const x = [1, -2, 0.5];
    const b = Float64Array.from([2 * 1 + 1 * -2 - 1 * 0.5, 3 * -2 + 2 * 0.5, 4 * 0.5]);
    solveUpper(R, ld, 3, b);
    x.forEach((v, i) => expect(b[i]).toBeCloseTo(v, 14));
    const bt = Float64Array.from([2 * 1, 1 * 1 + 3 * -2, -1 * 1 + 2 * -2 + 4 * 0.5]);
    solveUpperTransposed(R, ld, 3, bt);
    x.forEach((v, i) => expect(bt[i]).toBeCloseTo(v, 14));
  });

  it('a zero matrix has rank 0 and a tiny column counts against the relative tolerance', () => {
    const w = newQrWork(2);
    expect(qrPivoted(new Float64Array(6), 3, 2, 3, 1e-10, w)).toBe(0);
    const tiny = [[1, 0], [0, 1e-13], [0, 0]];
    expect(qrPivoted(fromRows(tiny), 3, 2, 3, 1e-10, w)).toBe(1);
    expect(qrPivoted(fromRows(tiny), 3, 2, 3, 1e-14, w)).toBe(2);
  });
});
