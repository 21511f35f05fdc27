/**
 * Balance closure as a second convergence criterion. The tear test allows a component
 * imbalance of about rtol times that component's recycle-to-feed ratio (large for an inert);
 * a converged loop must also close its balances: material, elements, mass and (when the file
 * has thermal data) energy, overall and per unit, to the same relative tolerance. This continues from the solution with a
 * tighter tear tolerance until the balance closes too (at most three times), then leaves every
 * stream at the final iterate with one last pass.
 */
import { solveFixedPoint } from '../solve/index.js';
import type { FixedPointProblem, MethodName, SolveOptions, SolveResult } from '../solve/types.js';
import { computeBalance, type Balance } from './balance.js';
import type { Condition, Runtime } from './runtime.js';
import { readTears, setTears } from './tear-problem.js';

/**
 * Direct passes that settle the temperatures of a solve whose iteration left the energy balance
 * out, before the method is asked again.
 */
const SETTLE_PASSES = 4;

/** The balance closure (relative) a converged result must meet, for a tear tolerance rtol. */
export function closureTolerance(rtol: number): number {
  return Math.max(1e-9, 10 * rtol);
}

export interface Closed {
  result: SolveResult;
  balance: Balance;
  /** Conditions met by the units in the final pass (a copy). */
  conditions: Condition[];
  /**
   * Set when the iteration left the energy balance out and the pass that then computed it on
   * the converged flows did not make a solution (a flash that did not converge, a balance left
   * open, a temperature that would not settle): the caller solves again with the energy
   * balance in every pass.
   */
  energyLate?: boolean;
}

export function closeBalance(
  rt: Runtime,
  problem: FixedPointProblem,
  first: SolveResult,
  opts: { method: MethodName; rtol: number; budget: number; wegstein: SolveOptions['wegstein'] },
): Closed {
  const tol = closureTolerance(opts.rtol);
  let result = first;
  // Whether the iteration left the energy balance out (runtime.ts, energyDecoupled).
  const deferred = rt.energyDecoupled && !rt.energyEveryPass;
  let settle = 0;
  for (let k = 0; ; k++) {
    // The final pass: every stream at the current iterate (one counted pass), then the balance.
    setTears(rt, result.x);
    const conditions = rt.pass().slice();
    // From here every pass computes the energy balance.
    rt.energyEveryPass = true;
    result = { ...result, passes: result.passes + 1 };
    const balance = computeBalance(rt);
    // The final pass checks every phase in full (the iteration's passes may not have): if it
    // moves a tear stream beyond its tolerance, a phase appeared or vanished since the last check.
    const moved = tearMoved(rt, problem, result.x, opts.rtol);
    const room = opts.budget - result.passes - 1;
    const flashFailed = conditions.some((c) => c.failure.kind === 'not-converged');
    if (deferred && (moved || flashFailed) && result.status === 'converged' && settle < SETTLE_PASSES && room >= 1) {
      // The flows converged without the energy balance, which they do not depend on: this pass
      // found the temperatures it decides (a compressor's outlet, an adiabatic mixer's), and a
      // tear that carries one moved. Direct passes settle them (one, when a unit at a set T
      // lies between the tear and its maker in the loop; more when the enthalpy recycles). A
      // flash that did not converge, started cold, may converge from the K-values of the pass
      // before: the same passes give it that chance.
      settle++;
      k--;
      const next = new Float64Array(result.x.length);
      readTears(rt, next);
      result = { ...result, x: next };
      continue;
    }
    if (deferred && k === 0 && flashFailed && result.status === 'converged') {
      // still failing: the caller starts again with the energy balance in every pass
      return { result, balance, conditions, energyLate: true };
    }
    if (result.status !== 'converged' || (balance.worst <= tol && !moved) || k === 3 || room < 1) {
      if (result.status === 'converged' && balance.worst > tol) {
        // With the budget spent, the passes that would close it (a tighter tear tolerance, the
        // temperatures of a balance left to the converged flows) were never run: that is the cause
        // to give, not the shape of the loop.
        const cause = room < 1 && k < 3
          ? `(the budget of ${opts.budget} passes left no room for the passes that close it: give more passes, --max-passes)`
          : OPEN_HINT;
        result = { ...result, status: 'not-converged', message: `the tear streams meet their tolerance, but ${describeOpen(balance)} ${cause}; this is not a solution`, worst: undefined };
      } else if (result.status === 'converged' && moved) {
        result = { ...result, status: 'not-converged', message: `the final pass moves tear stream ${moved} beyond its tolerance (a phase appeared or vanished between the checks of the iteration); this is not a solution`, worst: undefined };
      }
      // The iteration converged without the energy balance, and with it on the converged flows
      // this is no solution: its flashes started cold from the final state, where a loop that
      // carries the energy balance in every pass reaches that state with warm starts that
      // followed the path (on the generated 20-component trains, a separator's cold flash near
      // its dew point has been seen not to converge where the warm one does). The caller starts
      // again that way.
      const energyLate = deferred && first.status === 'converged' && (result.status !== 'converged' || flashFailed);
      return { result, balance, conditions, energyLate };
    }
    const tighter = 10 ** -(k + 1);
    const atol = Float64Array.from(problem.atol ?? [], (v) => Math.max(1e-300, v * tighter * tighter));
    const more = solveFixedPoint({ ...problem, atol, x0: Float64Array.from(result.x) }, opts.method === 'auto' ? 'newton' : opts.method, {
      rtol: opts.rtol * tighter, maxPasses: room, wegstein: opts.wegstein,
      newton: result.jacobian ? { jacobian: result.jacobian } : undefined,
    });
    result = mergeResults(result, more);
  }
}

/** The first tear variable the last pass left beyond its tolerance of x, by name; undefined when none. */
function tearMoved(rt: Runtime, problem: FixedPointProblem, x: Float64Array, rtol: number): string | undefined {
  const out = new Float64Array(x.length);
  readTears(rt, out);
  for (let i = 0; i < x.length; i++) {
    const tolI = Math.max(problem.atol?.[i] ?? 0, 10 * rtol * Math.abs(x[i]));
    if (!(Math.abs(out[i] - x[i]) <= tolI)) return problem.names?.[i] ?? `#${i}`;
  }
  return undefined;
}

export function mergeResults(a: SolveResult, b: SolveResult): SolveResult {
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
  if (Math.abs(b.mass.closure) > v) {
    v = Math.abs(b.mass.closure);
    worst = `the mass balance closes only to ${Math.abs(b.mass.closure).toExponential(2)}`;
  }
  if (b.energy && !(Math.abs(b.energy.closure) <= v)) {
    v = Math.abs(b.energy.closure);
    worst = `the energy balance closes only to ${Math.abs(b.energy.closure).toExponential(2)} (in ${b.energy.in.toExponential(4)} W, out ${b.energy.out.toExponential(4)} W, duties ${b.energy.duty.toExponential(4)} W, power ${b.energy.power.toExponential(4)} W)`;
  }
  for (const [u, e] of Object.entries(b.unitEnergy ?? {})) {
    if (!(Math.abs(e.closure) <= v)) {
      v = Math.abs(e.closure);
      worst = `the energy balance of \`${u}\` closes only to ${Math.abs(e.closure).toExponential(2)}`;
    }
  }
  return worst;
}

const OPEN_HINT = '(a trace component far below the others, or a split close to 0 or 1, can do this: try --method newton, a tighter --tolerance, or set such a trace to zero)';
