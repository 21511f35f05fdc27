/**
 * One point of a study: parameters set, optional targets held by adjusting other parameters,
 * the flowsheet solved. Targets are solved together with the tear equations by Newton on the
 * augmented system  [g(x; u) - x ; y(x; u) - y*] = 0  (unknowns: tear values x and adjusted
 * parameters u within their bounds), not by a slow loop around the whole solve. A parameter
 * change inside the iteration is a new model from the parameter layer and a runtime that
 * rebuilds only the block that changed.
 *
 * A point that fails from a continued start (a neighbour's solution) is solved again from a
 * cold start, and then by the other methods, before it is reported as failed: a row of a sweep
 * is the answer a single solve of the same inputs gives.
 */
import { InputError } from '../diagnostics.js';
import { computeBalance } from '../flowsheet/balance.js';
import { closureTolerance } from '../flowsheet/closure.js';
import type { Model } from '../flowsheet/model.js';
import { assembleResult, type TargetReport } from '../flowsheet/result.js';
import { createRuntime, type Runtime } from '../flowsheet/runtime.js';
import { solveFlowsheet, type FlowsheetResult } from '../flowsheet/solve.js';
import { freshFeed, readTears, setTears, tearProblem } from '../flowsheet/tear-problem.js';
import { solveRoot } from '../solve/index.js';
import type { EvaluationFailure, MethodName, RootProblem, SolveResult, Status } from '../solve/types.js';
import { parseQuantity, toUnit, UnitError } from '../units/index.js';
import { parseOutput, type OutputRef } from './outputs.js';
import { assertVariable, checkUnit, checkValue, coupled, fromSI, parameter, toSI, withValues, type Parameter, type ParameterValue } from './parameters.js';

export type { TargetReport } from '../flowsheet/result.js';

export interface TargetSpec {
  text: string;
  output: OutputRef;
  /** Target value, SI. */
  value: number;
  by: Parameter;
  /** Bounds of the adjusted parameter, SI. */
  lower: number;
  upper: number;
  /** The unit the bounds were written in ('' for a plain number): reports speak it. */
  unit: string;
  /** The unit the target's value was written in (reports give the output in it; else the file's display unit). */
  valueUnit?: string;
  /** Absolute tolerance on the output, SI; undefined: from the solve's tolerance. */
  tolerance?: number;
}

export interface PointResult {
  status: Status;
  result?: FlowsheetResult;
  message?: string;
  /** Continuation vector for the next point (tears, then adjusted parameters). */
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
  /** Relative tolerance of the tears (default: the file's). */
  rtol?: number;
  /** A runtime owned by the caller (reused across points). */
  runtime?: Runtime;
}

/** Parses `OUTPUT = VALUE [unit]`, the adjusted parameter and its bounds `LOW:HIGH [unit]`. */
export function parseTarget(model: Model, text: string, by: string, within: string | undefined, tolerance?: number): TargetSpec {
  const m = /^\s*([^=]+?)\s*=\s*(.+?)\s*$/.exec(text);
  if (!m) throw err(`target \`${text}\` must be written \`OUTPUT = VALUE\``, 'for example --target "streams.recycle.fractions.N2 = 0.10"');
  const output = parseOutput(m[1], model);
  if (output.unit !== undefined) throw err(`target \`${text}\`: give the unit with the value, not in brackets`, 'for example --target "streams.purge.total = 2 kmol/h"');
  let value: number;
  try {
    value = parseQuantity(m[2], output.dimension, { atmosphere: model.thermo.atmosphere }).value;
  } catch (e) {
    if (e instanceof UnitError) throw err(`target \`${text}\`: ${e.message}`, e.help);
    throw e;
  }
  if (!Number.isFinite(value)) throw err(`target \`${text}\`: the value must be a finite number`);
  const p = parameter(model, by);
  assertVariable(model, p);
  let lower: number;
  let upper: number;
  let unit = p.unit;
  if (within === undefined) {
    if (p.dimension === undefined) {
      lower = p.bounds.min ?? p.bounds.above ?? 0;
      upper = p.bounds.max ?? 1;
    } else {
      throw err(`target \`${text}\`: give bounds for \`${by}\` with --within LOW:HIGH`, `for example --within "${round(fromSI(model, p, p.value) * 0.5)}:${round(fromSI(model, p, p.value) * 1.5)} ${p.unit}"`);
    }
  } else {
    const w = /^\s*([-+]?[\d.eE+-]+)\s*:\s*([-+]?[\d.eE+-]+)\s*(.*)$/.exec(within);
    if (!w) throw err(`--within \`${within}\` must be LOW:HIGH with an optional unit`, 'for example --within 0.001:0.2 or --within "10:14 m3/h"');
    const u = w[3].trim() || undefined;
    if (u) checkUnit(model, p, u);
    else if (p.dimension !== undefined && p.unit === '') throw err(`--within needs a unit for \`${by}\``);
    unit = u ?? p.unit;
    lower = toSI(model, p, Number(w[1]), u);
    upper = toSI(model, p, Number(w[2]), u);
    if (!(Number.isFinite(lower) && Number.isFinite(upper)) || !(lower < upper)) throw err(`--within \`${within}\`: LOW must be below HIGH`);
  }
  // Both bounds must be values the file accepts (checked once, here).
  for (const b of [lower, upper]) {
    const bad = checkValue(p, b);
    if (bad) throw err(`target \`${text}\`: the bound ${round(fromSI(model, p, b, unit))}${unit ? ` ${unit}` : ''} of \`${by}\` is outside what the file accepts: ${bad}`, 'keep --within inside the range the file accepts');
    withValues(model, [{ parameter: p, value: b }], { structure: false });
  }
  const written = m[2].trim().replace(/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*/, '');
  return { text: `${output.path} = ${m[2]}`, output, value, by: p, lower, upper, unit, valueUnit: written || undefined, tolerance };
}

/** The target's tolerance on its output: given, else from the solve's tolerance. */
export function targetTolerance(t: TargetSpec, rtol: number): number {
  return t.tolerance ?? Math.max(closureTolerance(rtol) * Math.abs(t.value), 1e-12);
}

/** Solves one point; a combination of values the file refuses is status `invalid` with the message. */
export function solvePoint(model: Model, values: readonly ParameterValue[], opts: PointOptions = {}): PointResult {
  let base: Model;
  try {
    base = withValues(model, values);
  } catch (e) {
    if (e instanceof InputError) return { status: 'invalid', message: e.diagnostics.filter((d) => d.severity === 'error').map((d) => d.message).join('; ') };
    throw e;
  }
  const runtime = opts.runtime ?? createRuntime(base);
  const attempt = (o: PointOptions): PointResult => ((opts.targets ?? []).length === 0 ? plain(base, { ...o, runtime }) : solveTargets(base, opts.targets!, { ...o, runtime }));
  let r = attempt(opts);
  // Infeasible is an answer (no steady state, or a target out of reach), whatever the start.
  if (r.status === 'converged' || r.status === 'invalid' || r.status === 'infeasible') return r;
  // Fall back: a cold start with the file's method, then the other methods.
  const tried: string[] = [`${opts.start ? 'from the neighbour' : 'cold'} (${opts.method ?? base.solver.method})`];
  const plans: PointOptions[] = [];
  if (opts.start || opts.method) plans.push({ ...opts, start: undefined, jacobian: undefined, method: undefined });
  for (const m of ['newton', 'wegstein', 'direct'] as const) {
    if (m !== (opts.method ?? base.solver.method)) plans.push({ ...opts, start: undefined, jacobian: undefined, method: m });
  }
  const first = r;
  for (const p of plans) {
    const again = attempt(p);
    tried.push(`cold (${p.method ?? base.solver.method})`);
    if (again.status === 'converged') return again;
    // An infeasible answer from any start is the answer (no steady state exists).
    if (again.status === 'infeasible' && r.status !== 'infeasible') r = again;
  }
  if (r === first && r.message) r = { ...r, message: `${r.message} (also tried: ${tried.slice(1).join(', ')})` };
  return r;
}

function plain(model: Model, opts: PointOptions): PointResult {
  const r = solveFlowsheet(model, { method: opts.method, maxPasses: opts.maxPasses, start: opts.start, jacobian: opts.jacobian, rtol: opts.rtol, runtime: opts.runtime });
  const ok = r.status === 'converged';
  return { status: r.status, result: r, message: r.message, start: ok ? r.x : undefined, jacobian: ok ? r.jacobian : undefined };
}

function solveTargets(model: Model, targets: readonly TargetSpec[], opts: PointOptions): PointResult {
  const k = targets.length;
  const rt = opts.runtime!;
  const rtol = opts.rtol ?? model.solver.rtol;
  if (targets.some((t, j) => targets.slice(0, j).some((o) => coupled(model, o.by, t.by)))) {
    return { status: 'invalid', message: 'two targets adjust the same parameter (or two that set each other, as the outlets of a two-outlet splitter); each target needs one of its own' };
  }

  // Start: adjusted parameters at their model values (clipped into bounds), or from the neighbour.
  const u0 = targets.map((t) => Math.min(t.upper, Math.max(t.lower, t.by.value)));
  let xStart: Float64Array | undefined;
  if (opts.start) {
    const N0 = opts.start.length - k;
    for (let j = 0; j < k; j++) u0[j] = opts.start[N0 + j];
    xStart = opts.start.subarray(0, N0);
  }
  let lastU: number[] | null = null;
  let lastModel: Model | null = null;
  const modelAt = (u: ArrayLike<number>): Model | EvaluationFailure => {
    if (lastU && lastModel && lastU.every((v, j) => v === u[j])) return lastModel;
    try {
      lastModel = withValues(model, targets.map((t, j) => ({ parameter: t.by, value: u[j] })), { structure: false });
      lastU = Array.from(u);
      return lastModel;
    } catch (e) {
      if (e instanceof InputError) return { kind: 'invalid', message: e.diagnostics.map((d) => d.message).join('; ') };
      throw e;
    }
  };
  // A converged flowsheet at the start values gives the tear start and their tolerances.
  const m0 = modelAt(u0);
  if (!('units' in m0)) return { status: 'invalid', message: m0.message };
  let first = solveFlowsheet(m0, { runtime: rt, start: xStart, method: opts.method, maxPasses: opts.maxPasses, rtol });
  let startPasses = 0;
  if (first.status !== 'converged') {
    // No steady state at the start values (the file's own conversion beyond what a reactant
    // allows, say) says nothing of the other values within the bounds: start from the first of
    // the bounds' midpoint, lower and upper ends that has one.
    for (const alt of [targets.map((t) => (t.lower + t.upper) / 2), targets.map((t) => t.lower), targets.map((t) => t.upper)]) {
      const ma = modelAt(alt);
      if (!('units' in ma)) continue;
      const fa = solveFlowsheet(ma, { runtime: rt, method: opts.method, maxPasses: opts.maxPasses, rtol });
      if (fa.status === 'converged') {
        startPasses += first.passes;
        first = fa;
        alt.forEach((v, j) => (u0[j] = v));
        break;
      }
      startPasses += fa.passes;
    }
  }
  const N = first.x.length;
  const tp = tearProblem(rt, first.x, freshFeed(rt));
  const n = N + k;
  const z0 = new Float64Array(n);
  z0.set(first.x);
  for (let j = 0; j < k; j++) z0[N + j] = u0[j];
  const lower = new Float64Array(n);
  const upper = new Float64Array(n).fill(Infinity);
  const tol = new Float64Array(n);
  lower.set(tp.lower ?? new Float64Array(N));
  for (let i = 0; i < N; i++) tol[i] = rtol * Math.abs(first.x[i]) + (tp.atol?.[i] ?? 1e-12);
  const tolerances = targets.map((t) => targetTolerance(t, rtol));
  targets.forEach((t, j) => {
    lower[N + j] = t.lower;
    upper[N + j] = t.upper;
    tol[N + j] = tolerances[j];
  });
  const gx = new Float64Array(N);
  const names = [...(tp.names ?? []), ...targets.map((t) => `target ${t.text}`)];
  const problem: RootProblem = {
    n, x0: z0, lower, upper, tol, names,
    typical: Float64Array.from(z0, (v, i) => (i < N ? Math.max(Math.abs(v), tol[i] / rtol, 1e-8) : Math.max(Math.abs(v), (upper[i] - lower[i]) * 1e-3, 1e-12))),
    f(z, out) {
      const m = modelAt(z.subarray(N));
      if (!('units' in m)) return m;
      rt.load(m);
      const x = z.subarray(0, N);
      setTears(rt, x);
      rt.pass();
      readTears(rt, gx);
      for (let i = 0; i < N; i++) out[i] = gx[i] - x[i];
      const view = assembleResult(rt, placeholder(), x, computeBalance(rt), [], undefined, { densities: false });
      for (let j = 0; j < k; j++) {
        const y = targets[j].output.read(view);
        out[N + j] = Number.isFinite(y) ? y - targets[j].value : Number.NaN;
      }
    },
  };
  const sol: SolveResult = solveRoot(problem, { rtol, maxPasses: opts.maxPasses ?? 2000 });
  const u = Array.from(sol.x.subarray(N));
  const mU = modelAt(u);
  if (!('units' in mU)) return { status: 'invalid', message: mU.message };
  const final = solveFlowsheet(mU, { runtime: rt, start: Float64Array.from(sol.x.subarray(0, N)), method: opts.method, maxPasses: opts.maxPasses, rtol });
  const summary = { passes: final.passes + sol.passes + first.passes + startPasses, iterations: final.iterations + sol.iterations, jacobians: final.jacobians + sol.jacobians,
    method: `${first.method}, then newton on tears and targets${final.method ? ` (final solve: ${final.method})` : ''}` };
  const reports: TargetReport[] = targets.map((t, j) => {
    const y = t.output.read(final);
    // Met only on a steady state: an output read off a state that is not one (a reactor short of
    // a reactant) reaches nothing.
    const met = final.status === 'converged' && Math.abs(y - t.value) <= tolerances[j];
    const near = 1e-6 * (t.upper - t.lower);
    const atLower = u[j] <= t.lower + near;
    const atUpper = u[j] >= t.upper - near;
    return {
      text: t.text, output: y, target: t.value, tolerance: tolerances[j], input: u[j], inputPath: t.by.path, met,
      bound: !met && atLower ? 'lower' : !met && atUpper ? 'upper' : undefined,
      shown: { output: outputText(model, t, y), input: inputText(model, t, u[j]) },
    };
  });
  const start = new Float64Array(N + k);
  start.set(final.x);
  for (let j = 0; j < k; j++) start[N + j] = u[j];
  const withReports = (r: FlowsheetResult, status: Status, message?: string): FlowsheetResult => ({ ...r, ...summary, status, ...(message ? { message } : {}), targets: reports });
  if (final.status !== 'converged') {
    return { status: final.status, result: withReports(final, final.status, final.message), message: final.message, targets: reports };
  }
  const missed = reports.filter((r) => !r.met);
  if (missed.length === 0) {
    return { status: 'converged', result: withReports(final, 'converged'), start, targets: reports };
  }
  if (k === 1) {
    // One target: it is infeasible exactly when its value lies outside what the bounds reach.
    const t = targets[0];
    // Each bound, or just inside it where the output is not defined at the bound itself (the
    // composition of a stream that a splitter empties at a fraction of 0 or 1).
    const ends = [t.lower, t.upper].map((bound, side) => {
      for (const b of [bound, bound + (side === 0 ? 1 : -1) * 1e-6 * (t.upper - t.lower)]) {
        const mb = modelAt([b]);
        if (!('units' in mb)) return undefined;
        const fr = solveFlowsheet(mb, { runtime: rt, start: final.x, method: opts.method, maxPasses: opts.maxPasses, rtol });
        if (fr.status !== 'converged') continue;
        const y = t.output.read(fr);
        if (Number.isFinite(y)) return { b, y, result: fr };
      }
      return undefined;
    });
    if (ends[0] && ends[1]) {
      const [lo, hi] = [ends[0], ends[1]];
      const outside = (t.value - lo.y) * (t.value - hi.y) > 0;
      if (outside) {
        const near = Math.abs(lo.y - t.value) < Math.abs(hi.y - t.value) ? lo : hi;
        const bound = near === lo ? 'lower' : 'upper';
        const rep: TargetReport = {
          text: t.text, output: near.y, target: t.value, tolerance: tolerances[0], input: near.b, inputPath: t.by.path, met: false, bound,
          shown: { output: outputText(model, t, near.y), input: inputText(model, t, near.b) },
        };
        const message = infeasibleMessage(model, t, near.y, bound === 'lower' ? t.lower : t.upper, bound, lo.y, hi.y);
        return { status: 'infeasible', result: { ...near.result, ...summary, status: 'infeasible', message, targets: [rep] }, message, targets: [rep] };
      }
    }
  }
  const blocked = missed.filter((r) => r.bound);
  const parts = missed.map((r) => {
    const t = targets[reports.indexOf(r)];
    return `target \`${r.text}\` not met: closest ${r.shown!.output} with \`${r.inputPath}\` = ${r.shown!.input}${r.bound ? ` (stopped by its ${r.bound} bound${atPhysicalLimit(t, r.bound, r.input) ? `, as far as \`${r.inputPath}\` can go: change the target or adjust another input` : '; widen --within or change the target'})` : ''}`;
  });
  const status: Status = blocked.length > 0 ? 'infeasible' : 'not-converged';
  const message = `${parts.join('; ') || 'targets not met'}${blocked.length ? '' : `; ${sol.message ?? ''}`}`;
  return { status, result: withReports(final, status, message), message, targets: reports };
}

/** A value of the target's output as a person reads it (the unit of the target's value, else the display unit). */
function outputText(model: Model, t: TargetSpec, y: number): string {
  const d = t.output.dimension;
  if (d === 'dimensionless') return t.valueUnit === '%' ? `${fmt(y * 100)} %` : fmt(y);
  const unit = t.valueUnit ?? displayUnit(model, d);
  if (!unit) return `${fmt(y)} (SI)`;
  return `${fmt(toUnit(y, d, unit, { atmosphere: model.thermo.atmosphere }))} ${unit}`;
}

/** The adjusted parameter as a person reads it (the unit of its bounds). */
function inputText(model: Model, t: TargetSpec, u: number): string {
  return `${fmt(fromSI(model, t.by, u, t.unit || undefined))}${t.unit ? ` ${t.unit}` : ''}`;
}

function displayUnit(model: Model, d: string): string | undefined {
  return d === 'molarFlow' ? model.display.flowUnit : d === 'pressure' ? model.display.pressureUnit : d === 'temperature' ? model.display.temperatureUnit : undefined;
}

/** Why a single target is out of reach, in the user's units, with advice that applies. */
function infeasibleMessage(model: Model, t: TargetSpec, y: number, b: number, bound: 'lower' | 'upper', yLo: number, yHi: number): string {
  const unit = t.unit ? ` ${t.unit}` : '';
  const inU = (v: number) => fmt(fromSI(model, t.by, v, t.unit));
  const head = `target \`${t.text}\` cannot be met with \`${t.by.path}\` within ${inU(t.lower)} to ${inU(t.upper)}${unit}: the closest is ${outputText(model, t, y)} at its ${bound} bound ${inU(b)}${unit}`;
  if (Math.abs(yHi - yLo) <= 1e-12 * Math.max(1, Math.abs(yLo))) return `${head}; the output does not change with \`${t.by.path}\` (it does not depend on it): adjust another input`;
  if (atPhysicalLimit(t, bound, b)) {
    return `${head}, which is as far as \`${t.by.path}\` can go; change the target or adjust another input`;
  }
  return `${head}; widen --within or change the target`;
}

/** Whether a bound reached is also the farthest the parameter can go by the file's rules (a fraction of 1). */
function atPhysicalLimit(t: TargetSpec, bound: 'lower' | 'upper', b: number): boolean {
  const physical = bound === 'upper' ? t.by.bounds.max : (t.by.bounds.min ?? t.by.bounds.above);
  return physical !== undefined && Math.abs(b - physical) <= 1e-9 * Math.max(1, Math.abs(physical));
}

function placeholder(): SolveResult {
  return { status: 'converged', method: 'target', x: new Float64Array(0), residual: 0, scaledResidual: 0, passes: 0, iterations: 0, jacobians: 0, history: [] };
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

function round(v: number): string {
  return Number(v.toPrecision(3)).toString();
}

function err(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}
