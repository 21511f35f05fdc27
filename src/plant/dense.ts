/**
 * Dense kernels for the reconciliation engine, on row-major Float64Arrays allocated once per
 * problem shape: Householder QR with column pivoting and the triangular solves that go with it.
 *
 * Why not ml-matrix here: its QR does not pivot columns, and a rank decision needs a pivoted
 * (rank-revealing) factorisation; and the engine reconciles thousands of rows of one problem
 * shape, so its factorisations work in place in buffers the caller owns instead of allocating
 * Matrix objects on every iteration.
 *
 * Method: Golub and Van Loan, "Matrix Computations", 4th ed. (2013), Alg. 5.1.1 (Householder
 * vector) and Alg. 5.4.1 (Householder QR with column pivoting): at step k the remaining column of
 * largest norm is swapped to position k, so |R_00| >= |R_11| >= ... and the numerical rank is the
 * number of diagonal entries with |R_kk| > tol * |R_00|. The remaining column norms are
 * downdated after each step and recomputed where the downdate has cancelled most of the norm
 * (the safeguard of LAPACK's xGEQP3: Drmac and Bujanovic, "On the failure of rank-revealing QR
 * factorization software - a case study", ACM TOMS 35 (2008) 12).
 *
 * Storage: column-major, a matrix of `rows` x `cols` with leading dimension `ld` (entry (i, j)
 * at j * ld + i), so that the inner loops run down contiguous columns. After
 * `qrPivoted` the upper triangle holds R, the part below the diagonal of column k holds the
 * Householder vector v_k (v_k[k] = 1 implied) and beta[k] its factor: H_k = I - beta_k v_k v_k'.
 * Q = H_0 H_1 ... H_{K-1}, K = min(rows, cols).
 */

/** Work space of a pivoted QR: reflector factors, the permutation, column norms. */
export interface QrWork {
  /** beta[k] of each reflector (length >= min(rows, cols)). */
  beta: Float64Array;
  /** perm[k] = original column at position k (length >= cols). */
  perm: Int32Array;
  /** Downdated column norms, and the norms they were last recomputed at (length >= cols). */
  norms: Float64Array;
  norms0: Float64Array;
}

export function newQrWork(maxCols: number): QrWork {
  const k = Math.max(1, maxCols);
  return { beta: new Float64Array(k), perm: new Int32Array(k), norms: new Float64Array(k), norms0: new Float64Array(k) };
}

const TOL3Z = Math.sqrt(Number.EPSILON);

function columnNorm(a: Float64Array, from: number, to: number): number {
  let scale = 0;
  let s = 0;
  for (let i = from; i < to; i++) {
    const v = a[i];
    s += v * v;
    const av = Math.abs(v);
    if (av > scale) scale = av;
  }
  return scale === 0 ? 0 : Math.sqrt(s);
}

/**
 * Householder QR with column pivoting of a (rows x cols, leading dimension ld), in place.
 * Returns the numerical rank: the number of leading |R_kk| > relTol * |R_00| (0 for a zero
 * matrix). The factorisation stops at the rank: columns past it hold R12 in their first rows
 * and the negligible remainder below.
 */
export function qrPivoted(a: Float64Array, rows: number, cols: number, ld: number, relTol: number, w: QrWork): number {
  const { beta, perm, norms, norms0 } = w;
  for (let j = 0; j < cols; j++) {
    perm[j] = j;
    norms[j] = columnNorm(a, j * ld, j * ld + rows);
    norms0[j] = norms[j];
  }
  const kmax = Math.min(rows, cols);
  let r00 = 0;
  for (let k = 0; k < kmax; k++) {
    // Pivot: the remaining column of largest (downdated) norm.
    let best = k;
    for (let j = k + 1; j < cols; j++) if (norms[j] > norms[best]) best = j;
    if (best !== k) {
      const ob = best * ld;
      const ok = k * ld;
      for (let i = 0; i < rows; i++) {
        const t = a[ok + i];
        a[ok + i] = a[ob + i];
        a[ob + i] = t;
      }
      const tp = perm[k];
      perm[k] = perm[best];
      perm[best] = tp;
      norms[best] = norms[k];
      norms0[best] = norms0[k];
    }
    const ok = k * ld;
    const colNorm = columnNorm(a, ok + k, ok + rows);
    if (k === 0) r00 = colNorm;
    if (colNorm === 0 || colNorm <= relTol * r00) return k;
    // Householder vector for column k, rows k..rows-1 (Golub and Van Loan Alg. 5.1.1 form).
    const x0 = a[ok + k];
    const alpha = x0 >= 0 ? -colNorm : colNorm;
    const u0 = x0 - alpha;
    const b = -u0 / alpha;
    beta[k] = b;
    for (let i = k + 1; i < rows; i++) a[ok + i] /= u0;
    a[ok + k] = alpha;
    // Apply H_k to the remaining columns and downdate their norms.
    for (let j = k + 1; j < cols; j++) {
      const oj = j * ld;
      let s = a[oj + k];
      for (let i = k + 1; i < rows; i++) s += a[ok + i] * a[oj + i];
      s *= b;
      if (s !== 0) {
        a[oj + k] -= s;
        for (let i = k + 1; i < rows; i++) a[oj + i] -= s * a[ok + i];
      }
      if (norms[j] !== 0) {
        const ratio = Math.abs(a[oj + k]) / norms[j];
        const t = Math.max(0, (1 + ratio) * (1 - ratio));
        const t2 = t * (norms[j] / norms0[j]) ** 2;
        if (t2 <= TOL3Z) {
          norms[j] = columnNorm(a, oj + k + 1, oj + rows);
          norms0[j] = norms[j];
        } else {
          norms[j] *= Math.sqrt(t);
        }
      }
    }
  }
  return kmax;
}

/** y <- Q' y for the first `nref` reflectors of a factored a (rows x ., leading dimension ld);
 *  y has `rows` entries from yOff with stride yStride. */
export function applyQt(a: Float64Array, rows: number, ld: number, beta: Float64Array, nref: number, y: Float64Array, yOff = 0, yStride = 1): void {
  for (let k = 0; k < nref; k++) {
    const ok = k * ld;
    let s = y[yOff + k * yStride];
    for (let i = k + 1; i < rows; i++) s += a[ok + i] * y[yOff + i * yStride];
    s *= beta[k];
    if (s === 0) continue;
    y[yOff + k * yStride] -= s;
    for (let i = k + 1; i < rows; i++) y[yOff + i * yStride] -= s * a[ok + i];
  }
}

/** y <- Q y (reflectors applied in reverse order). */
export function applyQ(a: Float64Array, rows: number, ld: number, beta: Float64Array, nref: number, y: Float64Array, yOff = 0, yStride = 1): void {
  for (let k = nref - 1; k >= 0; k--) {
    const ok = k * ld;
    let s = y[yOff + k * yStride];
    for (let i = k + 1; i < rows; i++) s += a[ok + i] * y[yOff + i * yStride];
    s *= beta[k];
    if (s === 0) continue;
    y[yOff + k * yStride] -= s;
    for (let i = k + 1; i < rows; i++) y[yOff + i * yStride] -= s * a[ok + i];
  }
}

/** Solves R11 x = b in place (b overwritten by x), R11 the leading r x r upper triangle of a. */
export function solveUpper(a: Float64Array, ld: number, r: number, b: Float64Array, bOff = 0, bStride = 1): void {
  for (let i = r - 1; i >= 0; i--) {
    let s = b[bOff + i * bStride];
    for (let j = i + 1; j < r; j++) s -= a[j * ld + i] * b[bOff + j * bStride];
    b[bOff + i * bStride] = s / a[i * ld + i];
  }
}

/** Solves R11' x = b in place (forward substitution with the transpose of the upper triangle). */
export function solveUpperTransposed(a: Float64Array, ld: number, r: number, b: Float64Array, bOff = 0, bStride = 1): void {
  for (let i = 0; i < r; i++) {
    const oi = i * ld;
    let s = b[bOff + i * bStride];
    for (let j = 0; j < i; j++) s -= a[oi + j] * b[bOff + j * bStride];
    b[bOff + i * bStride] = s / a[oi + i];
  }
}
