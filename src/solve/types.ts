/** Problem, method, result: the shared shape of every solver in loopclose. */

export type Status = 'converged' | 'not-converged' | 'infeasible' | 'invalid';

/**
 * Why one evaluation could not be completed, e.g. a fixed conversion that would consume more
 * of a reactant than the inlet holds. Returned (not thrown) by an evaluation.
 */
export interface EvaluationFailure {
  /** infeasible: no steady state as specified; invalid: cannot be computed as given; not-converged: an inner solve (a flash) failed. */
  kind: 'infeasible' | 'invalid' | 'not-converged';
  message: string;
  /** Optional machine-readable details: unit, component, what to change. */
  unit?: string;
  component?: string;
  help?: string;
}

/** x = g(x): one full pass of a flowsheet sequence maps tear guesses to recomputed tears. */
export interface FixedPointProblem {
  n: number;
  x0: Float64Array;
  /** Computes g(x) into out. Returns a failure to stop the solve, or nothing. */
  g(x: Float64Array, out: Float64Array): EvaluationFailure | void;
  /** Lower bounds (flows: 0). Undefined means unbounded. */
  lower?: Float64Array;
  upper?: Float64Array;
  /** Absolute tolerance floor per variable (same unit as x). */
  atol?: Float64Array;
  /** Names of the variables for messages, e.g. "recycle.H2". */
  names?: string[];
  /** Optional (Newton): typical magnitude of each variable, sets finite-difference steps. */
  typical?: Float64Array;
  /** Optional (Newton): which rows of g each variable can change, to skip or group columns. */
  structure?: JacobianStructure;
}

/** F(x) = 0 with optional bounds: used by Newton directly (tears plus targets). */
export interface RootProblem {
  n: number;
  x0: Float64Array;
  /** Residual into out. Returns a failure to stop. */
  f(x: Float64Array, out: Float64Array): EvaluationFailure | void;
  lower?: Float64Array;
  upper?: Float64Array;
  /** Scale of each residual: converged when |f_i| <= tol_i for every i. */
  tol: Float64Array;
  names?: string[];
  /** Optional: typical magnitude of each variable, sets finite-difference steps. */
  typical?: Float64Array;
  /** Optional: which rows of f each variable can change, to skip or group columns. */
  structure?: JacobianStructure;
}

/**
 * Sparsity of a Jacobian for finite differences. Columns whose row sets do not overlap are
 * perturbed together in one evaluation (Curtis, Powell and Reid, "On the estimation of sparse
 * Jacobian matrices", J. Inst. Maths Applics 13 (1974) 117-119).
 */
export interface JacobianStructure {
  /** rows[j]: the residual rows that variable j can change (for x = g(x): rows of g; the
   *  identity part of g(x) - x is added by the solver). */
  rows: readonly (readonly number[])[];
  /** Optional column groups (each column exactly once, no two columns of a group sharing a
   *  row). Formed greedily from rows when absent. */
  groups?: readonly (readonly number[])[];
}

export type MethodName = 'direct' | 'wegstein' | 'newton' | 'anderson' | 'auto';

export interface SolveOptions {
  /** Relative tolerance on every variable (default 1e-10). */
  rtol?: number;
  /** Absolute floor where the problem gives none (default 1e-12). */
  atol?: number;
  /** Budget of full evaluations (passes). */
  maxPasses?: number;
  wegstein?: { qMin?: number; qMax?: number; directSteps?: number; maxPasses?: number };
  newton?: {
    maxIterations?: number;
    maxJacobians?: number;
    /** Reuse one factored Jacobian for at most this many further steps while each full step
     *  at least halves the scaled residual norm (default 3; 0 rebuilds every iteration). */
    reuse?: number;
    /**
     * A Jacobian of F (n*n, row-major) to start from, e.g. the last one of a neighbouring
     * solve in a sweep: used as a chord until a step fails to decrease the residual, then a
     * fresh one is built.
     */
    jacobian?: Float64Array;
  };
}

export interface HistoryEntry {
  /** Pass count when this iterate was recorded. */
  pass: number;
  /** Largest scaled residual: max_i |g_i(x) - x_i| / (rtol |x_i| + atol_i). Converged when <= 1. */
  scaled: number;
  /** Largest absolute residual. */
  residual: number;
  method: 'direct' | 'wegstein' | 'newton' | 'anderson';
}

export interface SolveResult {
  status: Status;
  /** The method(s) that ran, e.g. "wegstein" or "wegstein+newton". */
  method: string;
  /** The last iterate (the solution when converged). */
  x: Float64Array;
  /** Largest absolute residual at x. */
  residual: number;
  /** Largest scaled residual at x (<= 1 means converged). */
  scaledResidual: number;
  /** Full evaluations of the problem function. */
  passes: number;
  /** Iterations of the method (accepted steps). */
  iterations: number;
  /** Jacobians built (Newton). */
  jacobians: number;
  /** Newton: the last Jacobian of F used (n*n, row-major), to start a neighbouring solve. */
  jacobian?: Float64Array;
  history: HistoryEntry[];
  message?: string;
  failure?: EvaluationFailure;
  /** Largest residuals at the end, for diagnosis: index, name, value. */
  worst?: { index: number; name?: string; residual: number; scaled: number }[];
}
