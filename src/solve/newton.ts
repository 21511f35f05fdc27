/**
 * Newton's method with a finite-difference Jacobian, LU factorisation and a backtracking
 * (Armijo) line search, for F(x) = 0 (solveRoot) and for x = g(x) as F(x) = g(x) - x
 * (solveNewtonFixedPoint).
 *
 * Method (Dennis and Schnabel, "Numerical Methods for Unconstrained Optimization and
 * Nonlinear Equations", Prentice-Hall 1983, SIAM reprint 1996):
 *  - forward-difference Jacobian, column j with step h_j = sqrt(eps) * max(|x_j|, typical_j)
 *    (their Sec. 5.4, Alg. A5.6.3), one base evaluation reused for every column; the step is
 *    taken backwards where a forward step would leave the upper bound. typical_j is the
 *    problem's, else max(atol_j / rtol, 1e-8) (root problems: the options' atol / rtol),
 *    widened for x = g(x) to max(|x0_j|, |g_j(x0)|) after the first pass;
 *  - columns that share no residual row may be perturbed together in one evaluation when the
 *    problem gives its sparsity (Curtis, Powell and Reid 1974), see JacobianStructure;
 *  - the Newton step solves J dx = -F with J equilibrated (columns by max(|x_j|, typical_j),
 *    then rows by their largest entry) and factored by ml-matrix LU with partial pivoting;
 *  - merit phi(x) = 0.5 * sum_i (F_i(x) / s_i)^2 with s_i the residual scale (tolerance) at the
 *    current iterate; a step length lambda is accepted when
 *        phi(x + lambda dx) <= (1 - 2 c lambda) phi(x),   c = 1e-4
 *    (Armijo condition with the Newton slope -2 phi; their Sec. 6.3, Alg. A6.3.1), otherwise
 *    lambda is cut by quadratic interpolation, kept within [0.1, 0.5] of the previous lambda;
 *  - bounds: each trial point is projected onto [lower, upper] (flows stay non-negative);
 *  - Jacobian reuse: after a full step that at least halves sqrt(2 phi), the same factored
 *    Jacobian is used again (a chord step), up to `reuse` times; a chord step that fails the
 *    Armijo test at lambda = 1 triggers a fresh Jacobian at the same point.
 * A singular Jacobian, a failed line search or a spent budget end the solve as
 * 'not-converged' with a message; nothing here throws for numerical reasons.
 */
import { buildJacobian, checkStructure, columnGroups } from './jacobian.js';
import { factor, luStep, newFactored, type Factored } from './linear.js';
import {
  DEFAULT_ATOL,
  DEFAULT_RTOL,
  HistoryRecorder,
  checkProblem,
  clipToBounds,
  fixedPointScale,
  fixedPointTolerances,
  invalidInput,
  measureScaled,
  nameOf,
  newMeasure,
  nonFiniteMessage,
  statusOfFailure,
  worstResiduals,
} from './convergence.js';
import type {
  EvaluationFailure,
  FixedPointProblem,
  RootProblem,
  SolveOptions,
  SolveResult,
} from './types.js';

export const NEWTON_DEFAULTS = { maxIterations: 100, maxPasses: 2000, reuse: 3 } as const;
/** Smallest typical magnitude used for finite-difference steps. */
const TYPICAL_FLOOR = 1e-8;
const ARMIJO_C = 1e-4;
const LAMBDA_MIN = 1e-5;

/** The system Newton works on, whatever problem it came from. */
interface NewtonSystem {
  n: number;
  x0: Float64Array;
  f(x: Float64Array, out: Float64Array): EvaluationFailure | void;
  /** Residual scale (tolerance) at x. */
  scale(x: Float64Array, out: Float64Array): void;
  lower?: Float64Array;
  upper?: Float64Array;
  names?: readonly string[];
  typical: Float64Array;
  /** Optional: widen typical from the first residual f at the start point x. */
  initTypical?(x: Float64Array, f: Float64Array, typical: Float64Array): void;
  /** Rows of F that each column can change; undefined = dense. */
  rows?: readonly (readonly number[])[];
  groups: readonly (readonly number[])[];
  /** 'g' or 'f', for messages. */
  what: string;
  /** Scratch: x before the Jacobian's perturbations. */
  saved: Float64Array;
}

/**
 * A residual that no variable changes (its Jacobian row is exactly zero) and that already
 * meets its tolerance needs nothing from the step: a component at zero flow that cannot leave
 * a loop gives g_i(x) = x_i, so F_i = 0 whatever x is. Such a row gets -1 on its diagonal,
 * the identity part of F = g - x, so the step leaves x_i where it is (dx_i = F_i, within
 * tolerance) instead of the matrix being singular. A zero row whose residual is not met stays
 * zero, and the factorization reports it.
 */
function pinSatisfiedRows(J: Float64Array, f: Float64Array, s: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let zero = true;
    for (let j = 0; j < n && zero; j++) if (J[row + j] !== 0) zero = false;
    if (zero && Math.abs(f[i]) <= s[i]) J[row + i] = -1;
  }
}

function residualLabel(i: number, sys: NewtonSystem): string {
  const name = sys.what === 'g' ? sys.names?.[i] : undefined;
  return name !== undefined ? `${i} (${name})` : `row ${i}`;
}

/** 0.5 * sum (f_i / s_i)^2, Infinity when any entry is not finite. */
function merit(f: Float64Array, s: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < f.length; i++) {
    const v = f[i] / s[i];
    sum += v * v;
  }
  return Number.isFinite(sum) ? 0.5 * sum : Infinity;
}

function newtonCore(sys: NewtonSystem, options: SolveOptions): SolveResult {
  const { n, lower, upper, names } = sys;
  const maxIterations = options.newton?.maxIterations ?? NEWTON_DEFAULTS.maxIterations;
  const maxJacobians = options.newton?.maxJacobians ?? maxIterations;
  const maxPasses = options.maxPasses ?? NEWTON_DEFAULTS.maxPasses;
  const maxReuse = Math.max(0, Math.floor(options.newton?.reuse ?? NEWTON_DEFAULTS.reuse));

  const x = Float64Array.from(sys.x0);
  clipToBounds(x, lower, upper);
  const f = new Float64Array(n);
  const s = new Float64Array(n);
  const trial = new Float64Array(n);
  const ft = new Float64Array(n);
  const dx = new Float64Array(n);
  const h = new Float64Array(n);
  const J = new Float64Array(n * n);
  const work = newFactored(n);
  const m = newMeasure();
  const history = new HistoryRecorder(Math.min(maxIterations + 1, 100000));
  let passes = 0;
  let iterations = 0;
  let jacobians = 0;
  /** Whether J holds a Jacobian (built, or given by the caller) to hand back in the result. */
  let haveJ = false;
  m.residual = Infinity;
  m.scaled = Infinity;

  const finish = (status: SolveResult['status'], message?: string, failure?: EvaluationFailure): SolveResult => {
    const result: SolveResult = {
      status,
      method: 'newton',
      x,
      residual: m.residual,
      scaledResidual: m.scaled,
      passes,
      iterations,
      jacobians,
      history: history.entries(),
    };
    if (message) result.message = message;
    if (failure) result.failure = failure;
    if (haveJ) result.jacobian = Float64Array.from(J);
    if (status !== 'converged' && passes > 0) result.worst = worstResiduals(f, s, rowNames());
    return result;
  };
  const rowNames = (): readonly string[] | undefined => (sys.what === 'g' ? names : undefined);
  const countPass = () => {
    passes++;
  };

  if (n === 0) {
    m.residual = 0;
    m.scaled = 0;
    return finish('converged');
  }

  // Residual at the start point.
  {
    const failure = sys.f(x, f);
    passes++;
    if (failure) return finish(statusOfFailure(failure), failure.message, failure);
    sys.scale(x, s);
    measureScaled(f, s, m);
    history.push(passes, m.scaled, m.residual, 'newton');
    if (m.nonFinite >= 0) {
      return finish('not-converged', nonFiniteMessage(sys.what, f[m.nonFinite], m.nonFinite, rowNames(), passes));
    }
    sys.initTypical?.(x, f, sys.typical);
  }

  let factored: Factored | undefined;
  let fresh = false;
  let reused = 0;
  const given = options.newton?.jacobian;
  if (given && given.length === n * n) {
    // A neighbour's Jacobian: a chord to start with (rebuilt at the first step that fails).
    J.set(given);
    haveJ = true;
    if (factor(J, x, sys.typical, work, (i) => residualLabel(i, sys), (j) => nameOf(j, sys.names)) === undefined) {
      factored = work;
      fresh = false;
      reused = 0;
    }
  }

  while (m.scaled > 1) {
    if (iterations >= maxIterations) {
      return finish('not-converged', `Newton did not converge in ${maxIterations} iterations (largest scaled residual ${m.scaled.toPrecision(3)})`);
    }
    if (!factored) {
      if (jacobians >= maxJacobians) {
        return finish('not-converged', `Newton used its budget of ${maxJacobians} Jacobians (largest scaled residual ${m.scaled.toPrecision(3)})`);
      }
      if (passes + sys.groups.length + 1 > maxPasses) {
        return finish('not-converged', `Newton stopped at ${passes} passes: a Jacobian would exceed the budget of ${maxPasses}`);
      }
      sys.saved.set(x);
      const out = buildJacobian(sys, x, f, J, h, ft, countPass);
      jacobians++;
      if (out.failure) return finish(statusOfFailure(out.failure), out.failure.message, out.failure);
      if (out.nonFinite) {
        const { column, row, value } = out.nonFinite;
        return finish(
          'not-converged',
          `${sys.what} returned ${value} in residual ${residualLabel(row, sys)} when ${nameOf(column, names)} was perturbed for the Jacobian`,
        );
      }
      pinSatisfiedRows(J, f, s, n);
      haveJ = true;
      const bad = factor(J, x, sys.typical, work, (i) => residualLabel(i, sys), (j) => nameOf(j, sys.names));
      if (bad !== undefined) return finish('not-converged', bad);
      factored = work;
      fresh = true;
      reused = 0;
    }

    // Newton (or chord) step.
    luStep(factored, f, dx);
    let finite = true;
    for (let j = 0; j < n; j++) if (!Number.isFinite(dx[j])) finite = false;
    if (!finite) return finish('not-converged', 'singular Jacobian: the Newton step is not finite');

    // Backtracking line search on phi with the scales of the current iterate.
    const phi0 = merit(f, s);
    let lambda = 1;
    let accepted = false;
    let phiT = Infinity;
    for (;;) {
      if (passes >= maxPasses) {
        return finish('not-converged', `Newton used its budget of ${maxPasses} passes (largest scaled residual ${m.scaled.toPrecision(3)})`);
      }
      let moved = false;
      for (let j = 0; j < n; j++) {
        let v = x[j] + lambda * dx[j];
        if (lower && v < lower[j]) v = lower[j];
        if (upper && v > upper[j]) v = upper[j];
        trial[j] = v;
        if (v !== x[j]) moved = true;
      }
      if (!moved) break;
      const failure = sys.f(trial, ft);
      passes++;
      if (failure) return finish(statusOfFailure(failure), failure.message, failure);
      phiT = merit(ft, s);
      if (phiT <= (1 - 2 * ARMIJO_C * lambda) * phi0) {
        accepted = true;
        break;
      }
      if (!fresh) break; // chord step failed: rebuild the Jacobian here
      // Quadratic model of phi along the step: phi(0) = phi0, phi'(0) = -2 phi0, phi(lambda) = phiT.
      let next = Number.isFinite(phiT) ? (phi0 * lambda * lambda) / (phiT - phi0 + 2 * phi0 * lambda) : 0.1 * lambda;
      if (!(next >= 0.1 * lambda)) next = 0.1 * lambda;
      if (next > 0.5 * lambda) next = 0.5 * lambda;
      lambda = next;
      if (lambda < LAMBDA_MIN) break;
    }

    if (!accepted) {
      if (!fresh) {
        factored = undefined;
        continue;
      }
      return finish(
        'not-converged',
        `Newton line search found no decrease of the scaled residual along the step (lambda down to ${lambda.toExponential(1)}${lower || upper ? ', bounds may block the step' : ''}); the point may be near a local minimum of the residual norm`,
      );
    }

    x.set(trial);
    f.set(ft);
    iterations++;
    sys.scale(x, s);
    measureScaled(f, s, m);
    history.push(passes, m.scaled, m.residual, 'newton');
    if (m.nonFinite >= 0) {
      return finish('not-converged', nonFiniteMessage(sys.what, f[m.nonFinite], m.nonFinite, rowNames(), passes));
    }
    const goodDecrease = lambda === 1 && phiT <= 0.25 * phi0;
    if (goodDecrease && reused < maxReuse) {
      reused++;
      fresh = false;
    } else {
      factored = undefined;
    }
  }
  return finish('converged');
}

function typicalOf(n: number, given: Float64Array | undefined, floorOf: (j: number) => number): Float64Array {
  const t = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const g = given?.[j];
    t[j] = g !== undefined && Number.isFinite(g) && g > 0 ? g : Math.max(floorOf(j), TYPICAL_FLOOR);
  }
  return t;
}

/**
 * Solves F(x) = 0 (problem.f) with Newton's method. Converged when |f_i(x)| <= tol_i for
 * every i; the scaled residual is max_i |f_i| / tol_i.
 */
export function solveRoot(problem: RootProblem, options: SolveOptions = {}): SolveResult {
  const { n } = problem;
  const bad =
    checkProblem(n, problem.x0, problem.lower, problem.upper, problem.names, [
      { label: 'tol', values: problem.tol, positive: true },
      { label: 'typical', values: problem.typical, positive: true },
    ]) ?? (problem.structure ? checkStructure(n, problem.structure) : undefined);
  if (bad) return invalidInput('newton', problem.x0, bad);
  const rtol = options.rtol ?? DEFAULT_RTOL;
  const atol = options.atol ?? DEFAULT_ATOL;
  const rows = problem.structure?.rows;
  const sys: NewtonSystem = {
    n,
    x0: problem.x0,
    f: (x, out) => problem.f(x, out),
    scale: (_x, out) => out.set(problem.tol),
    lower: problem.lower,
    upper: problem.upper,
    names: problem.names,
    typical: typicalOf(n, problem.typical, () => atol / rtol),
    rows,
    groups: problem.structure?.groups ?? columnGroups(n, rows),
    what: 'f',
    saved: new Float64Array(n),
  };
  return newtonCore(sys, options);
}

/**
 * Solves x = g(x) with Newton's method on F(x) = g(x) - x, with the fixed-point convergence
 * test |g_i - x_i| <= rtol |x_i| + atol_i.
 */
export function solveNewtonFixedPoint(problem: FixedPointProblem, options: SolveOptions = {}): SolveResult {
  const { n } = problem;
  const bad =
    checkProblem(n, problem.x0, problem.lower, problem.upper, problem.names, [
      { label: 'atol', values: problem.atol, positive: true },
      { label: 'typical', values: problem.typical, positive: true },
    ]) ?? (problem.structure ? checkStructure(n, problem.structure) : undefined);
  if (bad) return invalidInput('newton', problem.x0, bad);
  const { rtol, atol } = fixedPointTolerances(n, problem.atol, options);
  // F = g - x: column j also changes row j.
  const rows = problem.structure
    ? problem.structure.rows.map((r, j) => (r.includes(j) ? r : [...r, j]))
    : undefined;
  let groups = problem.structure?.groups;
  if (groups && rows && checkStructure(n, { rows, groups })) groups = undefined; // identity made groups overlap
  const sys: NewtonSystem = {
    n,
    x0: problem.x0,
    f: (x, out) => {
      const failure = problem.g(x, out);
      if (failure) return failure;
      for (let i = 0; i < n; i++) out[i] -= x[i];
    },
    scale: (x, out) => fixedPointScale(x, rtol, atol, out),
    lower: problem.lower,
    upper: problem.upper,
    names: problem.names,
    typical: typicalOf(n, problem.typical, (j) => atol[j] / rtol),
    // Without a given typical, one pass g(x0) = F + x0 shows the size of each tear variable
    // (a recycle started at zero is far from zero after one pass).
    initTypical: problem.typical
      ? undefined
      : (x, f, typical) => {
          for (let j = 0; j < n; j++) typical[j] = Math.max(typical[j], Math.abs(x[j]), Math.abs(f[j] + x[j]));
        },
    rows,
    groups: groups ?? columnGroups(n, rows),
    what: 'g',
    saved: new Float64Array(n),
  };
  return newtonCore(sys, options);
}
