/**
 * Anderson acceleration of x = g(x) (a multisecant quasi-Newton method on the whole tear set).
 *
 * Anderson, D. G., "Iterative procedures for nonlinear integral equations", J. ACM 12(4) (1965)
 * 547-560; in the form of Walker, H. F. and Ni, P., "Anderson acceleration for fixed-point
 * iterations", SIAM J. Numer. Anal. 49(4) (2011) 1715-1735 (their Algorithm AA, undamped):
 * with f_k = g(x_k) - x_k and the last m differences
 *     dF_j = f_{j+1} - f_j,   dG_j = g(x_{j+1}) - g(x_j),
 * gamma minimises || W (f_k - dF gamma) ||_2 and the next iterate is
 *     x_{k+1} = g(x_k) - dG gamma.
 * It is equivalent to a multisecant (type-II Broyden) update of the inverse Jacobian of
 * f(x) = g(x) - x built from the last m steps, so it needs no Jacobian and no structure: each
 * pass costs one evaluation of g plus O(n m) work. Where Wegstein treats every variable as if it
 * depended on itself alone, Anderson sees the coupling between variables through the secants;
 * a slow loop (an eigenvalue of dg/dx near 1) is removed from the error in a few passes whatever
 * the number of tears.
 *
 * W is a fixed diagonal weight per variable, 1 / (|g_i(x_0)| + atol_i / rtol), so that flows,
 * temperatures and pressures count alike. The least-squares problem is solved through its normal
 * equations: the Gram matrix of the weighted differences is kept up to date (one new row per
 * pass, O(n m)), and its Cholesky factorisation, newest difference first, leaves out a
 * difference nearly dependent on newer ones (pivot below 1e-10 of its square norm). Safeguards: new iterates are clipped
 * to the bounds; when the weighted residual grows to more than `restartGrowth` times the best
 * seen, the memory is cleared and the iteration continues by a direct step from there.
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

export const ANDERSON_DEFAULTS = { memory: 40, maxPasses: 2000, restartGrowth: 1e3, directSteps: 1 } as const;

export interface AndersonOptions {
  /** Differences kept (m). */
  memory?: number;
  /** Clear the memory when the weighted residual norm exceeds this multiple of the best. */
  restartGrowth?: number;
  /** Direct steps before the first accelerated one. */
  directSteps?: number;
}

export function solveAnderson(problem: FixedPointProblem, options: SolveOptions & { anderson?: AndersonOptions } = {}): SolveResult {
  const { n, lower, upper, names } = problem;
  const bad = checkProblem(n, problem.x0, lower, upper, names, [
    { label: 'atol', values: problem.atol, positive: true },
  ]);
  if (bad) return invalidInput('anderson', problem.x0, bad);
  const a = options.anderson ?? {};
  const mMax = Math.max(1, Math.floor(a.memory ?? ANDERSON_DEFAULTS.memory));
  const growth = a.restartGrowth ?? ANDERSON_DEFAULTS.restartGrowth;
  const directSteps = Math.max(1, Math.floor(a.directSteps ?? ANDERSON_DEFAULTS.directSteps));
  const maxPasses = options.maxPasses ?? ANDERSON_DEFAULTS.maxPasses;
  const { rtol, atol } = fixedPointTolerances(n, problem.atol, options);

  // Work arrays, once per solve. The differences live in ring buffers of m rows of n.
  const x = Float64Array.from(problem.x0);
  clipToBounds(x, lower, upper);
  const gx = new Float64Array(n);
  const f = new Float64Array(n);
  const fPrev = new Float64Array(n);
  const gPrev = new Float64Array(n);
  const w = new Float64Array(n);
  const dF: Float64Array[] = [];
  const dG: Float64Array[] = [];
  for (let j = 0; j < mMax; j++) {
    dF.push(new Float64Array(n)); // weighted: W dF
    dG.push(new Float64Array(n));
  }
  // The Gram matrix H[j][l] = (W dF_j) . (W dF_l) of the held differences (ring slots), kept up
  // to date with one row per pass; the least-squares fit solves H gamma = dF^T W^2 f by a
  // Cholesky factorisation that leaves out differences nearly dependent on newer ones.
  const H = new Float64Array(mMax * mMax);
  const L = new Float64Array(mMax * mMax);
  const rhs = new Float64Array(mMax);
  const gamma = new Float64Array(mMax);
  const used = new Int32Array(mMax);
  const wf = new Float64Array(n);
  let stored = 0; // differences held
  let head = 0; // ring position of the next difference to write
  let havePrev = false;
  let best = Infinity;

  const m = newMeasure();
  const history = new HistoryRecorder(Math.min(maxPasses, 100000));
  let passes = 0;
  let iterations = 0;
  let restarts = 0;

  const tol = { rtol, atol, names };
  const finish = (status: SolveResult['status'], message?: string, failure?: EvaluationFailure): SolveResult =>
    fixedPointResult('anderson', status, { x, gx, m, passes, iterations, history }, tol, message, failure);

  if (n === 0) return finish('converged');
  m.residual = Infinity;
  m.scaled = Infinity;

  for (;;) {
    const failure = problem.g(x, gx);
    passes++;
    const accelerate = passes > directSteps;
    const end = endOfPass(failure, x, gx, tol, m, history, passes, accelerate && stored > 0 ? 'anderson' : 'direct');
    if (end) return finish(end.status, end.message, end.failure);
    if (passes >= maxPasses) break;

    if (passes === 1) {
      for (let i = 0; i < n; i++) w[i] = 1 / (Math.abs(gx[i]) + atol[i] / rtol);
    }
    let norm = 0;
    for (let i = 0; i < n; i++) {
      f[i] = gx[i] - x[i];
      const s = w[i] * f[i];
      norm += s * s;
    }
    norm = Math.sqrt(norm);
    if (norm > growth * best) {
      // Far worse than the best iterate: the secants no longer describe the map here.
      stored = 0;
      head = 0;
      havePrev = false;
      restarts++;
    }
    if (norm < best) best = norm;

    if (havePrev) {
      const dFj = dF[head];
      const dGj = dG[head];
      for (let i = 0; i < n; i++) {
        dFj[i] = w[i] * (f[i] - fPrev[i]);
        dGj[i] = gx[i] - gPrev[i];
      }
      if (stored < mMax) stored++;
      for (let s = 0; s < stored; s++) {
        const j = (head - s + mMax) % mMax;
        const dj = dF[j];
        let dot = 0;
        for (let i = 0; i < n; i++) dot += dj[i] * dFj[i];
        H[head * mMax + j] = dot;
        H[j * mMax + head] = dot;
      }
      head = (head + 1) % mMax;
    }
    fPrev.set(f);
    gPrev.set(gx);
    havePrev = true;

    // x <- g(x) - dG gamma, gamma the weighted least-squares fit of f by dF.
    let k = 0;
    if (accelerate && stored > 0) {
      for (let i = 0; i < n; i++) wf[i] = w[i] * f[i];
      // Newest first: it carries the most local information, and an older difference that
      // depends on the newer ones (pivot below 1e-10 of its own square norm) is left out.
      for (let s = 0; s < stored; s++) {
        const j = (head - 1 - s + 2 * mMax) % mMax;
        const hjj = H[j * mMax + j];
        if (!(hjj > 0)) continue;
        // Row k of L for column j against the k columns kept so far.
        let d = hjj;
        for (let c = 0; c < k; c++) {
          let v = H[used[c] * mMax + j];
          for (let e = 0; e < c; e++) v -= L[k * mMax + e] * L[c * mMax + e];
          v /= L[c * mMax + c];
          L[k * mMax + c] = v;
          d -= v * v;
        }
        if (!(d > 1e-10 * hjj)) continue;
        L[k * mMax + k] = Math.sqrt(d);
        const dj = dF[j];
        let dot = 0;
        for (let i = 0; i < n; i++) dot += dj[i] * wf[i];
        rhs[k] = dot;
        used[k] = j;
        k++;
      }
      // L L^T gamma = rhs.
      for (let r = 0; r < k; r++) {
        let v = rhs[r];
        for (let c = 0; c < r; c++) v -= L[r * mMax + c] * gamma[c];
        gamma[r] = v / L[r * mMax + r];
      }
      for (let r = k - 1; r >= 0; r--) {
        let v = gamma[r];
        for (let c = r + 1; c < k; c++) v -= L[c * mMax + r] * gamma[c];
        gamma[r] = v / L[r * mMax + r];
      }
    }
    for (let i = 0; i < n; i++) {
      let next = gx[i];
      for (let l = 0; l < k; l++) next -= gamma[l] * dG[used[l]][i];
      if (lower && next < lower[i]) next = lower[i];
      if (upper && next > upper[i]) next = upper[i];
      x[i] = next;
    }
    iterations++;
  }
  return finish(
    'not-converged',
    `Anderson acceleration did not converge in ${maxPasses} passes (largest scaled residual ${m.scaled.toPrecision(3)} at ${nameOf(m.index, names)}${restarts > 0 ? `; memory cleared ${restarts} times` : ''})`,
  );
}
