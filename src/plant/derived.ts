/**
 * A quantity computed from a reconciliation (a per-pass conversion = extent / inlet flow of the
 * key, a purge ratio, a closure) and its standard uncertainty by first-order propagation of the
 * result's covariance (JCGM 100:2008, "Guide to the expression of uncertainty in measurement",
 * Sec. 5.2, law of propagation of uncertainty for correlated input quantities, eq. (13)):
 *     u^2(f) = g' C g,   g_k = df/dx_k by central differences at the reconciled x.
 * A quantity that depends on an unobservable variable has no value: the result's x holds NaN
 * there, so f comes out NaN and the answer says so.
 */
import type { ReconcileResult } from './types.js';

export interface DerivedEstimate {
  /** f at the reconciled x; null when f depends on an unobservable variable or is not finite. */
  value: number | null;
  /** Standard uncertainty of f; null with value. */
  uncertainty: number | null;
  /** df/dx_k for each index of the result's covariance. */
  sensitivities: { index: number; derivative: number }[];
  note?: string;
}

/**
 * What every estimate of one result shares, made on the first and kept with the result: a copy of
 * x to difference in (each estimate puts back what it changed, bit for bit), the covariance
 * position of each variable (-1: not in it), and the standard deviations at those positions
 * (computed when first asked for).
 */
interface ResultScratch {
  x: Float64Array;
  positionOf: Int32Array;
  sd: Float64Array;
  sdDone: Uint8Array;
  /** Work space of one estimate: derivatives, positions differenced, positions with a non-zero derivative. */
  grad: Float64Array;
  positions: Int32Array;
  nz: Int32Array;
}

/**
 * The caller's work space for derived figures (a plant keeps one): it serves the result last
 * asked about (estimates of one result come together) and is made again, in the same buffers,
 * for another result.
 */
export interface DerivedWork {
  scratch: (ResultScratch & { result: ReconcileResult | undefined }) | undefined;
}

export function newDerivedWork(): DerivedWork {
  return { scratch: undefined };
}

function scratchFor(result: ReconcileResult, work: DerivedWork): ResultScratch {
  const n = result.x.length;
  const N = result.covariance.indices.length;
  let scratch = work.scratch;
  if (scratch && scratch.result === result) return scratch;
  if (!scratch || scratch.x.length < n || scratch.sd.length < N) {
    const nn = Math.max(n, scratch?.x.length ?? 0);
    const NN = Math.max(N, scratch?.sd.length ?? 0);
    scratch = {
      result: undefined, x: new Float64Array(nn), positionOf: new Int32Array(nn), sd: new Float64Array(NN), sdDone: new Uint8Array(NN),
      grad: new Float64Array(NN), positions: new Int32Array(NN), nz: new Int32Array(NN),
    };
    work.scratch = scratch;
  }
  const s = scratch;
  s.result = undefined;
  const { indices } = result.covariance;
  const x = s.x.length === n ? s.x : (s.x = new Float64Array(n));
  x.set(result.x);
  const positionOf = s.positionOf.length === n ? s.positionOf : (s.positionOf = new Int32Array(n));
  positionOf.fill(-1);
  for (let a = 0; a < N; a++) if (indices[a] >= 0 && indices[a] < n && positionOf[indices[a]] < 0) positionOf[indices[a]] = a;
  s.sdDone.fill(0);
  s.result = result;
  return s;
}

/**
 * Value and standard uncertainty of f(x) at a reconciled result (status reconciled or not-redundant).
 * `reads`, when given, holds every variable index f can read (more is harmless): the derivatives
 * of the others are exactly zero (f cannot tell their change), so they are not differenced, and
 * the answer is the same to the last bit. `work`: the caller's work space (a fresh one when absent).
 */
export function derivedEstimate(result: ReconcileResult, f: (x: Float64Array) => number, reads?: ArrayLike<number>, work: DerivedWork = newDerivedWork()): DerivedEstimate {
  if (result.status !== 'reconciled' && result.status !== 'not-redundant') {
    return { value: null, uncertainty: null, sensitivities: [], note: `no estimate: the reconciliation is ${result.status}` };
  }
  const grad = new Float64Array(result.covariance.indices.length);
  const r = estimate(result, f, reads, grad, work);
  if (r.value === null) {
    return { value: null, uncertainty: null, sensitivities: [], note: 'not determined: it depends on an unobservable variable (or is not finite at the solution)' };
  }
  const { indices } = result.covariance;
  const out: DerivedEstimate = { value: r.value, uncertainty: r.uncertainty, sensitivities: [] };
  // Made when read: most callers want the value and its uncertainty only.
  Object.defineProperty(out, 'sensitivities', { enumerable: true, configurable: true, get: () => Array.from(indices, (index, a) => ({ index, derivative: grad[a] })) });
  return out;
}

/**
 * The value and standard uncertainty of derivedEstimate, the same figures, without the
 * sensitivities (for the many figures of every row of a historian export).
 */
export function derivedFigure(result: ReconcileResult, f: (x: Float64Array) => number, reads: ArrayLike<number> | undefined, work: DerivedWork): { value: number | null; uncertainty: number | null } {
  if (result.status !== 'reconciled' && result.status !== 'not-redundant') return { value: null, uncertainty: null };
  return estimate(result, f, reads, scratchFor(result, work).grad, work);
}

/** f and its uncertainty; grad (one entry per covariance position) receives the derivatives of the positions differenced. */
function estimate(result: ReconcileResult, f: (x: Float64Array) => number, reads: ArrayLike<number> | undefined, grad: Float64Array, work: DerivedWork): { value: number | null; uncertainty: number | null } {
  const scratch = scratchFor(result, work);
  const x = scratch.x;
  const value = f(x);
  if (!Number.isFinite(value)) return { value: null, uncertainty: null };
  const { indices, factor } = result.covariance;
  const N = indices.length;
  // The covariance's entries: from its factor W (C = W W') when the result holds one.
  const sdAt = (a: number) => {
    if (scratch.sdDone[a]) return scratch.sd[a];
    let v: number;
    if (factor) {
      v = 0;
      for (let i = 0; i < factor.rank; i++) v += factor.W[a * factor.rank + i] ** 2;
    } else v = result.covariance.matrix[a * N + a];
    scratch.sdDone[a] = 1;
    return (scratch.sd[a] = Math.sqrt(Math.max(0, v)));
  };
  const h0 = Math.cbrt(Number.EPSILON);
  // Covariance positions to difference (every one, or those f can read), in increasing order.
  let count: number;
  const positions = scratch.positions;
  if (reads) {
    count = 0;
    for (let t = 0; t < reads.length; t++) {
      const j = reads[t];
      const a = j >= 0 && j < x.length ? scratch.positionOf[j] : -1;
      if (a < 0) continue;
      // Insertion in order; a variable listed twice in reads is differenced once.
      let k = count;
      while (k > 0 && positions[k - 1] > a) k--;
      if (k > 0 && positions[k - 1] === a) continue;
      for (let m = count; m > k; m--) positions[m] = positions[m - 1];
      positions[k] = a;
      count++;
    }
  } else {
    count = N;
    for (let a = 0; a < N; a++) positions[a] = a;
  }
  for (let t = 0; t < count; t++) {
    const a = positions[t];
    const j = indices[a];
    const xj = x[j];
    const sd = sdAt(a);
    const h = h0 * Math.max(Math.abs(xj), sd, 1e-300);
    x[j] = xj + h;
    const fp = f(x);
    x[j] = xj - h;
    const fm = f(x);
    x[j] = xj;
    grad[a] = (fp - fm) / (2 * h);
  }
  // u^2 = g' C g over the non-zero derivatives (a zero term adds nothing to either sum), in
  // increasing position.
  const nz = scratch.nz;
  let nnz = 0;
  for (let t = 0; t < count; t++) {
    const a = positions[t];
    if (grad[a] !== 0) nz[nnz++] = a;
  }
  let variance = 0;
  if (factor) {
    // g' W W' g = |W' g|^2.
    const r = factor.rank;
    const W = factor.W;
    for (let i = 0; i < r; i++) {
      let s = 0;
      for (let t = 0; t < nnz; t++) s += grad[nz[t]] * W[nz[t] * r + i];
      variance += s * s;
    }
  } else {
    const matrix = result.covariance.matrix;
    for (let t = 0; t < nnz; t++) {
      const a = nz[t];
      let s = 0;
      for (let u = 0; u < nnz; u++) s += matrix[a * N + nz[u]] * grad[nz[u]];
      variance += grad[a] * s;
    }
  }
  return { value, uncertainty: Math.sqrt(Math.max(0, variance)) };
}
