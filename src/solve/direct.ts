/**
 * Direct (successive) substitution for x = g(x): x_{k+1} = g(x_k), clipped to the bounds.
 * Converges linearly when the spectral radius of dg/dx at the solution is below 1; the error
 * shrinks each pass by about that radius, which for a recycle loop approaches the fraction of
 * material returned per pass (slow for high recycle ratios).
 */
import {
  HistoryRecorder,
  checkProblem,
  clipToBounds,
  endOfPass,
  fixedPointResult,
  fixedPointTolerances,
  invalidInput,
  newMeasure,
  nameOf,
} from './convergence.js';
import type { EvaluationFailure, FixedPointProblem, SolveOptions, SolveResult } from './types.js';

export const DIRECT_MAX_PASSES = 2000;

export function solveDirect(problem: FixedPointProblem, options: SolveOptions = {}): SolveResult {
  const { n, lower, upper, names } = problem;
  const bad = checkProblem(n, problem.x0, lower, upper, names, [
    { label: 'atol', values: problem.atol, positive: true },
  ]);
  if (bad) return invalidInput('direct', problem.x0, bad);
  const maxPasses = options.maxPasses ?? DIRECT_MAX_PASSES;
  const { rtol, atol } = fixedPointTolerances(n, problem.atol, options);

  const x = Float64Array.from(problem.x0);
  clipToBounds(x, lower, upper);
  const gx = new Float64Array(n);
  const m = newMeasure();
  const history = new HistoryRecorder(Math.min(maxPasses, 100000));
  let passes = 0;
  let iterations = 0;

  const tol = { rtol, atol, names };
  const finish = (status: SolveResult['status'], message?: string, failure?: EvaluationFailure): SolveResult =>
    fixedPointResult('direct', status, { x, gx, m, passes, iterations, history }, tol, message, failure);

  if (n === 0) {
    m.residual = 0;
    m.scaled = 0;
    return finish('converged');
  }
  m.residual = Infinity;
  m.scaled = Infinity;

  for (;;) {
    const failure = problem.g(x, gx);
    passes++;
    const end = endOfPass(failure, x, gx, tol, m, history, passes, 'direct');
    if (end) return finish(end.status, end.message, end.failure);
    // Budget spent: keep x as the iterate where g was last evaluated, so x and residual agree.
    if (passes >= maxPasses) break;
    x.set(gx);
    clipToBounds(x, lower, upper);
    iterations++;
  }
  return finish(
    'not-converged',
    `direct substitution did not converge in ${maxPasses} passes (largest scaled residual ${m.scaled.toPrecision(3)} at ${nameOf(m.index, names)}); try method 'wegstein' or 'newton'`,
  );
}
