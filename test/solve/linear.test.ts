import { describe, expect, it } from 'vitest';
import { LuDecomposition, Matrix } from 'ml-matrix';
import { factor, luFactor, luSingular, luSolve, luStep, newFactored, newLuWork, solveDense } from '../../src/solve/linear.js';

/** A deterministic stream of numbers in (-1, 1) (a linear congruential generator). */
function stream(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 31 - 1;
  };
}

/** ml-matrix's LU solve of A x = b, the reference the in-place LU must match bit for bit. */
function reference(A: Float64Array, b: Float64Array, n: number): { x: number[]; diag: number[]; singular: boolean } {
  const lu = new LuDecomposition(Matrix.from1DArray(n, n, A));
  const U = lu.upperTriangularMatrix;
  const diag = Array.from({ length: n }, (_, i) => U.get(i, i));
  if (lu.isSingular()) return { x: [], diag, singular: true };
  const x = lu.solve(Matrix.columnVector(Array.from(b)));
  return { x: Array.from({ length: n }, (_, i) => x.get(i, 0)), diag, singular: false };
}

describe('in-place LU (linear.ts) against ml-matrix LuDecomposition', () => {
  it('gives the same factors and solutions to the last bit on random systems of order 1 to 12, scaled over many decades', () => {
    const r = stream(12345);
    for (let n = 1; n <= 12; n++) {
      for (let trial = 0; trial < 20; trial++) {
        const A = new Float64Array(n * n);
        // rows and columns scaled over decades, as an unequilibrated Jacobian is
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) A[i * n + j] = r() * 10 ** (3 * r()) * 10 ** (2 * r());
        const b = Float64Array.from({ length: n }, () => r() * 100);
        const ref = reference(A, b, n);
        const w = newLuWork(n);
        const A0 = Float64Array.from(A);
        luFactor(A, w);
        expect(A).toEqual(A0); // A is left as it was
        expect(Array.from({ length: n }, (_, i) => w.lu[i * n + i])).toEqual(ref.diag);
        expect(luSingular(w)).toBe(ref.singular);
        const x = luSolve(w, b, new Float64Array(n));
        expect(Array.from(x)).toEqual(ref.x);
        const bb = Float64Array.from(b);
        expect(solveDense(A, bb, n)).toBe(true);
        expect(Array.from(bb)).toEqual(ref.x);
      }
    }
  });

  it('refuses an exactly singular matrix, and one whose pivot ratio is below the bound', () => {
    // rows 1 and 2 equal: exactly singular
    const A = Float64Array.from([1, 2, 3, 1, 2, 3, 4, 5, 7]);
    expect(reference(A, new Float64Array(3), 3).singular).toBe(true);
    const b = Float64Array.from([1, 2, 3]);
    expect(solveDense(A, b, 3)).toBe(false);
    // nearly singular: the second pivot is 1e-14 of the first
    const B = Float64Array.from([1, 1, 1, 1 + 1e-14]);
    expect(solveDense(B, Float64Array.from([1, 1]), 2)).toBe(true);
    expect(solveDense(B, Float64Array.from([1, 1]), 2, 1e-12)).toBe(false);
  });

  it('luStep after factor solves the equilibrated system: J dx = -f', () => {
    const n = 4;
    const J = Float64Array.from([4, 1, 0, 2e3, 1, 3e-3, 1, 0, 0, 1, 5, 1, 2, 0, 1, 3e2]);
    const x = Float64Array.from([1, 1e3, 1e-2, 10]);
    const typical = new Float64Array(n).fill(1e-6);
    const fac = newFactored(n);
    expect(factor(J, x, typical, fac, (i) => `r${i}`, (j) => `x${j}`)).toBeUndefined();
    const f = Float64Array.from([1, -2, 3, -4]);
    const dx = new Float64Array(n);
    luStep(fac, f, dx);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += J[i * n + j] * dx[j];
      expect(s).toBeCloseTo(-f[i], 9);
    }
    // a column of zeros is named
    const Z = Float64Array.from(J);
    for (let i = 0; i < n; i++) Z[i * n + 2] = 0;
    expect(factor(Z, x, typical, fac, (i) => `r${i}`, (j) => `x${j}`)).toMatch(/x2 has no effect/);
    expect(() => luStep(fac, f, dx)).toThrow(/not factored/);
  });
});
