/**
 * Finite-difference Jacobians (Dennis and Schnabel, "Numerical Methods for Unconstrained
 * Optimization and Nonlinear Equations", 1983, Sec. 5.4, Alg. A5.6.3): forward differences with
 * a step relative to each variable, the base evaluation reused for every column, and columns
 * that share no residual row perturbed together in one evaluation (Curtis, Powell and Reid,
 * J. Inst. Maths Applics 13 (1974) 117-119).
 */
import type { EvaluationFailure, JacobianStructure } from './types.js';

const SQRT_EPS = Math.sqrt(Number.EPSILON);

/** What a finite-difference Jacobian needs of the system it differentiates. */
export interface DifferencedSystem {
  n: number;
  f(x: Float64Array, out: Float64Array): EvaluationFailure | void;
  lower?: Float64Array;
  upper?: Float64Array;
  typical: Float64Array;
  /** Rows of F that each column can change; undefined = dense. */
  rows?: readonly (readonly number[])[];
  groups: readonly (readonly number[])[];
  /** Scratch: x before the perturbations. */
  saved: Float64Array;
}

/**
 * Column groups for a finite-difference Jacobian: columns are taken in order and put into the
 * first group none of whose columns shares a row (the sequential method of Curtis, Powell and
 * Reid 1974). Without rows every column is its own group.
 */
export function columnGroups(n: number, rows?: readonly (readonly number[])[]): number[][] {
  if (!rows) return Array.from({ length: n }, (_, j) => [j]);
  const groups: number[][] = [];
  const used: Uint8Array[] = [];
  for (let j = 0; j < n; j++) {
    let placed = false;
    for (let g = 0; g < groups.length && !placed; g++) {
      if (rows[j].every((r) => used[g][r] === 0)) {
        groups[g].push(j);
        for (const r of rows[j]) used[g][r] = 1;
        placed = true;
      }
    }
    if (!placed) {
      const mark = new Uint8Array(n);
      for (const r of rows[j]) mark[r] = 1;
      groups.push([j]);
      used.push(mark);
    }
  }
  return groups;
}

/** Checks a JacobianStructure; returns a message or undefined. */
export function checkStructure(n: number, s: JacobianStructure): string | undefined {
  if (s.rows.length !== n) return `structure.rows has ${s.rows.length} entries but n is ${n}`;
  for (let j = 0; j < n; j++) {
    for (const r of s.rows[j]) {
      if (!Number.isInteger(r) || r < 0 || r >= n) return `structure.rows[${j}] names row ${r}, outside 0..${n - 1}`;
    }
  }
  if (s.groups) {
    const seen = new Int32Array(n).fill(-1);
    s.groups.forEach((group, g) => {
      for (const j of group) if (Number.isInteger(j) && j >= 0 && j < n) seen[j] = seen[j] === -1 ? g : -2;
    });
    for (let j = 0; j < n; j++) {
      if (seen[j] === -1) return `structure.groups leaves out column ${j}`;
      if (seen[j] === -2) return `structure.groups lists column ${j} more than once`;
    }
    for (const group of s.groups) {
      const rowOwner = new Int32Array(n).fill(-1);
      for (const j of group) {
        if (!Number.isInteger(j) || j < 0 || j >= n) return `structure.groups names column ${j}, outside 0..${n - 1}`;
        for (const r of s.rows[j]) {
          if (rowOwner[r] >= 0) return `structure.groups puts columns ${rowOwner[r]} and ${j}, which share row ${r}, in one group`;
          rowOwner[r] = j;
        }
      }
    }
  }
  return undefined;
}

export interface JacobianOutcome {
  failure?: EvaluationFailure;
  /** Column whose perturbation gave a non-finite residual, and the row and value. */
  nonFinite?: { column: number; row: number; value: number };
}

/**
 * Forward-difference Jacobian of F at x (F(x) given in f0) into J (n*n, row-major), one
 * evaluation per column group. h holds the steps actually used. Returns on the first failure.
 */
export function buildJacobian(
  sys: DifferencedSystem,
  x: Float64Array,
  f0: Float64Array,
  J: Float64Array,
  h: Float64Array,
  ft: Float64Array,
  countPass: () => void,
): JacobianOutcome {
  const { n, lower, upper, typical, rows, groups } = sys;
  for (let j = 0; j < n; j++) {
    let step = SQRT_EPS * Math.max(Math.abs(x[j]), typical[j]);
    if (upper && x[j] + step > upper[j]) step = -step;
    if (lower && x[j] + step < lower[j]) step = -step; // only reached after a reversal
    // Use the representable difference (Dennis and Schnabel, Alg. A5.6.3).
    h[j] = x[j] + step - x[j];
  }
  if (rows) J.fill(0); // a dense build writes every entry
  for (let g = 0; g < groups.length; g++) {
    const group = groups[g];
    for (let k = 0; k < group.length; k++) x[group[k]] += h[group[k]];
    const failure = sys.f(x, ft);
    countPass();
    // Restore exactly: x_j + h_j - h_j need not be x_j in floating point.
    for (let k = 0; k < group.length; k++) x[group[k]] = sys.saved[group[k]];
    if (failure) return { failure };
    for (let k = 0; k < group.length; k++) {
      const j = group[k];
      const hj = h[j];
      if (rows) {
        const rj = rows[j];
        for (let q = 0; q < rj.length; q++) {
          const r = rj[q];
          const v = (ft[r] - f0[r]) / hj;
          if (!Number.isFinite(v)) return { nonFinite: { column: j, row: r, value: ft[r] } };
          J[r * n + j] = v;
        }
      } else {
        for (let r = 0; r < n; r++) {
          const v = (ft[r] - f0[r]) / hj;
          if (!Number.isFinite(v)) return { nonFinite: { column: j, row: r, value: ft[r] } };
          J[r * n + j] = v;
        }
      }
    }
  }
  return {};
}

