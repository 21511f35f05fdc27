/**
 * Linear algebra of the solvers, on ml-matrix: a Jacobian equilibrated (columns by the size of
 * their variable, rows by their largest entry) and factored by LU with partial pivoting, with a
 * pivot test for singularity; and a plain dense solve for small systems.
 */
import { LuDecomposition, Matrix } from 'ml-matrix';

/** Smallest |U_ii| / max |U_jj| of the equilibrated LU before the Jacobian counts as singular. */
const PIVOT_RATIO_MIN = 1e-12;

/**
 * A factored, equilibrated Jacobian: dx = colScale .* (LU \ (rowScale .* -F)).
 * The scaled matrix and scale vectors are allocated once per solve; the LU is ml-matrix's.
 */
export interface Factored {
  /** The equilibrated Jacobian, row-major n*n (scratch). */
  scaled: Float64Array;
  lu: LuDecomposition | null;
  rowScale: Float64Array;
  colScale: Float64Array;
  rhs: Matrix;
}

export function newFactored(n: number): Factored {
  return { scaled: new Float64Array(n * n), lu: null, rowScale: new Float64Array(n), colScale: new Float64Array(n), rhs: new Matrix(n, 1) };
}

/**
 * Equilibrates and factors J into fac (ml-matrix LU, partial pivoting); returns a message when J
 * is singular. `rowLabel(i)` and `columnLabel(j)` name a residual and a variable for messages.
 */
export function factor(J: Float64Array, x: Float64Array, typical: Float64Array, fac: Factored, rowLabel: (i: number) => string, columnLabel: (j: number) => string): string | undefined {
  const n = x.length;
  const { colScale, rowScale, scaled: A } = fac;
  for (let j = 0; j < n; j++) colScale[j] = Math.max(Math.abs(x[j]), typical[j]);
  for (let i = 0; i < n; i++) {
    let big = 0;
    const row = i * n;
    for (let j = 0; j < n; j++) {
      const a = J[row + j] * colScale[j];
      A[row + j] = a;
      if (Math.abs(a) > big) big = Math.abs(a);
    }
    if (big === 0) {
      return `singular Jacobian: residual ${rowLabel(i)} does not change with any variable`;
    }
    const inv = 1 / big;
    rowScale[i] = inv;
    for (let j = 0; j < n; j++) A[row + j] *= inv;
  }
  for (let j = 0; j < n; j++) {
    let zero = true;
    for (let i = 0; i < n && zero; i++) if (A[i * n + j] !== 0) zero = false;
    if (zero) return `singular Jacobian: ${columnLabel(j)} has no effect on any residual`;
  }
  const lu = new LuDecomposition(Matrix.from1DArray(n, n, A));
  const U = lu.upperTriangularMatrix;
  let maxPivot = 0;
  let minPivot = Infinity;
  let minAt = 0;
  for (let i = 0; i < n; i++) {
    const p = Math.abs(U.get(i, i));
    if (p > maxPivot) maxPivot = p;
    if (p < minPivot) {
      minPivot = p;
      minAt = i;
    }
  }
  if (lu.isSingular() || !(minPivot > PIVOT_RATIO_MIN * maxPivot)) {
    fac.lu = null;
    return `singular Jacobian (smallest pivot ${minPivot.toExponential(2)} at elimination step ${minAt} against largest ${maxPivot.toExponential(2)}): the residuals are not independent near this point; check for a variable that is fixed by no equation or two equations that say the same`;
  }
  fac.lu = lu;
  return undefined;
}

/** dx = colScale .* (LU \ (rowScale .* -f)). */
export function luStep(fac: Factored, f: Float64Array, dx: Float64Array): void {
  const { rowScale, colScale, rhs } = fac;
  const n = colScale.length;
  for (let i = 0; i < n; i++) rhs.set(i, 0, -f[i] * rowScale[i]);
  const y = fac.lu!.solve(rhs);
  for (let j = 0; j < n; j++) dx[j] = y.get(j, 0) * colScale[j];
}


/**
 * Solves A x = b for a small dense system (A row-major n*n), b overwritten with x; false when A is
 * singular, or when its smallest pivot is below minPivotRatio times its largest (default 0: only an
 * exactly singular A is refused).
 */
export function solveDense(A: Float64Array, b: Float64Array, n: number, minPivotRatio = 0): boolean {
  const lu = new LuDecomposition(Matrix.from1DArray(n, n, A));
  if (lu.isSingular()) return false;
  if (minPivotRatio > 0) {
    const U = lu.upperTriangularMatrix;
    let big = 0;
    let small = Infinity;
    for (let i = 0; i < n; i++) {
      const p = Math.abs(U.get(i, i));
      if (p > big) big = p;
      if (p < small) small = p;
    }
    if (!(small > minPivotRatio * big)) return false;
  }
  const x = lu.solve(Matrix.columnVector(Array.from(b)));
  for (let i = 0; i < n; i++) {
    const v = x.get(i, 0);
    if (!Number.isFinite(v)) return false;
    b[i] = v;
  }
  return true;
}
