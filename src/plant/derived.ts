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
 * Value and standard uncertainty of f(x) at a reconciled result (status reconciled or not-redundant).
 * `reads`, when given, holds every variable index f can read (more is harmless): the derivatives
 * of the others are exactly zero (f cannot tell their change), so they are not differenced, and
 * the answer is the same to the last bit.
 */
export function derivedEstimate(result: ReconcileResult, f: (x: Float64Array) => number, reads?: ArrayLike<number>): DerivedEstimate {
  if (result.status !== 'reconciled' && result.status !== 'not-redundant') {
    return { value: null, uncertainty: null, sensitivities: [], note: `no estimate: the reconciliation is ${result.status}` };
  }
  const x = Float64Array.from(result.x);
  const value = f(x);
  if (!Number.isFinite(value)) {
    return { value: null, uncertainty: null, sensitivities: [], note: 'not determined: it depends on an unobservable variable (or is not finite at the solution)' };
  }
  const { indices, factor } = result.covariance;
  const N = indices.length;
  // The covariance's entries: from its factor W (C = W W') when the result holds one.
  const varianceAt = factor
    ? (a: number) => {
        let s = 0;
        for (let i = 0; i < factor.rank; i++) s += factor.W[a * factor.rank + i] ** 2;
        return s;
      }
    : (a: number) => result.covariance.matrix[a * N + a];
  const grad = new Float64Array(N);
  const h0 = Math.cbrt(Number.EPSILON);
  // Covariance positions to difference (every one, or those f can read, in the same order).
  let positions: ArrayLike<number>;
  if (reads) {
    const wanted = new Uint8Array(x.length);
    for (let k = 0; k < reads.length; k++) wanted[reads[k]] = 1;
    const list: number[] = [];
    for (let a = 0; a < N; a++) if (wanted[indices[a]]) list.push(a);
    positions = list;
  } else positions = { length: N } as ArrayLike<number>;
  for (let t = 0; t < positions.length; t++) {
    const a = reads ? positions[t] : t;
    const j = indices[a];
    const xj = x[j];
    const sd = Math.sqrt(Math.max(0, varianceAt(a)));
    const h = h0 * Math.max(Math.abs(xj), sd, 1e-300);
    x[j] = xj + h;
    const fp = f(x);
    x[j] = xj - h;
    const fm = f(x);
    x[j] = xj;
    grad[a] = (fp - fm) / (2 * h);
  }
  // u^2 = g' C g over the non-zero derivatives (a zero term adds nothing to either sum).
  const nz: number[] = [];
  for (let a = 0; a < N; a++) if (grad[a] !== 0) nz.push(a);
  let variance = 0;
  if (factor) {
    // g' W W' g = |W' g|^2.
    const r = factor.rank;
    for (let i = 0; i < r; i++) {
      let s = 0;
      for (const a of nz) s += grad[a] * factor.W[a * r + i];
      variance += s * s;
    }
  } else {
    const matrix = result.covariance.matrix;
    for (const a of nz) {
      let s = 0;
      for (const b of nz) s += matrix[a * N + b] * grad[b];
      variance += grad[a] * s;
    }
  }
  const out: DerivedEstimate = { value, uncertainty: Math.sqrt(Math.max(0, variance)), sensitivities: [] };
  // Made when read: most callers want the value and its uncertainty only.
  Object.defineProperty(out, 'sensitivities', { enumerable: true, configurable: true, get: () => Array.from(indices, (index, a) => ({ index, derivative: grad[a] })) });
  return out;
}
