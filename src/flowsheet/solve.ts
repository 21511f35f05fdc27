/**
 * Solving a flowsheet: the tear streams' component flows, T and P are the unknowns of a
 * fixed-point problem x = g(x), one full pass of the calculation order per evaluation.
 * The result is never a solution unless it converged with every flow non-negative and
 * every reactor able to meet its specification.
 */
import { solveFixedPoint } from '../solve/index.js';
import type { FixedPointProblem, MethodName, SolveResult, Status, EvaluationFailure, HistoryEntry } from '../solve/types.js';
import type { FeedResult } from '../blocks/feed.js';
import type { Stream, UnitSummary } from '../blocks/types.js';
import { computeBalance, type Balance } from './balance.js';
import { buildRuntime, type Runtime } from './runtime.js';
import { tearStructure } from './jacobian-structure.js';
import type { Model } from './model.js';
import type { Eos } from '../thermo/types.js';

/** Balance closure (relative) that a converged result must meet as well as the tear test. */
export const CLOSURE_TOL = 1e-9;
/** Wegstein's share of the budget under the default method before Newton takes over. */
export const AUTO_WEGSTEIN_PASSES = 20;
/** Direct passes before Newton when it starts cold. */
export const NEWTON_WARMUP_PASSES = 3;

export interface SolveFlowsheetOptions {
  method?: MethodName;
  rtol?: number;
  maxPasses?: number;
  /** Start from these tear values (length tears * (n + 2)), e.g. a neighbour's solution. */
  start?: Float64Array;
  eos?: Eos;
  /** Reuse a built runtime (sweeps): blocks and streams are reset and recomputed. */
  runtime?: Runtime;
  /** A neighbour's tear Jacobian (FlowsheetResult.jacobian) for Newton to start from. */
  jacobian?: Float64Array;
}

export interface StreamResult {
  flows: Float64Array;
  total: number;
  fractions: Float64Array;
  T: number;
  P: number;
  vaporFraction: number;
  /** kg/s */
  massFlow: number;
}

export interface LoopFigures {
  /** Recycle streams (closing a loop into a unit that also takes fresh material). */
  recycles: string[];
  /** Total recycle / total fresh feed (molar). */
  recycleRatio: number;
  freshFeed: number;
  /** Per key reactant: single-pass conversion (in its reactor) and overall (fresh feed to products). */
  conversions: Record<string, { unit: string; singlePass: number; overall: number }>;
}

export interface FlowsheetResult {
  status: Status;
  method: string;
  passes: number;
  iterations: number;
  jacobians: number;
  residual: number;
  scaledResidual: number;
  history: HistoryEntry[];
  message?: string;
  failure?: EvaluationFailure;
  /** Largest residuals at the end (not-converged). */
  worst?: SolveResult['worst'];
  tears: string[];
  order: string[];
  loops: string[][];
  feeds: FeedResult[];
  streams: Map<string, StreamResult>;
  streamOrder: string[];
  products: string[];
  units: Map<string, UnitSummary & { type: string }>;
  balance: Balance;
  loop: LoopFigures;
  /** The converged tear vector (to start a neighbour). */
  x: Float64Array;
  /** Newton's last tear Jacobian, when Newton ran (to start a neighbour). */
  jacobian?: Float64Array;
  warnings: string[];
  model: Model;
  /** Targets held, when the solve had any. */
  targets?: { text: string; output: number; target: number; input: number; inputPath: string; met: boolean; bound?: 'lower' | 'upper' }[];
}

/**
 * Runtimes built for a model, kept while the model lives: a model does not change after
 * validation, blocks reset their warm starts at each solve and the tears start from the feeds,
 * so a repeated solve of one model gives the same result without building again.
 */
const RUNTIMES = new WeakMap<Model, Runtime>();

function runtimeFor(model: Model, eos?: Eos): Runtime {
  if (eos) return buildRuntime(model, eos);
  let rt = RUNTIMES.get(model);
  if (!rt) {
    rt = buildRuntime(model);
    RUNTIMES.set(model, rt);
  }
  return rt;
}

export function solveFlowsheet(model: Model, opts: SolveFlowsheetOptions = {}): FlowsheetResult {
  const rt = opts.runtime ?? runtimeFor(model, opts.eos);
  for (const b of rt.blocks) b.reset?.();
  const { n } = rt;
  const T = rt.tearStreams.length;
  const m = rt.perTear;
  const N = T * m;
  const rtol = opts.rtol ?? model.solver.rtol;
  let feedTotal = 0;
  for (const f of rt.feeds) feedTotal += f.molarFlow;
  const warnings: string[] = [...model.warnings.map((w) => w.message), ...rt.feeds.flatMap((f) => f.warnings)];

  let result: SolveResult;
  let balance: Balance;
  if (N === 0) {
    rt.pass();
    balance = computeBalance(rt);
    result = { status: 'converged', method: 'sequential', x: new Float64Array(0), residual: 0, scaledResidual: 0, passes: 1, iterations: 0, jacobians: 0, history: [] };
  } else {
    const x0 = new Float64Array(N);
    if (opts.start && opts.start.length === N) x0.set(opts.start);
    else {
      // Tears start at zero flow, at the conditions of the first feed (never at what a
      // previous solve on the same runtime left, so that a solve does not depend on it).
      for (let t = 0; t < T; t++) {
        x0[t * m + n] = rt.feeds[0]?.T ?? 298.15;
        x0[t * m + n + 1] = rt.feeds[0]?.P ?? 101325;
      }
    }
    const problem = tearProblem(rt, x0, feedTotal);
    const method = opts.method ?? model.solver.method;
    const maxPasses = opts.maxPasses ?? model.solver.maxPasses ?? 2000;
    const wegstein = { qMin: model.solver.qMin, qMax: model.solver.qMax, maxPasses: method === 'auto' ? AUTO_WEGSTEIN_PASSES : undefined };
    let pre = 0;
    if (method === 'newton' && !opts.start) {
      // Newton from a cold start (tears at zero) is fragile: a few direct passes first give it
      // a physical starting point (every stream made by the plant's own units).
      const tmp = new Float64Array(N);
      for (let k = 0; k < NEWTON_WARMUP_PASSES; k++) {
        problem.g(problem.x0, tmp);
        problem.x0.set(tmp);
        pre++;
      }
    }
    result = solveFixedPoint(problem, method, { rtol, maxPasses: maxPasses - pre, wegstein, newton: opts.jacobian && opts.jacobian.length === N * N ? { jacobian: opts.jacobian } : undefined });
    result.passes += pre;
    // Second criterion: a converged loop must also close its balances. The tear test allows a
    // component imbalance of about rtol times that component's recycle-to-feed ratio (large for
    // an inert); tighten and continue from the solution until the balance closes too.
    for (let k = 0; ; k++) {
      // Leave every stream at the current iterate (one counted pass) and measure the balance.
      setTears(rt, result.x);
      rt.pass();
      result.passes += 1;
      balance = computeBalance(rt);
      if (result.status !== 'converged' || balance.worst <= CLOSURE_TOL || k === 3) break;
      const tighter = 10 ** -(k + 1);
      const atol = Float64Array.from(problem.atol ?? [], (v) => Math.max(1e-300, v * tighter * tighter));
      const more = solveFixedPoint({ ...problem, atol, x0: Float64Array.from(result.x) }, method === 'auto' ? 'newton' : method, {
        rtol: rtol * tighter, maxPasses: Math.max(1, maxPasses - result.passes), wegstein,
        newton: result.jacobian ? { jacobian: result.jacobian } : undefined,
      });
      result = mergeResults(result, more);
    }
    if (result.status === 'converged' && balance.worst > CLOSURE_TOL) {
      result = { ...result, status: 'not-converged', message: `the tear streams meet their tolerance, but ${describeOpen(balance)}; this is not a solution`, worst: undefined };
    }
  }

  let status: Status = result.status;
  let message = result.message;
  let failure = result.failure;
  if (status === 'converged') {
    const issues = rt.issues();
    if (issues.length > 0) {
      const first = issues[0].failure;
      status = first.kind === 'infeasible' ? 'infeasible' : first.kind === 'invalid' ? 'invalid' : 'not-converged';
      failure = first;
      message = first.message;
    } else {
      const neg = negativeFlow(rt);
      if (neg) {
        status = 'infeasible';
        message = neg;
        failure = { kind: 'infeasible', message: neg };
      }
    }
  } else if (status === 'not-converged') {
    const issues = rt.issues();
    if (issues.length > 0 && issues[0].failure.kind === 'infeasible') {
      // The loop drifted towards a state that needs more reactant than exists.
      message = `${result.message ?? 'not converged'}; in the last pass: ${issues[0].failure.message}`;
    }
  }

  return collectResult(rt, { ...result, status, message, failure }, feedTotal, warnings, balance);
}

/**
 * Everything reported of a runtime's current state (streams as the last pass left them),
 * under the given solver result.
 */
export function collectResult(rt: Runtime, result: SolveResult, feedTotal: number, warnings: string[], knownBalance?: Balance): FlowsheetResult {
  const { status, message, failure } = result;
  const model = rt.model;
  const streams = new Map<string, StreamResult>();
  for (const name of rt.streamOrder) streams.set(name, streamResult(rt, rt.streams.get(name)!));
  const units = new Map<string, UnitSummary & { type: string }>();
  for (const { block, ins, outs } of rt.sequence) units.set(block.spec.name, { type: block.spec.type, ...block.summary(ins, outs) });
  for (const b of rt.blocks) if (!units.has(b.spec.name)) units.set(b.spec.name, { type: b.spec.type, figures: [], notes: [] });
  const balance = knownBalance ?? computeBalance(rt);
  const loop = loopFigures(rt, streams, balance, feedTotal);
  return {
    status, method: result.method, passes: result.passes, iterations: result.iterations, jacobians: result.jacobians,
    residual: result.residual, scaledResidual: result.scaledResidual, history: result.history, message, failure, worst: result.worst,
    tears: rt.plan.tears, order: rt.plan.order, loops: rt.plan.loops,
    feeds: rt.feeds, streams, streamOrder: rt.streamOrder, products: rt.products, units, balance, loop,
    x: Float64Array.from(result.x), jacobian: result.jacobian, warnings, model,
  };
}

/** Total fresh feed, mol/s. */
export function freshFeed(rt: Runtime): number {
  let t = 0;
  for (const f of rt.feeds) t += f.molarFlow;
  return t;
}

/** The tear variables of a runtime as a fixed-point problem: bounds, absolute floors and names. */
export function tearProblem(rt: Runtime, x0: Float64Array, feedTotal: number): FixedPointProblem {
  const { n, model } = rt;
  const m = rt.perTear;
  const T = rt.tearStreams.length;
  const N = T * m;
  const lower = new Float64Array(N);
  const atol = new Float64Array(N);
  const names: string[] = [];
  for (let t = 0; t < T; t++) {
    for (let i = 0; i < n; i++) {
      // Flows: a floor far below any flow that matters (1e-15 of the fresh feed).
      atol[t * m + i] = Math.max(1e-300, feedTotal * 1e-15);
      names.push(`${rt.plan.tears[t]}.${model.ids[i]}`);
    }
    lower[t * m + n] = 1e-6;
    lower[t * m + n + 1] = 1e-6;
    atol[t * m + n] = 1e-9;
    atol[t * m + n + 1] = 1e-6;
    names.push(`${rt.plan.tears[t]}.T`, `${rt.plan.tears[t]}.P`);
  }
  return {
    n: N,
    x0,
    lower,
    atol,
    names,
    // Which tears each tear's perturbation can reach: Newton skips or groups columns.
    structure: tearStructure(rt),
    g(x, out) {
      setTears(rt, x);
      rt.pass();
      readTears(rt, out);
    },
  };
}

function mergeResults(a: SolveResult, b: SolveResult): SolveResult {
  const method = a.method === b.method || a.method.endsWith(`+${b.method}`) ? a.method : `${a.method}+${b.method}`;
  return {
    ...b,
    method,
    passes: a.passes + b.passes,
    iterations: a.iterations + b.iterations,
    jacobians: a.jacobians + b.jacobians,
    jacobian: b.jacobian ?? a.jacobian,
    history: a.history.concat(b.history.map((h) => ({ ...h, pass: h.pass + a.passes }))),
  };
}

export function setTears(rt: Runtime, x: Float64Array): void {
  const { n, perTear: m } = rt;
  rt.tearStreams.forEach((s, t) => {
    for (let i = 0; i < n; i++) s.flows[i] = x[t * m + i];
    s.T = x[t * m + n];
    s.P = x[t * m + n + 1];
  });
}

export function readTears(rt: Runtime, out: Float64Array): void {
  const { n, perTear: m } = rt;
  rt.tearStreams.forEach((s, t) => {
    for (let i = 0; i < n; i++) out[t * m + i] = s.flows[i];
    out[t * m + n] = s.T;
    out[t * m + n + 1] = s.P;
  });
}

/** The worst open balance, described. */
function describeOpen(b: Balance): string {
  let worst = '';
  let v = 0;
  for (const [id, c] of Object.entries(b.components)) {
    if (Math.abs(c.closure) > v) {
      v = Math.abs(c.closure);
      worst = `the balance of ${id} closes only to ${Math.abs(c.closure).toExponential(2)} (in ${c.in.toExponential(3)} mol/s, out ${c.out.toExponential(3)} mol/s)`;
    }
  }
  for (const [el, c] of Object.entries(b.elements)) {
    if (Math.abs(c.closure) > v) {
      v = Math.abs(c.closure);
      worst = `the balance of element ${el} closes only to ${Math.abs(c.closure).toExponential(2)}`;
    }
  }
  if (Math.abs(b.mass.closure) > v) worst = `the mass balance closes only to ${Math.abs(b.mass.closure).toExponential(2)}`;
  return `${worst} (a trace component far below the others, or a split close to 0 or 1, can do this: try --method newton, a tighter --tolerance, or set such a trace to zero)`;
}

function negativeFlow(rt: Runtime): string | undefined {
  for (const name of rt.streamOrder) {
    const s = rt.streams.get(name)!;
    for (let i = 0; i < rt.n; i++) {
      if (!(s.flows[i] >= 0)) return `stream \`${name}\` would need a ${Number.isNaN(s.flows[i]) ? 'undefined' : 'negative'} flow of ${rt.model.ids[i]}`;
    }
  }
  return undefined;
}

function streamResult(rt: Runtime, s: Stream): StreamResult {
  let total = 0;
  let mass = 0;
  for (let i = 0; i < rt.n; i++) {
    total += s.flows[i];
    mass += s.flows[i] * rt.model.components[i].MW;
  }
  const fractions = new Float64Array(rt.n);
  if (total > 0) for (let i = 0; i < rt.n; i++) fractions[i] = s.flows[i] / total;
  return { flows: Float64Array.from(s.flows), total, fractions, T: s.T, P: s.P, vaporFraction: s.vf, massFlow: mass };
}

function loopFigures(rt: Runtime, streams: Map<string, StreamResult>, balance: Balance, feedTotal: number): LoopFigures {
  const recycleTotal = rt.recycles.reduce((a, s) => a + (streams.get(s)?.total ?? 0), 0);
  const conversions: LoopFigures['conversions'] = {};
  for (const u of rt.model.units) {
    if (u.type !== 'reactor') continue;
    const summary = rt.byName.get(u.name)!.summary([], []);
    const ins = u.inlets.map((s) => streams.get(s)!);
    for (const rx of summary.reactions ?? []) {
      const i = rt.model.index.get(rx.key)!;
      const keyIn = ins.reduce((a, s) => a + s.flows[i], 0);
      const cb = balance.components[rx.key];
      const prev = conversions[rx.key];
      const consumed = (prev && prev.unit === u.name ? prev.singlePass * keyIn : 0) + rx.conversion * (keyIn > 0 ? keyIn : 0);
      conversions[rx.key] = {
        unit: u.name,
        singlePass: keyIn > 0 ? consumed / keyIn : 0,
        overall: cb.in > 0 ? (cb.in - cb.out) / cb.in : 0,
      };
    }
  }
  return { recycles: rt.recycles, recycleRatio: feedTotal > 0 ? recycleTotal / feedTotal : 0, freshFeed: feedTotal, conversions };
}
