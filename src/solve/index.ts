/**
 * Generic solvers: problem, method, result. Non-convergence is a result, never an exception.
 *
 *   solveFixedPoint(problem, method, options)  x = g(x) by 'direct' | 'wegstein' | 'newton' | 'anderson' | 'auto'
 *   solveRoot(problem, options)                F(x) = 0 by Newton
 *
 * 'auto' runs bounded Wegstein within its pass budget (options.wegstein.maxPasses, default
 * 200); if it has not converged (and did not stop on an evaluation failure) Newton continues
 * from Wegstein's last iterate when that is no worse than the start (else from the start),
 * with the remaining budget of options.maxPasses (default 2000 for the whole solve).
 * Run alone, Wegstein's budget is options.wegstein.maxPasses, else options.maxPasses, else 200;
 * direct substitution's is options.maxPasses (default 2000); Newton's is options.maxPasses
 * (default 2000) with newton.maxIterations (default 100) and newton.maxJacobians.
 */
import { solveDirect } from './direct.js';
import { NEWTON_DEFAULTS, solveNewtonFixedPoint } from './newton.js';
import { solveWegstein } from './wegstein.js';
import { solveAnderson } from './anderson.js';
import type { FixedPointProblem, MethodName, SolveOptions, SolveResult } from './types.js';
import { invalidInput } from './convergence.js';

export { solveDirect, DIRECT_MAX_PASSES } from './direct.js';
export { solveWegstein, WEGSTEIN_DEFAULTS } from './wegstein.js';
export { solveAnderson, ANDERSON_DEFAULTS } from './anderson.js';
export { solveRoot, solveNewtonFixedPoint, NEWTON_DEFAULTS } from './newton.js';
export { columnGroups } from './jacobian.js';
export {
  DEFAULT_ATOL,
  DEFAULT_RTOL,
  HistoryRecorder,
  measureFixedPoint,
  measureScaled,
  newMeasure,
  worstResiduals,
  worstFixedPoint,
} from './convergence.js';
export type { Measure, Tolerances } from './convergence.js';
export type * from './types.js';

export function solveFixedPoint(
  problem: FixedPointProblem,
  method: MethodName = 'auto',
  options: SolveOptions = {},
): SolveResult {
  switch (method) {
    case 'direct':
      return solveDirect(problem, options);
    case 'wegstein':
      return solveWegstein(problem, options);
    case 'newton':
      return solveNewtonFixedPoint(problem, options);
    case 'anderson':
      return solveAnderson(problem, options);
    case 'auto':
      return solveAuto(problem, options);
    default: {
      const never: never = method;
      return invalidInput(String(never), problem.x0, `unknown method "${String(never)}"; use direct, wegstein, newton, anderson or auto`);
    }
  }
}

/** Wegstein passes under `auto` before its rate is judged. */
export const AUTO_PROBE_PASSES = 8;

/** Passes still needed at the rate of the last iterations (Infinity when not converging). */
function predictedPasses(r: SolveResult): number {
  const h = r.history;
  if (h.length < 4) return Infinity;
  const a = h[h.length - 3].scaled;
  const b = h[h.length - 1].scaled;
  if (!(a > 0 && b > 0 && b < a)) return Infinity;
  const rate = Math.sqrt(b / a);
  if (b <= 1) return 0;
  return Math.ceil(Math.log(b) / -Math.log(rate));
}

function solveAuto(problem: FixedPointProblem, options: SolveOptions): SolveResult {
  const total = options.maxPasses ?? NEWTON_DEFAULTS.maxPasses;
  const wBudget = Math.min(options.wegstein?.maxPasses ?? 200, total);
  // Probe: a few Wegstein passes, then predict from the observed rate how many more it needs.
  // Newton costs about two Jacobians (n + 1 passes each) plus a few steps; keep Wegstein only
  // when it is predicted to finish sooner and within its budget.
  const probe = Math.min(AUTO_PROBE_PASSES, wBudget);
  let w = solveWegstein(problem, { ...options, wegstein: { ...options.wegstein, maxPasses: probe } });
  if (w.status !== 'not-converged') return w;
  if (w.passes < wBudget) {
    const need = predictedPasses(w);
    const newtonCost = 2 * (problem.n + 1) + 3;
    if (need <= wBudget - w.passes && need < newtonCost) {
      const more = solveWegstein({ ...problem, x0: w.x }, { ...options, wegstein: { ...options.wegstein, maxPasses: wBudget - w.passes } });
      w = {
        ...more,
        passes: w.passes + more.passes,
        iterations: w.iterations + more.iterations,
        history: w.history.concat(more.history.map((e) => ({ ...e, pass: e.pass + w.passes }))),
      };
      if (w.status !== 'not-converged') return w;
    }
  }
  const remaining = total - w.passes;
  // Wegstein's own message points to 'auto', the method that is running: say what happened.
  if (remaining <= 0) return { ...w, message: `Wegstein used the whole budget (${w.passes} passes) before Newton could start (largest scaled residual ${w.scaledResidual.toPrecision(3)}); give more passes` };
  const startScaled = w.history.length > 0 ? w.history[0].scaled : Infinity;
  const fromWegstein = Number.isFinite(w.scaledResidual) && w.scaledResidual <= startScaled;
  const x0 = fromWegstein ? w.x : problem.x0;
  const n = solveNewtonFixedPoint({ ...problem, x0 }, { ...options, maxPasses: remaining });
  const history = w.history.concat(n.history.map((e) => ({ ...e, pass: e.pass + w.passes })));
  const result: SolveResult = {
    ...n,
    method: 'wegstein+newton',
    passes: w.passes + n.passes,
    iterations: w.iterations + n.iterations,
    jacobians: n.jacobians,
    history,
  };
  const note = `Wegstein stopped after ${w.passes} passes (scaled residual ${w.scaledResidual.toPrecision(3)}); Newton continued from ${fromWegstein ? "Wegstein's last iterate" : 'the start point'}`;
  result.message = n.message ? `${note}; ${n.message}` : note;
  return result;
}
