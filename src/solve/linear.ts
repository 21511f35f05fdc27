/**
 * Linear algebra of the solvers: a Jacobian equilibrated (columns by the size of their variable,
 * rows by their largest entry) and factored by LU with partial pivoting, with a pivot test for
 * singularity; and a plain dense solve for small systems.
 *
 * The LU is ml-matrix's LuDecomposition (the algorithm of JAMA: Crout's column order, partial
 * pivoting) done in place on arrays made once: the same operations in the same order, so the
 * same numbers to the last bit (test/solve/linear.test.ts checks it against ml-matrix), but no
 * matrix, clone or vector allocated per factorization or solve, which a solve's Newton steps and
 * an equilibrium reactor's inner Newton do on every pass.
 */

/** Smallest |U_ii| / max |U_jj| of the equilibrated LU before the Jacobian counts as singular. */
const PIVOT_RATIO_MIN = 1e-12;

/** An LU of order n in place: the factors (row-major, L below the diagonal with unit diagonal), the row order, scratch. */
export interface LuWork {
  n: number;
  lu: Float64Array;
  pivot: Int32Array;
  col: Float64Array;
  x: Float64Array;
}

export function newLuWork(n: number): LuWork {
  return { n, lu: new Float64Array(n * n), pivot: new Int32Array(n), col: new Float64Array(n), x: new Float64Array(n) };
}

/** Factors the row-major n*n A into w (A is left as it was). */
export function luFactor(A: ArrayLike<number>, w: LuWork): void {
  const n = w.n;
  const { lu, pivot, col } = w;
  for (let i = 0; i < n * n; i++) lu[i] = A[i];
  for (let i = 0; i < n; i++) pivot[i] = i;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) col[i] = lu[i * n + j];
    for (let i = 0; i < n; i++) {
      const kmax = i < j ? i : j;
      let s = 0;
      const row = i * n;
      for (let k = 0; k < kmax; k++) s += lu[row + k] * col[k];
      col[i] -= s;
      lu[row + j] = col[i];
    }
    let p = j;
    for (let i = j + 1; i < n; i++) if (Math.abs(col[i]) > Math.abs(col[p])) p = i;
    if (p !== j) {
      const rp = p * n;
      const rj = j * n;
      for (let k = 0; k < n; k++) {
        const t = lu[rp + k];
        lu[rp + k] = lu[rj + k];
        lu[rj + k] = t;
      }
      const v = pivot[p];
      pivot[p] = pivot[j];
      pivot[j] = v;
    }
    const d = lu[j * n + j];
    if (d !== 0) for (let i = j + 1; i < n; i++) lu[i * n + j] = lu[i * n + j] / d;
  }
}

/** Whether a pivot of the factored w is exactly zero. */
export function luSingular(w: LuWork): boolean {
  const n = w.n;
  for (let j = 0; j < n; j++) if (w.lu[j * n + j] === 0) return true;
  return false;
}

/** Solves with the factored w: out = A^-1 b (out may be b). */
export function luSolve(w: LuWork, b: ArrayLike<number>, out: Float64Array): Float64Array {
  const n = w.n;
  const { lu, pivot, x } = w;
  for (let i = 0; i < n; i++) x[i] = b[pivot[i]];
  for (let k = 0; k < n; k++) {
    const xk = x[k];
    for (let i = k + 1; i < n; i++) x[i] = x[i] - xk * lu[i * n + k];
  }
  for (let k = n - 1; k >= 0; k--) {
    x[k] = x[k] / lu[k * n + k];
    const xk = x[k];
    for (let i = 0; i < k; i++) x[i] = x[i] - xk * lu[i * n + k];
  }
  out.set(x);
  return out;
}

/**
 * A factored, equilibrated Jacobian: dx = colScale .* (LU \ (rowScale .* -F)).
 * Everything is allocated once per solve (newFactored).
 */
export interface Factored {
  /** The equilibrated Jacobian, row-major n*n (scratch). */
  scaled: Float64Array;
  lu: LuWork;
  /** Whether lu holds a usable factorization (factor returned no message). */
  ok: boolean;
  rowScale: Float64Array;
  colScale: Float64Array;
  rhs: Float64Array;
}

export function newFactored(n: number): Factored {
  return { scaled: new Float64Array(n * n), lu: newLuWork(n), ok: false, rowScale: new Float64Array(n), colScale: new Float64Array(n), rhs: new Float64Array(n) };
}

/**
 * Equilibrates and factors J into fac (LU, partial pivoting); returns a message when J is
 * singular. `rowLabel(i)` and `columnLabel(j)` name a residual and a variable for messages.
 */
export function factor(J: Float64Array, x: Float64Array, typical: Float64Array, fac: Factored, rowLabel: (i: number) => string, columnLabel: (j: number) => string): string | undefined {
  const n = x.length;
  const { colScale, rowScale, scaled: A } = fac;
  fac.ok = false;
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
  const w = fac.lu;
  luFactor(A, w);
  let maxPivot = 0;
  let minPivot = Infinity;
  let minAt = 0;
  for (let i = 0; i < n; i++) {
    const p = Math.abs(w.lu[i * n + i]);
    if (p > maxPivot) maxPivot = p;
    if (p < minPivot) {
      minPivot = p;
      minAt = i;
    }
  }
  if (luSingular(w) || !(minPivot > PIVOT_RATIO_MIN * maxPivot)) {
    return `singular Jacobian (smallest pivot ${minPivot.toExponential(2)} at elimination step ${minAt} against largest ${maxPivot.toExponential(2)}): the residuals are not independent near this point; check for a variable that is fixed by no equation or two equations that say the same`;
  }
  fac.ok = true;
  return undefined;
}

/** dx = colScale .* (LU \ (rowScale .* -f)). */
export function luStep(fac: Factored, f: Float64Array, dx: Float64Array): void {
  const { rowScale, colScale, rhs } = fac;
  if (!fac.ok) throw new Error('luStep: the Jacobian is not factored');
  const n = colScale.length;
  for (let i = 0; i < n; i++) rhs[i] = -f[i] * rowScale[i];
  luSolve(fac.lu, rhs, rhs);
  for (let j = 0; j < n; j++) dx[j] = rhs[j] * colScale[j];
}

/**
 * Solves A x = b for a small dense system (A row-major n*n), b overwritten with x; false when A is
 * singular, or when its smallest pivot is below minPivotRatio times its largest (default 0: only an
 * exactly singular A is refused). A is left as it was. `work` is the caller's LU work of order n
 * (reused across calls: nothing allocated); without it, one is made for this call.
 */
export function solveDense(A: Float64Array, b: Float64Array, n: number, minPivotRatio = 0, work?: LuWork): boolean {
  const w = work !== undefined && work.n === n ? work : newLuWork(n);
  luFactor(A, w);
  if (luSingular(w)) return false;
  if (minPivotRatio > 0) {
    let big = 0;
    let small = Infinity;
    for (let i = 0; i < n; i++) {
      const p = Math.abs(w.lu[i * n + i]);
      if (p > big) big = p;
      if (p < small) small = p;
    }
    if (!(small > minPivotRatio * big)) return false;
  }
  const x = luSolve(w, b, w.x);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i])) return false;
    b[i] = x[i];
  }
  return true;
}

/**
 * Solves H u = b for a symmetric positive definite H (k x k, row-major, its lower triangle read),
 * u holding b on entry: H is overwritten by its Cholesky factor L (H = L L', lower triangle).
 * False, with u left as it was part-way, when a pivot is not positive (H not positive definite).
 */
export function choleskySolve(H: Float64Array, k: number, u: Float64Array): boolean {
  for (let j = 0; j < k; j++) {
    let d = H[j * k + j];
    for (let l = 0; l < j; l++) d -= H[j * k + l] * H[j * k + l];
    if (!(d > 0)) return false;
    d = Math.sqrt(d);
    H[j * k + j] = d;
    for (let i = j + 1; i < k; i++) {
      let s = H[i * k + j];
      for (let l = 0; l < j; l++) s -= H[i * k + l] * H[j * k + l];
      H[i * k + j] = s / d;
    }
  }
  for (let i = 0; i < k; i++) {
    let s = u[i];
    for (let l = 0; l < i; l++) s -= H[i * k + l] * u[l];
    u[i] = s / H[i * k + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = u[i];
    for (let l = i + 1; l < k; l++) s -= H[l * k + i] * u[l];
    u[i] = s / H[i * k + i];
  }
  return true;
}
