/**
 * Solving a flowsheet: the tear streams' component flows, T and P are the unknowns of a
 * fixed-point problem x = g(x), one full pass of the calculation order per evaluation
 * (tear-problem.ts). The driver runs the method, closes the balance (closure.ts), and judges
 * the final pass once: a result is never a solution unless the solver converged, the balances
 * close, every unit met its specification in that pass and no flow is negative.
 */
import { solveFixedPoint } from '../solve/index.js';
import type { MethodName, SolveResult, Status, EvaluationFailure, HistoryEntry } from '../solve/types.js';
import { fixedPointTolerances, measureFixedPoint, newMeasure } from '../solve/convergence.js';
import type { Eos } from '../thermo/types.js';
import { computeBalance, type Balance } from './balance.js';
import { closeBalance, mergeResults } from './closure.js';
import { buildUpMessage, findBuildUp } from './diagnose.js';
import type { Model } from './model.js';
import { assembleResult, type FlowsheetResult } from './result.js';
import { createRuntime, type Condition, type Runtime } from './runtime.js';
import { coldStart, freshFeed, tearProblem } from './tear-problem.js';

export type { FlowsheetResult, StreamResult, TargetReport } from './result.js';
export type { LoopFigures } from './loop.js';

/** Wegstein's share of the budget under the default method before Newton takes over. */
export const AUTO_WEGSTEIN_PASSES = 20;
/** Direct passes before Newton when it starts cold. */
export const NEWTON_WARMUP_PASSES = 3;
/**
 * Above this many tear variables, `auto` solves by Anderson acceleration instead of Wegstein
 * then Newton: a finite-difference Jacobian costs about one pass per variable (and n^2
 * numbers), more than the whole of a demo's solve (about 30 passes), while Anderson converged
 * the generated nested-recycle trains of bench/generate.mjs in 12 to 38 passes from 35 to 3,087
 * variables (98 variables, the 30-unit train: 15 passes, where Wegstein then Newton took 121). The demos have 6 to
 * 8 tear variables and keep Wegstein then Newton.
 */
export const AUTO_ANDERSON_VARIABLES = 30;
/** Passes of a solve when neither the file nor the caller sets a budget. */
export const DEFAULT_MAX_PASSES = 2000;

export interface SolveFlowsheetOptions {
  method?: MethodName;
  rtol?: number;
  maxPasses?: number;
  /** Start from these tear values (length tears * (n + 2)), e.g. a neighbour's solution. */
  start?: Float64Array;
  /** A neighbour's tear Jacobian (FlowsheetResult.jacobian) for Newton to start from. */
  jacobian?: Float64Array;
  eos?: Eos;
  /** A runtime owned by the caller, switched to this model (sweeps and targets reuse one). */
  runtime?: Runtime;
  /**
   * Carry the energy balance in every pass of the iteration even where no unit's flows depend
   * on it (by default it is then solved once, on the converged flows: runtime.ts,
   * energyDecoupled). The answer is the same to the tolerance; for comparisons and checks.
   */
  energyEveryPass?: boolean;
}

export function solveFlowsheet(model: Model, opts: SolveFlowsheetOptions = {}): FlowsheetResult {
  const rt = opts.runtime ?? createRuntime(model, opts.eos);
  rt.load(model);
  rt.resetWarmStarts();
  // The iteration leaves out an energy balance the flows do not depend on; the closure's final
  // pass computes it (and turns it on for any pass after).
  rt.energyEveryPass = opts.energyEveryPass ?? false;
  const N = rt.tearStreams.length * rt.perTear;
  const rtol = opts.rtol ?? model.solver.rtol;
  const budget = opts.maxPasses ?? model.solver.maxPasses ?? DEFAULT_MAX_PASSES;
  const asked = opts.method ?? model.solver.method;
  const method = asked === 'auto' && N > AUTO_ANDERSON_VARIABLES && !opts.jacobian ? 'anderson' : asked;
  const warnings: string[] = [...model.warnings.map((w) => w.message), ...rt.feeds.flatMap((f) => f.warnings)];
  const feedTotal = freshFeed(rt);

  const refuse = (message: string) => {
    const r: SolveResult = { status: 'invalid', method, x: new Float64Array(N), residual: Number.NaN, scaledResidual: Number.NaN, passes: 0, iterations: 0, jacobians: 0, history: [], message };
    return assembleResult(rt, r, r.x, computeBalance(rt), warnings);
  };
  if (opts.start && opts.start.length !== N) return refuse(`the start vector has ${opts.start.length} values; this flowsheet has ${N} tear variables (${rt.tearStreams.length} tears of ${rt.perTear})`);
  if (opts.jacobian && opts.jacobian.length !== N * N) return refuse(`the Jacobian to start from has ${opts.jacobian.length} entries; this flowsheet needs ${N * N} (${N} by ${N})`);
  if (!(budget >= 1)) return refuse(`the budget of passes is ${budget}; it must be at least 1`);

  let result: SolveResult;
  let balance: Balance;
  let conditions: Condition[];
  if (N === 0) {
    conditions = rt.pass().slice();
    balance = computeBalance(rt);
    result = { status: 'converged', method: 'sequential', x: new Float64Array(0), residual: 0, scaledResidual: 0, passes: 1, iterations: 0, jacobians: 0, history: [] };
  } else {
    const x0 = opts.start ? Float64Array.from(opts.start) : coldStart(rt);
    const start0 = Float64Array.from(x0);
    const problem = tearProblem(rt, x0, feedTotal);
    const wegstein = { qMin: model.solver.qMin, qMax: model.solver.qMax, maxPasses: method === 'auto' ? AUTO_WEGSTEIN_PASSES : undefined };
    /** The method from `from`, with `used` passes of the budget already spent. */
    const iterate = (from: Float64Array, used: number): SolveResult => {
      problem.x0.set(from);
      let pre = 0;
      const warmup: HistoryEntry[] = [];
      if (method === 'newton' && !opts.start) {
        // Newton from a cold start (tears at zero) is fragile: a few direct passes first give it
        // a physical starting point (every stream made by the plant's own units). They are
        // passes like any other: measured and kept in the history under their own numbers.
        const tmp = new Float64Array(N);
        const { atol } = fixedPointTolerances(N, problem.atol, { rtol });
        const m = newMeasure();
        for (let k = 0; k < NEWTON_WARMUP_PASSES && used + pre < budget - 2; k++) {
          problem.g(problem.x0, tmp);
          pre++;
          measureFixedPoint(problem.x0, tmp, rtol, atol, m);
          warmup.push({ pass: pre, scaled: m.scaled, residual: m.residual, method: 'direct' });
          problem.x0.set(tmp);
        }
      }
      // One pass of the budget is kept for the final pass that leaves the streams at the answer.
      const r = solveFixedPoint(problem, method, {
        rtol, maxPasses: Math.max(1, budget - used - pre - 1), wegstein,
        newton: opts.jacobian ? { jacobian: opts.jacobian } : undefined,
      });
      if (pre > 0) {
        r.passes += pre;
        r.history = warmup.concat(r.history.map((h) => ({ ...h, pass: h.pass + pre })));
      }
      return r;
    };
    let iterated = iterate(start0, 0);
    let closed = closeBalance(rt, problem, iterated, { method, rtol, budget, wegstein });
    if (closed.energyLate && budget - closed.result.passes > 2) {
      // The energy balance left to the converged flows made no solution (closure.ts says why):
      // the whole solve again from the same start, the energy balance in every pass and every
      // block started afresh; the passes of both attempts are counted.
      rt.resetWarmStarts();
      rt.energyEveryPass = true;
      iterated = mergeResults(closed.result, iterate(start0, closed.result.passes));
      closed = closeBalance(rt, problem, iterated, { method, rtol, budget, wegstein });
    }
    if (method === 'anderson' && iterated.status === 'converged' && closed.result.status !== 'converged' && budget - closed.result.passes > 2) {
      // Anderson's early iterates can lie far from the answer, and a block's warm start (a PH
      // flash's last temperature, a flash's last K-values) carried from there has been seen to
      // leave a mixer's energy balance open by 1e-4 on the generated 20-component trains, the
      // state itself agreeing with Wegstein's to 2e-10. Once more from the same iterate, every
      // block started afresh as in a new solve; the passes of both attempts are counted.
      rt.resetWarmStarts();
      closed = closeBalance(rt, problem, { ...iterated, passes: closed.result.passes, iterations: closed.result.iterations, history: closed.result.history }, { method, rtol, budget, wegstein });
    }
    ({ result, balance, conditions } = closed);
  }
  const v = judge(rt, result, conditions, balance);
  if (v.status === 'not-converged' && N > 0) {
    // The method's message counts its own passes; the solve's count adds the final pass (and
    // Newton's direct passes before it): say so, so the two numbers do not contradict.
    v.message = `${v.message ?? 'not converged'}; ${result.passes} passes in all${result.passes > budget ? `, one more than the budget of ${budget}` : ''}, counting the final pass that leaves every stream at the last iterate`;
  }
  return assembleResult(rt, { ...result, ...v }, result.x, balance, warnings);
}

/** The status of a solve from what the solver returned and what the final pass met. */
function judge(rt: Runtime, result: SolveResult, conditions: readonly Condition[], balance: Balance): { status: Status; message?: string; failure?: EvaluationFailure } {
  const { status, message, failure } = result;
  if (status === 'converged') {
    if (conditions.length > 0) {
      const first = conditions[0].failure;
      return { status: first.kind, failure: first, message: first.message };
    }
    const neg = negativeFlow(rt);
    if (neg) return { status: 'infeasible', message: neg, failure: { kind: 'infeasible', message: neg } };
    return { status };
  }
  if (status === 'not-converged') {
    const buildUp = findBuildUp(rt, result.x);
    if (buildUp) {
      const b = buildUpMessage(buildUp);
      return { status: 'infeasible', message: b.message, failure: { kind: 'infeasible', message: b.message, component: buildUp.component, help: b.help } };
    }
    // What a unit met in the last pass comes first: it is the physics behind the numbers (a
    // flash that fails, a reactor that runs short as the loop drifts).
    const met = conditions.find((c) => c.failure.kind !== 'infeasible') ?? conditions[0];
    if (met) return { status, failure: met.failure, message: `${met.failure.message}; ${message ?? 'not converged'}` };
  }
  return { status, message, failure };
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
