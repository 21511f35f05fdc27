/**
 * One point of a study: inputs set by path, optional targets held by adjusting other inputs,
 * the flowsheet solved. Targets are solved together with the tear equations by Newton on the
 * augmented system  [g(x; u) - x ; y(x; u) - y*] = 0  (unknowns: tear values x and adjusted
 * inputs u within their bounds), not by a slow loop around the whole solve.
 */
import { InputError } from '../diagnostics.js';
import { buildRuntime, type Runtime } from '../flowsheet/runtime.js';
import { collectResult, freshFeed, readTears, setTears, solveFlowsheet, tearProblem, type FlowsheetResult } from '../flowsheet/solve.js';
import { solveRoot } from '../solve/index.js';
import type { EvaluationFailure, MethodName, RootProblem, SolveResult, Status } from '../solve/types.js';
import { parseQuantity, UnitError, type Dimension } from '../units/index.js';
import { parseOutput, type OutputRef } from './outputs.js';
import type { InputRef, ParametricFlowsheet } from './params.js';

export interface InputValue {
  ref: InputRef;
  value: number;
  /** Unit of `value`; the file's unit when absent. */
  unit?: string;
}

export interface TargetSpec {
  text: string;
  output: OutputRef;
  /** Target value, SI. */
  value: number;
  by: InputRef;
  /** Bounds of the adjusted input, SI. */
  lower: number;
  upper: number;
  /** Absolute tolerance on the output, SI. */
  tolerance: number;
}

export interface TargetReport {
  text: string;
  /** Output reached, SI. */
  output: number;
  target: number;
  /** Adjusted input, SI. */
  input: number;
  inputPath: string;
  met: boolean;
  /** Which bound stopped it, when it is infeasible. */
  bound?: 'lower' | 'upper';
}

export interface PointResult {
  status: Status;
  result?: FlowsheetResult;
  message?: string;
  /** Opaque continuation vector for the next point (tears, then adjusted inputs). */
  start?: Float64Array;
  /** The tear Jacobian of this point (no targets), for the next point's Newton to start from. */
  jacobian?: Float64Array;
  targets?: TargetReport[];
}

export interface PointOptions {
  targets?: readonly TargetSpec[];
  start?: Float64Array;
  /** A neighbour's tear Jacobian (PointResult.jacobian). */
  jacobian?: Float64Array;
  method?: MethodName;
  maxPasses?: number;
}

/** SI unit spelled for the unit parser, per dimension. */
const SI_UNIT: Partial<Record<Dimension, string>> = {
  pressure: 'Pa', temperature: 'K', molarFlow: 'mol/s', massFlow: 'kg/s', volumeFlow: 'm3/s', molarMass: 'kg/mol', density: 'kg/m3',
};

function siValue(ref: InputRef, v: number): InputValue {
  if (ref.dimension === undefined) return { ref, value: v };
  const u = SI_UNIT[ref.dimension];
  if (!u) throw new InputError([{ severity: 'error', message: `\`${ref.text}\` (${ref.dimension}) cannot be adjusted by a target`, help: 'adjust a fraction, a conversion, a flow, a temperature or a pressure' }]);
  return { ref, value: v, unit: u };
}

/** Parses `PATH = VALUE [unit]`, the adjusted input and its bounds `LOW:HIGH [unit]`. */
export function parseTarget(p: ParametricFlowsheet, text: string, by: string, within: string | undefined, tolerance?: number): TargetSpec {
  const m = /^\s*([^=]+?)\s*=\s*(.+?)\s*$/.exec(text);
  if (!m) throw err(`target \`${text}\` must be written \`OUTPUT = VALUE\``, 'for example --target "streams.recycle.fractions.N2 = 0.10"');
  const model = p.base.model;
  const output = parseOutput(m[1], model);
  if (output.unit !== undefined) throw err(`target \`${text}\`: give the unit with the value, not in brackets`, 'for example --target "streams.purge.total = 2 kmol/h"');
  let value: number;
  try {
    value = output.dimension === 'dimensionless'
      ? parseQuantity(m[2], 'dimensionless').value
      : parseQuantity(m[2], output.dimension, { atmosphere: model.thermo.atmosphere }).value;
  } catch (e) {
    if (e instanceof UnitError) throw err(`target \`${text}\`: ${e.message}`, e.help);
    throw e;
  }
  if (!Number.isFinite(value)) throw err(`target \`${text}\`: the value must be a finite number`);
  const ref = p.input(by);
  let lower: number;
  let upper: number;
  if (within === undefined) {
    if (ref.dimension === undefined) {
      lower = 0;
      upper = 1;
    } else {
      throw err(`target \`${text}\`: give bounds for \`${by}\` with --within LOW:HIGH`, `for example --within "${ref.baseValue * 0.5}:${ref.baseValue * 1.5} ${SI_UNIT[ref.dimension] ?? ''}"`);
    }
  } else {
    const w = /^\s*([-+]?[\d.eE+-]+)\s*:\s*([-+]?[\d.eE+-]+)\s*(.*)$/.exec(within);
    if (!w) throw err(`--within \`${within}\` must be LOW:HIGH with an optional unit`, 'for example --within 0.001:0.2 or --within "10:14 m3/h"');
    const unit = w[3].trim() || undefined;
    if (unit) p.checkUnit(ref, unit);
    else if (ref.dimension !== undefined && ref.fileUnit === '') throw err(`--within needs a unit for \`${by}\``);
    lower = p.toSI(ref, Number(w[1]), unit);
    upper = p.toSI(ref, Number(w[2]), unit);
    if (!(Number.isFinite(lower) && Number.isFinite(upper)) || !(lower < upper)) throw err(`--within \`${within}\`: LOW must be below HIGH`);
  }
  const tol = tolerance ?? Math.max(1e-9 * Math.abs(value), 1e-12);
  return { text: `${output.path} = ${m[2]}`, output, value, by: ref, lower, upper, tolerance: tol };
}

/** Solves one point; input errors become status `invalid` with the message. */
export function solvePoint(p: ParametricFlowsheet, values: readonly InputValue[], opts: PointOptions = {}): PointResult {
  const targets = opts.targets ?? [];
  let base;
  try {
    base = values.length ? p.model(values).model : p.base.model;
  } catch (e) {
    if (e instanceof InputError) return { status: 'invalid', message: e.diagnostics.filter((d) => d.severity === 'error').map((d) => d.message).join('; ') };
    throw e;
  }
  if (targets.length === 0) {
    const r = solveFlowsheet(base, { method: opts.method, maxPasses: opts.maxPasses, start: opts.start, jacobian: opts.jacobian });
    const ok = r.status === 'converged';
    return { status: r.status, result: r, message: r.message, start: ok ? r.x : undefined, jacobian: ok ? r.jacobian : undefined };
  }
  return solveTargets(p, values, targets, opts);
}

function solveTargets(p: ParametricFlowsheet, values: readonly InputValue[], targets: readonly TargetSpec[], opts: PointOptions): PointResult {
  const k = targets.length;
  for (const t of targets) {
    if (values.some((v) => v.ref.text === t.by.text)) {
      return { status: 'invalid', message: `\`${t.by.text}\` is both set by the study and adjusted by target \`${t.text}\`` };
    }
  }
  const byPaths = new Set(targets.map((t) => t.by.text));
  if (byPaths.size < k) return { status: 'invalid', message: 'two targets adjust the same input; each target needs an input of its own' };

  // Start: adjusted inputs at their file values (clipped into bounds), or from the neighbour.
  const u0 = targets.map((t) => Math.min(t.upper, Math.max(t.lower, t.by.baseValue)));
  let xStart: Float64Array | undefined;
  if (opts.start) {
    const N0 = opts.start.length - k;
    for (let j = 0; j < k; j++) u0[j] = opts.start[N0 + j];
    xStart = opts.start.subarray(0, N0);
  }
  let cachedU: number[] | null = null;
  let rt: Runtime | null = null;
  const runtimeAt = (u: ArrayLike<number>): Runtime | EvaluationFailure => {
    if (cachedU && rt && cachedU.every((v, j) => v === u[j])) return rt;
    try {
      const model = p.model([...values, ...targets.map((t, j) => siValue(t.by, u[j]))]).model;
      rt = buildRuntime(model);
      cachedU = Array.from(u as ArrayLike<number>);
      return rt;
    } catch (e) {
      if (e instanceof InputError) return { kind: 'invalid', message: e.diagnostics.map((d) => d.message).join('; ') };
      throw e;
    }
  };
  // A converged flowsheet at the start values gives the tear start and their tolerances.
  const rt0 = runtimeAt(u0);
  if (!('pass' in rt0)) return { status: 'invalid', message: rt0.message };
  const first = solveFlowsheet(rt0.model, { runtime: rt0, start: xStart, method: opts.method, maxPasses: opts.maxPasses });
  const N = first.x.length;
  const feed0 = freshFeed(rt0);
  const tp = tearProblem(rt0, first.x, feed0);
  const n = N + k;
  const z0 = new Float64Array(n);
  z0.set(first.x);
  for (let j = 0; j < k; j++) z0[N + j] = u0[j];
  const lower = new Float64Array(n);
  const upper = new Float64Array(n).fill(Infinity);
  const tol = new Float64Array(n);
  lower.set(tp.lower ?? new Float64Array(N));
  const rtol = rt0.model.solver.rtol;
  for (let i = 0; i < N; i++) tol[i] = rtol * Math.abs(first.x[i]) + (tp.atol?.[i] ?? 1e-12);
  targets.forEach((t, j) => {
    lower[N + j] = t.lower;
    upper[N + j] = t.upper;
    tol[N + j] = t.tolerance;
  });
  const gx = new Float64Array(N);
  const names = [...(tp.names ?? []), ...targets.map((t) => `target ${t.text}`)];
  const problem: RootProblem = {
    n, x0: z0, lower, upper, tol, names,
    typical: Float64Array.from(z0, (v, i) => (i < N ? Math.max(Math.abs(v), tol[i] / rtol, 1e-8) : Math.max(Math.abs(v), (upper[i] - lower[i]) * 1e-3, 1e-12))),
    f(z, out) {
      const r = runtimeAt(z.subarray(N));
      if (!('pass' in r)) return r;
      const x = z.subarray(0, N);
      setTears(r, x);
      r.pass();
      readTears(r, gx);
      for (let i = 0; i < N; i++) out[i] = gx[i] - x[i];
      const view = collectResult(r, placeholder(x), freshFeed(r), []);
      for (let j = 0; j < k; j++) {
        const y = targets[j].output.read(view);
        out[N + j] = Number.isFinite(y) ? y - targets[j].value : Number.NaN;
      }
    },
  };
  const sol: SolveResult = solveRoot(problem, { rtol, maxPasses: opts.maxPasses ?? 2000 });
  const u = Array.from(sol.x.subarray(N));
  const rtU = runtimeAt(u);
  if (!('pass' in rtU)) return { status: 'invalid', message: rtU.message };
  const final = solveFlowsheet(rtU.model, { runtime: rtU, start: Float64Array.from(sol.x.subarray(0, N)), method: opts.method, maxPasses: opts.maxPasses });
  final.passes += sol.passes + first.passes;
  final.iterations += sol.iterations;
  final.jacobians += sol.jacobians;
  final.method = `${first.method}, then newton on tears and targets${final.method ? ` (final solve: ${final.method})` : ''}`;
  const reports: TargetReport[] = targets.map((t, j) => {
    const y = t.output.read(final);
    const met = Math.abs(y - t.value) <= t.tolerance * 10;
    const near = 1e-6 * (t.upper - t.lower);
    const atLower = u[j] <= t.lower + near;
    const atUpper = u[j] >= t.upper - near;
    return { text: t.text, output: y, target: t.value, input: u[j], inputPath: t.by.text, met, bound: !met && atLower ? 'lower' : !met && atUpper ? 'upper' : undefined };
  });
  const start = new Float64Array(n);
  start.set(final.x);
  for (let j = 0; j < k; j++) start[N + j] = u[j];
  if (final.status !== 'converged') {
    return { status: final.status, result: final, message: final.message, targets: reports };
  }
  const missed = reports.filter((r) => !r.met);
  if (missed.length === 0 && sol.status === 'converged') {
    return { status: 'converged', result: final, start, targets: reports };
  }
  if (k === 1 && missed.length === 1) {
    // One target: it is infeasible exactly when its value lies outside what the bounds reach.
    const t = targets[0];
    const ends = [t.lower, t.upper].map((b) => {
      const r = runtimeAt([b]);
      if (!('pass' in r)) return undefined;
      const fr = solveFlowsheet(r.model, { runtime: r, start: final.x, method: opts.method, maxPasses: opts.maxPasses });
      return fr.status === 'converged' ? { b, y: t.output.read(fr), result: fr } : undefined;
    });
    if (ends[0] && ends[1]) {
      const [lo, hi] = [ends[0], ends[1]];
      const outside = (t.value - lo.y) * (t.value - hi.y) > 0;
      if (outside) {
        const near = Math.abs(lo.y - t.value) < Math.abs(hi.y - t.value) ? lo : hi;
        const bound = near === lo ? 'lower' : 'upper';
        const rep: TargetReport = { text: t.text, output: near.y, target: t.value, input: near.b, inputPath: t.by.text, met: false, bound };
        const message = `target \`${t.text}\` cannot be met with \`${t.by.text}\` within ${fmt(t.lower)} to ${fmt(t.upper)}: the closest is ${fmt(near.y)} at its ${bound} bound ${fmt(near.b)}; widen --within or change the target`;
        return { status: 'infeasible', result: { ...near.result, status: 'infeasible', message }, message, targets: [rep] };
      }
    }
  }
  const blocked = missed.filter((r) => r.bound);
  const parts = missed.map((r) => `target \`${r.text}\` not met: closest ${fmt(r.output)} with \`${r.inputPath}\` = ${fmt(r.input)}${r.bound ? ` (stopped by its ${r.bound} bound)` : ''}`);
  const status: Status = blocked.length > 0 ? 'infeasible' : 'not-converged';
  const message = `${parts.join('; ') || 'targets not met'}${blocked.length ? '; widen --within or change the target' : `; ${sol.message ?? ''}`}`;
  return { status, result: { ...final, status, message }, message, targets: reports };
}

function placeholder(x: Float64Array): SolveResult {
  return { status: 'converged', method: 'target', x, residual: 0, scaledResidual: 0, passes: 0, iterations: 0, jacobians: 0, history: [] };
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

function err(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}
