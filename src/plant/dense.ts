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
 * number of diagonal entries with |R_kk| > tol * |R_00|. Column norms are recomputed at each step
 * (the matrices here are a few tens of rows, and recomputing avoids the cancellation that
 * downdated norms suffer).
 *
 * Storage: a matrix of `rows` x `cols` at stride `ld` (entry (i, j) at i * ld + j). After
 * `qrPivoted` the upper triangle holds R, the part below the diagonal of column k holds the
 * Householder vector v_k (v_k[k] = 1 implied) and beta[k] its factor: H_k = I - beta_k v_k v_k'.
 * Q = H_0 H_1 ... H_{K-1}, K = min(rows, cols).
 */

/** Result of a pivoted QR: its numerical rank; R, the reflectors and perm stay in the buffers. */
export interface QrWork {
  /** beta[k] of each reflector (length >= min(rows, cols)). */
  beta: Float64Array;
  /** perm[k] = original column at position k (length >= cols). */
  perm: Int32Array;
  /** Workspace for column norms (length >= cols). */
  norms: Float64Array;
}

export function newQrWork(maxCols: number): QrWork {
  const k = Math.max(1, maxCols);
  return { beta: new Float64Array(k), perm: new Int32Array(k), norms: new Float64Array(k) };
}

/**
 * Householder QR with column pivoting of a (rows x cols, stride ld), in place.
 * Returns the numerical rank: the number of leading |R_kk| > relTol * |R_00| (0 for a zero
 * matrix). The factorisation stops at the rank: columns past it are left as they are after the
 * reflectors applied so far (R12 is complete, the rest is the negligible remainder).
 */
export function qrPivoted(a: Float64Array, rows: number, cols: number, ld: number, relTol: number, w: QrWork): number {
  const { beta, perm, norms } = w;
  for (let j = 0; j < cols; j++) perm[j] = j;
  const kmax = Math.min(rows, cols);
  let r00 = 0;
  for (let k = 0; k < kmax; k++) {
    // Pivot: the remaining column (rows k..) of largest norm.
    let best = -1;
    let bestNorm = -1;
    for (let j = k; j < cols; j++) {
      let s = 0;
      for (let i = k; i < rows; i++) {
        const v = a[i * ld + j];
        s += v * v;
      }
      norms[j] = s;
      if (s > bestNorm) {
        bestNorm = s;
        best = j;
      }
    }
    const colNorm = Math.sqrt(bestNorm);
    if (k === 0) r00 = colNorm;
    if (colNorm === 0 || colNorm <= relTol * r00) return k;
    if (best !== k) {
      for (let i = 0; i < rows; i++) {
        const t = a[i * ld + k];
        a[i * ld + k] = a[i * ld + best];
        a[i * ld + best] = t;
      }
      const tp = perm[k];
      perm[k] = perm[best];
      perm[best] = tp;
    }
    // Householder vector for column k, rows k..rows-1 (Golub and Van Loan Alg. 5.1.1 form).
    const x0 = a[k * ld + k];
    const alpha = x0 >= 0 ? -colNorm : colNorm;
    const u0 = x0 - alpha;
    beta[k] = -u0 / alpha;
    for (let i = k + 1; i < rows; i++) a[i * ld + k] /= u0;
    a[k * ld + k] = alpha;
    // Apply H_k to the remaining columns.
    const b = beta[k];
    for (let j = k + 1; j < cols; j++) {
      let s = a[k * ld + j];
      for (let i = k + 1; i < rows; i++) s += a[i * ld + k] * a[i * ld + j];
      s *= b;
      if (s === 0) continue;
      a[k * ld + j] -= s;
      for (let i = k + 1; i < rows; i++) a[i * ld + j] -= s * a[i * ld + k];
    }
  }
  return kmax;
}

/** y <- Q' y for the first `nref` reflectors of a factored a (rows x ., stride ld). y has `rows` entries. */
export function applyQt(a: Float64Array, rows: number, ld: number, beta: Float64Array, nref: number, y: Float64Array, yOff = 0, yStride = 1): void {
  for (let k = 0; k < nref; k++) {
    let s = y[yOff + k * yStride];
    for (let i = k + 1; i < rows; i++) s += a[i * ld + k] * y[yOff + i * yStride];
    s *= beta[k];
    if (s === 0) continue;
    y[yOff + k * yStride] -= s;
    for (let i = k + 1; i < rows; i++) y[yOff + i * yStride] -= s * a[i * ld + k];
  }
}

/** y <- Q y (reflectors applied in reverse order). */
export function applyQ(a: Float64Array, rows: number, ld: number, beta: Float64Array, nref: number, y: Float64Array, yOff = 0, yStride = 1): void {
  for (let k = nref - 1; k >= 0; k--) {
    let s = y[yOff + k * yStride];
    for (let i = k + 1; i < rows; i++) s += a[i * ld + k] * y[yOff + i * yStride];
    s *= beta[k];
    if (s === 0) continue;
    y[yOff + k * yStride] -= s;
    for (let i = k + 1; i < rows; i++) y[yOff + i * yStride] -= s * a[i * ld + k];
  }
}

/** Solves R11 x = b in place (b overwritten by x), R11 the leading r x r upper triangle of a. */
export function solveUpper(a: Float64Array, ld: number, r: number, b: Float64Array, bOff = 0, bStride = 1): void {
  for (let i = r - 1; i >= 0; i--) {
    let s = b[bOff + i * bStride];
    for (let j = i + 1; j < r; j++) s -= a[i * ld + j] * b[bOff + j * bStride];
    b[bOff + i * bStride] = s / a[i * ld + i];
  }
}

/** Solves R11' x = b in place (forward substitution with the transpose of the upper triangle). */
export function solveUpperTransposed(a: Float64Array, ld: number, r: number, b: Float64Array, bOff = 0, bStride = 1): void {
  for (let i = 0; i < r; i++) {
    let s = b[bOff + i * bStride];
    for (let j = 0; j < i; j++) s -= a[j * ld + i] * b[bOff + j * bStride];
    b[bOff + i * bStride] = s / a[i * ld + i];
  }
}
