/**
 * Problem, options and result of plant-data reconciliation (see reconcile.ts for the method).
 * A problem is plain data: variables (some measured) and the balances c(x) = 0 they must meet.
 * All values are SI (mol/s, mole fractions, ...): units belong to the caller's edges.
 */

/** A reading and its standard uncertainty (already divided by the coverage factor). */
export interface Reading {
  value: number;
  /** Standard uncertainty, > 0, same unit as value. */
  sigma: number;
}

export interface PlantVariable {
  /** For messages and results, e.g. "purge.flow" or "purge.Ar". */
  name: string;
  /** Start value (used for unmeasured variables; a measured one starts at its reading). */
  start: number;
  measured?: Reading;
  /** Bounds: flows >= 0, fractions in [0, 1]. Undefined means unbounded. */
  lower?: number;
  upper?: number;
  /**
   * Typical magnitude: scales the variable in the linear algebra, sets finite-difference steps
   * and the size of the terms a balance residual is judged against. Default: |start|, else
   * |reading|, else 1.
   */
  typical?: number;
}

/** The balances c(x) = 0 (m of them) over the n variables. */
export interface PlantConstraints {
  /** Number of constraints m. */
  count: number;
  /** One name per constraint, e.g. "N balance around the reactor". */
  names: readonly string[];
  /** c(x) into out (length m). */
  evaluate(x: Float64Array, out: Float64Array): void;
  /**
   * Optional analytic Jacobian dc/dx into out (m x n, row-major). out is zeroed before each
   * call, so only the non-zero entries need setting. Without it the engine uses forward
   * differences (relative steps, one base evaluation reused for every column).
   */
  jacobian?(x: Float64Array, out: Float64Array): void;
  /** True when every constraint is linear in x: the Jacobian is built once and kept. */
  linear?: boolean;
  /**
   * Optional structure: which variables each constraint can involve (row i holds the indices
   * index[start[i]] .. index[start[i + 1] - 1], each once), and whether the row is linear (its
   * Jacobian row is the same at every x). With it and an analytic Jacobian the engine eliminates
   * the linear balances once per problem and each instrument's own equation analytically
   * (reconcile.ts, structured.ts); without it every step is factorised whole.
   */
  pattern?(): ConstraintPattern;
  /**
   * Optional second-order terms: row[t] holds coef[t] x a[t] x x b[t] (a[t] may equal b[t]), and
   * every other term of every row is linear, so that these give the balances' second
   * derivatives exactly. With them (and an analytic Jacobian) each step includes the curvature of
   * the balances weighted by their multipliers (reconcile.ts, curvature.ts); without them each
   * step is Gauss-Newton.
   */
  products?(): ConstraintProducts;
}

export interface ConstraintProducts {
  row: Int32Array;
  a: Int32Array;
  b: Int32Array;
  coef: Float64Array;
}

export interface ConstraintPattern {
  start: Int32Array;
  index: Int32Array;
  /** 1 where the row is linear. */
  linear: Uint8Array;
}

export interface ReconciliationProblem {
  variables: readonly PlantVariable[];
  constraints: PlantConstraints;
}

/** Values that change from one snapshot (row of plant data) to the next. */
export interface Snapshot {
  /**
   * Readings by variable index (length n). Entries of unmeasured variables are ignored; a
   * non-finite entry for a measured variable means "no reading in this row": the variable is
   * treated as unmeasured. Default: each variable's measured.value.
   */
  values?: ArrayLike<number>;
  /** Standard uncertainties by variable index (length n). Default: each measured.sigma. */
  sigmas?: ArrayLike<number>;
  /** Start values by variable index; non-finite entries take the variable's own start. */
  start?: ArrayLike<number>;
  /** Variables to treat as unmeasured in this solve (serial elimination uses this). */
  unmeasured?: readonly number[];
}

export interface ReconcileOptions {
  /** Iterations, each a linearised step (default 50). */
  maxIterations?: number;
  /** Converged when the last step is at most this, measured in sigmas for measured variables
   *  and in typical magnitudes for unmeasured ones (default 1e-8)... */
  stepTolerance?: number;
  /** ...and every |c_i| is at most this times the size of its terms, sum_j |dc_i/dx_j| |x_j|
   *  (default 1e-10). */
  constraintTolerance?: number;
  /** Rank decisions: a diagonal entry of a pivoted R counts when |R_kk| > rankTolerance *
   *  |R_00| (default 1e-10). */
  rankTolerance?: number;
  /** A scaled quantity that should be zero for a structural reason (a leverage, a coupling to a
   *  free variable) counts as zero at or below this (default 1e-8). */
  zeroTolerance?: number;
  /** Confidence of the global test and of the measurement test as a family (default 0.95). */
  confidence?: number;
  /**
   * Use the problem's structure (PlantConstraints.pattern) where it allows (default true):
   * the same steps and results to rounding, computed on smaller matrices. false factorises every
   * step whole (the reference the structured steps are tested against).
   */
  structured?: boolean;
  /**
   * Second-order steps where the balances state their products (PlantConstraints.products;
   * default true): each step minimises the quadratic model of the Lagrangian (the curvature of
   * the bilinear balances weighted by their multipliers) instead of the readings' term alone, so
   * that a bilinear problem converges quadratically rather than linearly. The answer is the same
   * to the step tolerance; false takes Gauss-Newton steps.
   */
  secondOrder?: boolean;
}

export type ReconcileStatus = 'reconciled' | 'not-redundant' | 'not-converged' | 'invalid';

export type Classification = 'redundant' | 'non-redundant' | 'observable' | 'unobservable';

export interface VariableEstimate {
  index: number;
  name: string;
  role: 'measured' | 'unmeasured';
  /** Measured: redundant or non-redundant. Unmeasured: observable or unobservable. */
  classification: Classification;
  /** Measured only: the reading and its standard uncertainty. */
  reading?: number;
  sigma?: number;
  /** The reconciled or estimated value; null when the variable is unobservable. */
  value: number | null;
  /** Standard uncertainty of value (from the linearisation at the solution); null when unobservable. */
  uncertainty: number | null;
  /** Measured only: value - reading, and its standard deviation. */
  adjustment?: number;
  adjustmentSigma?: number;
  /** Measured and redundant only: the measurement test. */
  test?: { statistic: number; critical: number; failed: boolean };
  /** Set when the solution sits on a bound (the bound then acts as an exact balance). */
  atBound?: 'lower' | 'upper';
  note?: string;
}

export interface GlobalTest {
  /** not-redundant: nothing is checked (dof = 0), so there is no test. */
  status: 'passed' | 'failed' | 'not-redundant';
  /** gamma = sum over measured of ((reconciled - reading) / sigma)^2. */
  statistic: number;
  /** Degrees of freedom: the redundancy, rank of the projected constraint matrix. */
  dof: number;
  /** Chi-square quantile at the confidence (NaN when dof = 0). */
  critical: number;
  /** P(chi-square(dof) >= statistic) (NaN when dof = 0). */
  pValue: number;
  confidence: number;
}

export interface MeasurementTestInfo {
  /** Number of measurement tests (redundant measured variables). */
  count: number;
  confidence: number;
  /** Sidak level of each test: 1 - confidence^(1 / count). */
  level: number;
  /** Normal quantile 1 - level / 2. */
  critical: number;
}

export interface ReconcileHistoryEntry {
  iteration: number;
  /** Weighted sum of squares at the iterate the step started from. */
  objective: number;
  /** Largest scaled constraint residual after the step. */
  residual: number;
  /** Largest scaled step. */
  step: number;
  /** Fraction of the step taken (< 1 when a bound stopped it). */
  stepLength: number;
  /** Number of bounds held as equalities. */
  activeBounds: number;
}

export interface ReconcileResult {
  status: ReconcileStatus;
  /** One line for the reporter, status first. */
  message: string;
  /** Problems with the problem itself (status invalid), one per problem. */
  issues: string[];
  /**
   * reconciled / not-redundant: the solution, NaN for unobservable variables.
   * not-converged: the last iterate (not a solution; for diagnosis only). invalid: the start.
   */
  x: Float64Array;
  /** Per variable, in problem order; empty unless reconciled or not-redundant. */
  estimates: VariableEstimate[];
  /**
   * Covariance of the reconciled measured values and the observable unmeasured estimates
   * (first-order, at the solution's linearisation), over `indices` (variable indices), as a
   * row-major matrix of indices.length squared. Empty unless reconciled or not-redundant.
   */
  covariance: {
    indices: number[];
    matrix: Float64Array;
    /** When the engine has it: matrix = W W', W (indices.length x rank, row-major). */
    factor?: { W: Float64Array; rank: number };
  };
  /** Rank of the projected constraint matrix (degrees of freedom of the global test). */
  redundancy: number;
  globalTest?: GlobalTest;
  measurementTest?: MeasurementTestInfo;
  /** Weighted sum of squares at x. */
  objective: number;
  iterations: number;
  /** Evaluations of c(x) (finite differences included). */
  evaluations: number;
  /** Jacobians formed (analytic or by differences). */
  jacobians: number;
  /** Largest |c_i(x)|, and the largest relative to the size of its terms. */
  residual: number;
  scaledResidual: number;
  history: ReconcileHistoryEntry[];
  /** What a reader must know: unadjusted readings, unobservable variables, bounds in force. */
  notes: string[];
}
