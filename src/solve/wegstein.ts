/**
 * Bounded Wegstein acceleration of x = g(x), one factor per variable.
 *
 * Wegstein, J. H., "Accelerating convergence of iterative processes", Comm. ACM 1(6) (1958) 9-13.
 * Each variable is treated as if g_i depended on x_i alone with the secant slope
 *     s_i = (g_i(x_k) - g_i(x_{k-1})) / (x_{k,i} - x_{k-1,i}),
 * whose straight line crosses x = g at x = q x_k + (1 - q) g(x_k) with q = s / (s - 1).
 * q is bounded (default -5 <= q <= 0: q = 0 is direct substitution, negative q extrapolates,
 * positive q would damp). When the secant is undefined (x_k,i equal to x_{k-1,i} within
 * rounding) or q is not finite, q = 0. The first few passes are direct steps to build the
 * secants. New iterates are clipped to the bounds (flows stay non-negative).
 *
 * For a linear, decoupled map g_i = a_i x_i + b_i, q = a_i/(a_i - 1) lands on the fixed point
 * in one step when unbounded; with q clipped at qMin the error shrinks per pass by
 * |qMin + (1 - qMin) a_i| instead of |a_i| (derived from the update above).
 */
import {
  HistoryRecorder,
  checkProblem,
  clipToBounds,
  endOfPass,
  fixedPointResult,
  fixedPointTolerances,
  invalidInput,
  nameOf,
  newMeasure,
} from './convergence.js';
import type { EvaluationFailure, FixedPointProblem, SolveOptions, SolveResult } from './types.js';

export const WEGSTEIN_DEFAULTS = { qMin: -5, qMax: 0, directSteps: 2, maxPasses: 200 } as const;

/** Relative size below which a change of x_i counts as none (secant undefined). */
const SECANT_FLOOR = 1e-14;

export function solveWegstein(problem: FixedPointProblem, options: SolveOptions = {}): SolveResult {
  const { n, lower, upper, names } = problem;
  const bad = checkProblem(n, problem.x0, lower, upper, names, [
    { label: 'atol', values: problem.atol, positive: true },
  ]);
  if (bad) return invalidInput('wegstein', problem.x0, bad);
  const w = options.wegstein ?? {};
  const qMin = w.qMin ?? WEGSTEIN_DEFAULTS.qMin;
  const qMax = w.qMax ?? WEGSTEIN_DEFAULTS.qMax;
  const directSteps = Math.max(1, Math.floor(w.directSteps ?? WEGSTEIN_DEFAULTS.directSteps));
  const maxPasses = w.maxPasses ?? options.maxPasses ?? WEGSTEIN_DEFAULTS.maxPasses;
  if (!(qMin <= qMax) || !Number.isFinite(qMin) || !Number.isFinite(qMax)) {
    return invalidInput('wegstein', problem.x0, `Wegstein bounds need finite qMin <= qMax, got qMin ${qMin}, qMax ${qMax}`);
  }
  const { rtol, atol } = fixedPointTolerances(n, problem.atol, options);

  // All work arrays once per solve.
  const x = Float64Array.from(problem.x0);
  clipToBounds(x, lower, upper);
  const gx = new Float64Array(n);
  const xPrev = new Float64Array(n);
  const gPrev = new Float64Array(n);
  const m = newMeasure();
  const history = new HistoryRecorder(Math.min(maxPasses, 100000));
  let passes = 0;
  let iterations = 0;

  const tol = { rtol, atol, names };
  const finish = (status: SolveResult['status'], message?: string, failure?: EvaluationFailure): SolveResult =>
    fixedPointResult('wegstein', status, { x, gx, m, passes, iterations, history }, tol, message, failure);

  if (n === 0) return finish('converged');
  m.residual = Infinity;
  m.scaled = Infinity;

  for (;;) {
    const failure = problem.g(x, gx);
    passes++;
    const accelerate = passes > directSteps;
    const end = endOfPass(failure, x, gx, tol, m, history, passes, accelerate ? 'wegstein' : 'direct');
    if (end) return finish(end.status, end.message, end.failure);
    if (passes >= maxPasses) break;

    for (let i = 0; i < n; i++) {
      const xi = x[i];
      const gi = gx[i];
      let q = 0;
      if (accelerate) {
        const dx = xi - xPrev[i];
        if (Math.abs(dx) > SECANT_FLOOR * (Math.abs(xi) + Math.abs(xPrev[i])) && dx !== 0) {
          const s = (gi - gPrev[i]) / dx;
          q = s / (s - 1);
          if (!Number.isFinite(q)) q = 0;
          else if (q < qMin) q = qMin;
          else if (q > qMax) q = qMax;
        }
      }
      xPrev[i] = xi;
      gPrev[i] = gi;
      let next = q * xi + (1 - q) * gi;
      if (lower && next < lower[i]) next = lower[i];
      if (upper && next > upper[i]) next = upper[i];
      x[i] = next;
    }
    iterations++;
  }
  return finish(
    'not-converged',
    `Wegstein did not converge in ${maxPasses} passes (largest scaled residual ${m.scaled.toPrecision(3)} at ${nameOf(m.index, names)}); ` +
      `q is bounded to ${qMin} <= q <= ${qMax}, which holds back a slow loop (a small purge or a high recycle ratio): widen it (\`solver: { acceleration: { lowest: -50 } }\`) or use --method newton or auto`,
  );
}
