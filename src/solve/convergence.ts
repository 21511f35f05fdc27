/**
 * Shared pieces of the fixed-point and root solvers: tolerances, the scaled residual, the
 * iteration history, bounds, input checks and the assembly of a SolveResult.
 *
 * Convergence test (per variable i, for x = g(x)):
 *     |g_i(x) - x_i| <= rtol * |x_i| + atol_i
 * The scaled residual is max_i |g_i(x) - x_i| / (rtol |x_i| + atol_i); converged when <= 1.
 * For F(x) = 0 the scale of residual i is the problem's tol_i.
 */
import type { EvaluationFailure, HistoryEntry, SolveOptions, SolveResult, Status } from './types.js';

export const DEFAULT_RTOL = 1e-10;
export const DEFAULT_ATOL = 1e-12;
/** Number of variables listed in SolveResult.worst. */
export const WORST_COUNT = 5;

export type StepMethod = HistoryEntry['method'];

export interface Tolerances {
  rtol: number;
  /** Absolute floor per variable. */
  atol: Float64Array;
}

/** rtol from the options, atol_i from the problem or else from the options (defaults above). */
export function fixedPointTolerances(
  n: number,
  problemAtol: Float64Array | undefined,
  options: SolveOptions | undefined,
): Tolerances {
  const rtol = options?.rtol ?? DEFAULT_RTOL;
  const atol = new Float64Array(n);
  const floor = options?.atol ?? DEFAULT_ATOL;
  for (let i = 0; i < n; i++) atol[i] = problemAtol ? problemAtol[i] : floor;
  return { rtol, atol };
}

/** The result of measuring one residual vector; reused across iterations (no allocation). */
export interface Measure {
  /** Largest |r_i|. */
  residual: number;
  /** Largest |r_i| / scale_i. */
  scaled: number;
  /** Index of the largest scaled residual. */
  index: number;
  /** Index of the first non-finite entry, or -1. */
  nonFinite: number;
}

export function newMeasure(): Measure {
  return { residual: 0, scaled: 0, index: -1, nonFinite: -1 };
}

/** Measures r = g - x against rtol |x_i| + atol_i. */
export function measureFixedPoint(
  x: Float64Array,
  gx: Float64Array,
  rtol: number,
  atol: Float64Array,
  m: Measure,
): Measure {
  let residual = 0;
  let scaled = 0;
  let index = -1;
  let nonFinite = -1;
  for (let i = 0; i < x.length; i++) {
    const gi = gx[i];
    if (!Number.isFinite(gi)) {
      if (nonFinite < 0) nonFinite = i;
      continue;
    }
    const r = Math.abs(gi - x[i]);
    const s = r / (rtol * Math.abs(x[i]) + atol[i]);
    if (r > residual) residual = r;
    if (s > scaled || index < 0) {
      scaled = s;
      index = i;
    }
  }
  m.residual = nonFinite >= 0 ? Infinity : residual;
  m.scaled = nonFinite >= 0 ? Infinity : scaled;
  m.index = nonFinite >= 0 ? nonFinite : index;
  m.nonFinite = nonFinite;
  return m;
}

/** Measures a residual vector f against per-row scales. */
export function measureScaled(f: Float64Array, scale: Float64Array, m: Measure): Measure {
  let residual = 0;
  let scaled = 0;
  let index = -1;
  let nonFinite = -1;
  for (let i = 0; i < f.length; i++) {
    const fi = f[i];
    if (!Number.isFinite(fi)) {
      if (nonFinite < 0) nonFinite = i;
      continue;
    }
    const r = Math.abs(fi);
    const s = r / scale[i];
    if (r > residual) residual = r;
    if (s > scaled || index < 0) {
      scaled = s;
      index = i;
    }
  }
  m.residual = nonFinite >= 0 ? Infinity : residual;
  m.scaled = nonFinite >= 0 ? Infinity : scaled;
  m.index = nonFinite >= 0 ? nonFinite : index;
  m.nonFinite = nonFinite;
  return m;
}

/** Fixed-point scale of variable i at x: rtol |x_i| + atol_i, written into out. */
export function fixedPointScale(x: Float64Array, rtol: number, atol: Float64Array, out: Float64Array): void {
  for (let i = 0; i < x.length; i++) out[i] = rtol * Math.abs(x[i]) + atol[i];
}

/** Label of variable i for messages. */
export function nameOf(i: number, names: readonly string[] | undefined): string {
  const name = names?.[i];
  return name !== undefined ? `${name} (x[${i}])` : `x[${i}]`;
}

/**
 * The WORST_COUNT largest scaled residuals, residual r_i with scale s_i. Non-finite residuals
 * come first, reported as Infinity.
 */
export function worstResiduals(
  r: Float64Array,
  scale: Float64Array,
  names: readonly string[] | undefined,
  count: number = WORST_COUNT,
): NonNullable<SolveResult['worst']> {
  const all: { index: number; name?: string; residual: number; scaled: number }[] = [];
  for (let i = 0; i < r.length; i++) {
    const finite = Number.isFinite(r[i]);
    const residual = finite ? Math.abs(r[i]) : Infinity;
    const scaled = finite ? residual / scale[i] : Infinity;
    const entry: { index: number; name?: string; residual: number; scaled: number } = { index: i, residual, scaled };
    if (names?.[i] !== undefined) entry.name = names[i];
    all.push(entry);
  }
  all.sort((a, b) => (b.scaled === a.scaled ? a.index - b.index : b.scaled > a.scaled ? 1 : -1));
  return all.slice(0, count);
}

/** worstResiduals for x = g(x) at x, with g(x) in gx. */
export function worstFixedPoint(
  x: Float64Array,
  gx: Float64Array,
  rtol: number,
  atol: Float64Array,
  names: readonly string[] | undefined,
): NonNullable<SolveResult['worst']> {
  const r = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) r[i] = gx[i] - x[i];
  const s = new Float64Array(x.length);
  fixedPointScale(x, rtol, atol, s);
  return worstResiduals(r, s, names);
}

/** What a fixed-point method measures its passes against. */
export interface FixedPointTolerance {
  rtol: number;
  atol: Float64Array;
  names: readonly string[] | undefined;
}

/** How a pass of a fixed-point method ended the iteration. */
export interface PassEnd {
  status: Status;
  message?: string;
  failure?: EvaluationFailure;
}

/**
 * One pass of a fixed-point method after g(x) -> gx: the failure g returned ends the iteration;
 * else the pass is measured into m and recorded in the history (as `step`), and a value that is
 * not finite or convergence ends it. Undefined: go on.
 */
export function endOfPass(
  failure: EvaluationFailure | null | undefined | void,
  x: Float64Array,
  gx: Float64Array,
  tol: FixedPointTolerance,
  m: Measure,
  history: HistoryRecorder,
  passes: number,
  step: StepMethod,
): PassEnd | undefined {
  if (failure) return { status: statusOfFailure(failure), message: failure.message, failure };
  measureFixedPoint(x, gx, tol.rtol, tol.atol, m);
  history.push(passes, m.scaled, m.residual, step);
  if (m.nonFinite >= 0) return { status: 'not-converged', message: nonFiniteMessage('g', gx[m.nonFinite], m.nonFinite, tol.names, passes) };
  if (m.scaled <= 1) return { status: 'converged' };
  return undefined;
}

/**
 * The result of a fixed-point method (direct, Wegstein, Anderson) at x, with g(x) in gx: the
 * measure of the last pass, the counts and the history, and the worst variables when the
 * iteration stopped short of convergence after at least one pass.
 */
export function fixedPointResult(
  method: 'direct' | 'wegstein' | 'anderson',
  status: Status,
  at: { x: Float64Array; gx: Float64Array; m: Measure; passes: number; iterations: number; history: HistoryRecorder },
  tol: FixedPointTolerance,
  message?: string,
  failure?: EvaluationFailure,
): SolveResult {
  const { x, gx, m, passes, iterations, history } = at;
  const result: SolveResult = {
    status, method, x, residual: m.residual, scaledResidual: m.scaled, passes, iterations, jacobians: 0, history: history.entries(),
  };
  if (message) result.message = message;
  if (failure) result.failure = failure;
  if (status !== 'converged' && passes > 0) result.worst = worstFixedPoint(x, gx, tol.rtol, tol.atol, tol.names);
  return result;
}

/**
 * History stored in preallocated columns while iterating, turned into HistoryEntry objects
 * once at the end (keeps the direct and Wegstein loops free of allocation).
 */
export class HistoryRecorder {
  private passes: Float64Array;
  private scaled: Float64Array;
  private residual: Float64Array;
  private methods: Uint8Array;
  private size = 0;
  private static readonly METHODS: readonly StepMethod[] = ['direct', 'wegstein', 'newton', 'anderson'];

  /** capacity: the most entries expected; storage starts small (at most 64) and doubles as needed. */
  constructor(capacity: number) {
    const c = Math.max(1, Math.min(64, Math.floor(capacity)));
    this.passes = new Float64Array(c);
    this.scaled = new Float64Array(c);
    this.residual = new Float64Array(c);
    this.methods = new Uint8Array(c);
  }

  push(pass: number, scaled: number, residual: number, method: StepMethod): void {
    if (this.size === this.passes.length) this.grow();
    this.passes[this.size] = pass;
    this.scaled[this.size] = scaled;
    this.residual[this.size] = residual;
    this.methods[this.size] = HistoryRecorder.METHODS.indexOf(method);
    this.size++;
  }

  get length(): number {
    return this.size;
  }

  entries(passOffset = 0): HistoryEntry[] {
    const out: HistoryEntry[] = new Array(this.size);
    for (let k = 0; k < this.size; k++) {
      out[k] = {
        pass: this.passes[k] + passOffset,
        scaled: this.scaled[k],
        residual: this.residual[k],
        method: HistoryRecorder.METHODS[this.methods[k]],
      };
    }
    return out;
  }

  private grow(): void {
    const c = this.passes.length * 2;
    const p = new Float64Array(c);
    p.set(this.passes);
    const s = new Float64Array(c);
    s.set(this.scaled);
    const r = new Float64Array(c);
    r.set(this.residual);
    const m = new Uint8Array(c);
    m.set(this.methods);
    this.passes = p;
    this.scaled = s;
    this.residual = r;
    this.methods = m;
  }
}

/** Clips x into [lower, upper] in place. */
export function clipToBounds(x: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined): void {
  if (lower) for (let i = 0; i < x.length; i++) if (x[i] < lower[i]) x[i] = lower[i];
  if (upper) for (let i = 0; i < x.length; i++) if (x[i] > upper[i]) x[i] = upper[i];
}

/** Index of the first non-finite entry, or -1. */
export function firstNonFinite(a: Float64Array): number {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) return i;
  return -1;
}

/**
 * Checks sizes, bounds and the start point of a problem. Returns a message for the first
 * problem found, or undefined when the input is usable.
 */
export function checkProblem(
  n: number,
  x0: Float64Array,
  lower: Float64Array | undefined,
  upper: Float64Array | undefined,
  names: readonly string[] | undefined,
  perVariable: { label: string; values: Float64Array | undefined; positive: boolean }[],
): string | undefined {
  if (!Number.isInteger(n) || n < 0) return `problem size n must be a non-negative integer, got ${n}`;
  if (x0.length !== n) return `x0 has ${x0.length} entries but n is ${n}`;
  if (lower && lower.length !== n) return `lower has ${lower.length} entries but n is ${n}`;
  if (upper && upper.length !== n) return `upper has ${upper.length} entries but n is ${n}`;
  if (names && names.length !== n) return `names has ${names.length} entries but n is ${n}`;
  for (const v of perVariable) {
    if (!v.values) continue;
    if (v.values.length !== n) return `${v.label} has ${v.values.length} entries but n is ${n}`;
    for (let i = 0; i < n; i++) {
      const a = v.values[i];
      if (!Number.isFinite(a) || (v.positive ? a <= 0 : a < 0)) {
        return `${v.label} of ${nameOf(i, names)} must be a finite ${v.positive ? 'positive' : 'non-negative'} number, got ${a}`;
      }
    }
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x0[i])) return `start value of ${nameOf(i, names)} is ${x0[i]}; give a finite number`;
    if (lower && upper && lower[i] > upper[i]) {
      return `lower bound ${lower[i]} of ${nameOf(i, names)} is above its upper bound ${upper[i]}`;
    }
  }
  return undefined;
}

export function statusOfFailure(failure: EvaluationFailure): Status {
  return failure.kind;
}

/** A result for input that could not be solved at all (bad sizes, bad start point). */
export function invalidInput(method: string, x0: Float64Array, message: string): SolveResult {
  const x = new Float64Array(x0.length);
  for (let i = 0; i < x0.length; i++) x[i] = Number.isFinite(x0[i]) ? x0[i] : 0;
  return {
    status: 'invalid',
    method,
    x,
    residual: Infinity,
    scaledResidual: Infinity,
    passes: 0,
    iterations: 0,
    jacobians: 0,
    history: [],
    message,
  };
}

/** Message for an evaluation that produced a non-finite value. */
export function nonFiniteMessage(
  what: string,
  value: number,
  index: number,
  names: readonly string[] | undefined,
  pass: number,
): string {
  return `${what} returned ${value} for ${nameOf(index, names)} at pass ${pass}; the last finite iterate is kept and is not a solution`;
}
