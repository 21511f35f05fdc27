/**
 * Plant-data reconciliation: weighted least squares under exact balances, classification of
 * the variables, and the statistics the gross-error tests need.
 *
 * What is minimised. Given readings y_i with standard uncertainties sigma_i, the reconciled
 * values x minimise  sum over measured i of ((x_i - y_i) / sigma_i)^2  subject to the balances
 * c(x) = 0 (component, element and total balances; flows times fractions where both are
 * variables; equal compositions at a splitter) and to bounds (flows >= 0, fractions in [0, 1]).
 * Unmeasured variables (flows no meter reads, compositions no analyzer reads, reaction extents)
 * carry no weight: they take whatever values the balances and the reconciled readings imply.
 * What is assumed: the plant is at steady state over the averaging period; the balances are
 * exact (no unmodelled stream, leak or accumulation); the reading errors are independent,
 * normal, unbiased and of the stated standard uncertainty. A reading that breaks these
 * assumptions (a meter that reads 6 % high, a leak) shows up as a failed test, and the tests
 * only mean what these assumptions let them mean.
 * What the tests mean. Under the assumptions, the weighted sum of squares at the solution
 * (gamma) is chi-square distributed with as many degrees of freedom as there are independent
 * checks on the readings (the redundancy); the global test fails when gamma exceeds the
 * chi-square quantile at the stated confidence (95 % by default), i.e. when the readings
 * disagree with the balances by more than their uncertainties explain. The measurement test
 * divides each adjustment by its own standard deviation; with N tests at once each is run at the
 * Sidak level 1 - (1 - alpha)^(1/N) so that the family keeps the stated confidence. A reading
 * that no balance checks (non-redundant) cannot be adjusted and is passed through as read; an
 * unmeasured variable the readings do not determine (unobservable) is reported as such, never
 * given a number. All covariances are first order, from the linearisation at the solution.
 *
 * How it is solved. Successive linearisation (a Gauss-Newton form of sequential quadratic
 * programming; Crowe, "Reconciliation of process flow rates by matrix projection. Part II: the
 * nonlinear case", AIChE J. 32 (1986) 616-623). At each iterate the balances are linearised,
 * c + A dx_m + B dx_u = 0 (A: measured columns, B: unmeasured columns), and the unmeasured
 * variables are eliminated by projection (Crowe, Garcia Campos and Hrymak, "Reconciliation of
 * process flow rates by matrix projection. Part I: linear case", AIChE J. 29 (1983) 881-888)
 * computed, as in Sanchez and Romagnoli ("Use of orthogonal transformations in data
 * classification-reconciliation", Comput. Chem. Eng. 20 (1996) 483-493), by a QR factorisation
 * of B with column pivoting: B P = Q [R11 R12; 0 0], rank r; the last m - r columns Q2 of Q
 * span the balances free of unmeasured variables, G = Q2' A. In the measured variables scaled by
 * their sigmas (z = (x_m - y) / sigma) the linearised problem is  min |z|^2  subject to
 * G z = g, whose solution is the minimum-norm z = G^+ g; G^+ comes from a second pivoted QR, of
 * G' = Q_G R_G, and the redundancy is its rank. This is the Lagrange solution
 * x = y - V G' (G V G')^-1 (G y - ...) of the textbooks, computed without forming G V G'. The
 * unmeasured variables then follow from R11 dx_basic = -Q1' (c + A dx_m); the variables of the
 * free columns (and any basic one coupled to them through R11^-1 R12) are unobservable and are
 * held where they are. Rows and columns are scaled before factorising (measured columns by
 * sigma, unmeasured by their typical magnitude, rows by their largest entry), and every rank
 * decision counts |R_kk| > rankTolerance * |R_00| (default 1e-10).
 * Classification at the solution (Crowe 1983; Narasimhan and Jordache, "Data Reconciliation
 * and Gross Error Detection", Gulf 2000, ch. 3): a measured variable is redundant when its
 * column of G is not zero, tested through its leverage h_jj = |row j of Q_G|^2 (the share of its
 * own reading's variance that the adjustment takes; sqrt(h_jj) > zeroTolerance, default 1e-8);
 * an unmeasured variable is observable when it is a basic column of B with a zero row in
 * R11^-1 R12 (every solution of B dx_u = 0 leaves it unchanged). Covariances: the reconciled
 * measured values have Sigma (I - Q_G Q_G') Sigma, the adjustments Sigma Q_G Q_G' Sigma, and the
 * observable unmeasured estimates inherit them through dx_basic = -R11^-1 Q1' A dx_m.
 * Bounds: a primal active-set rule (Nocedal and Wright, "Numerical Optimization", 2nd ed.,
 * Springer 2006, Sec. 16.5): a step that would cross a bound is cut at it and the variable is
 * held there as an exact balance x_j = bound (a reading outside its bounds starts held); at
 * convergence a held bound is released when the step without it moves the variable back
 * inside. Bounds that pin each other through a balance (zero water in three streams around a
 * mixer) are released together, holding again one at a time those that would move outward;
 * held bounds that contradict the balances are released until the system is consistent. A
 * result with a bound in force says so: the tests then take the bound as exact.
 * Convergence: the last step is at most stepTolerance (in sigmas, or typical magnitudes for
 * unmeasured variables) and every balance residual at most constraintTolerance times the size
 * of its terms. A problem that does not converge, or whose balances cannot all be met, returns
 * status not-converged with its history, never a solution.
 * Structure: when the balances say which variables each row holds (PlantConstraints.pattern) and
 * the Jacobian is analytic, the same step and statistics are computed on smaller matrices
 * (structured.ts: the linear unit balances factorised once per problem, each instrument's own
 * equation solved for its reading); a step with a bound held takes the whole factorisation.
 * Second order (options.secondOrder, default true): the step above minimises |zeta|^2 alone, which
 * leaves out the curvature of the bilinear balances weighted by their multipliers and converges
 * linearly (about 1e-2 per step on the ammonia demo). Where the balances are quadratic
 * (PlantConstraints.products, or found by differencing an analytic Jacobian), each step larger
 * than the step tolerance is corrected in the null space of the linearised balances that its
 * factorisation gives (curvature.ts: the SQP step with the exact Hessian of the Lagrangian), and
 * the convergence is quadratic. The statistics at the solution are those of the linearisation
 * there, as above.
 */
import { applyQ, applyQt, newQrWork, qrPivoted, solveUpper, solveUpperTransposed, type QrWork } from './dense.js';
import { StructuredSteps, type StructuredState, type StructuredSummary } from './structured.js';
import { CurvatureStep } from './curvature.js';
import { chiSquareCritical, chiSquarePValue, normalCritical, pValueText, sidakLevel } from './statistics.js';
import type {
  GlobalTest,
  MeasurementTestInfo,
  ReconcileHistoryEntry,
  ReconcileOptions,
  ConstraintPattern,
  ReconcileResult,
  ReconciliationProblem,
  Snapshot,
  VariableEstimate,
} from './types.js';

export const RECONCILE_DEFAULTS: Required<ReconcileOptions> = {
  maxIterations: 50,
  stepTolerance: 1e-8,
  constraintTolerance: 1e-10,
  rankTolerance: 1e-10,
  zeroTolerance: 1e-8,
  confidence: 0.95,
  structured: true,
  secondOrder: true,
};

const SQRT_EPS = Math.sqrt(Number.EPSILON);
/** Scaled residual of G z = g above which the linearised balances count as contradictory. */
const INCONSISTENCY_TOL = 1e-8;
/** Scaled step below which a finite-difference Jacobian is kept from one iteration to the next. */
const CHORD_STEP = 1e-4;

/** Reconciles one snapshot: prepareReconciliation(problem, options).solve(). */
export function reconcile(problem: ReconciliationProblem, options: ReconcileOptions = {}, snapshot?: Snapshot): ReconcileResult {
  return prepareReconciliation(problem, options).solve(snapshot);
}

/** No variable left out of a snapshot. */
const NONE: ReadonlySet<number> = new Set<number>();

function sizeIssue(issues: string[], key: string, arr: ArrayLike<number> | undefined, n: number): void {
  if (arr && arr.length !== n) issues.push(`snapshot: ${key} has ${arr.length} entries, the problem has ${n} variables`);
}

/** Checks the problem's shape once and allocates the work space for many snapshots. */
export function prepareReconciliation(problem: ReconciliationProblem, options: ReconcileOptions = {}): PreparedReconciliation {
  return new PreparedReconciliation(problem, options);
}

/** What one linearised step left in the buffers (read by the statistics at the end). */
interface StepInfo {
  /** Rows of the linearised system (balances plus bounds held). */
  rows: number;
  /** Rank of the scaled B. */
  rankB: number;
  /** Rank of G (the redundancy). */
  rankG: number;
  /** Largest scaled step. */
  step: number;
  /** Largest residual of the projected balances that G z = g cannot meet (0 when consistent). */
  inconsistency: number;
  /** Largest |g_i|, the size the inconsistency is judged against. */
  gScale: number;
}

/**
 * A reconciliation problem ready for many snapshots of the same structure: the variables,
 * balances and options are fixed; readings, sigmas and start values change per `solve`. Owns
 * its work space (not shareable between threads or concurrent solves); a linear problem's
 * Jacobian is built once and kept here.
 */
export class PreparedReconciliation {
  readonly n: number;
  readonly m: number;
  readonly names: readonly string[];
  readonly constraintNames: readonly string[];
  readonly options: Required<ReconcileOptions>;
  /** Problems with the problem's shape; every solve returns invalid while there is one. */
  readonly issues: readonly string[];

  private readonly problem: ReconciliationProblem;
  private readonly maxRows: number;
  // Per-solve data.
  private readonly x: Float64Array;
  private readonly xBase: Float64Array;
  private readonly c: Float64Array;
  private readonly cWork: Float64Array;
  private readonly J: Float64Array;
  private linearJacobianReady = false;
  private readonly y: Float64Array;
  private readonly sigma: Float64Array;
  private readonly typical: Float64Array;
  private readonly lower: Float64Array;
  private readonly upper: Float64Array;
  private readonly isMeasured: Uint8Array;
  private readonly active: Int8Array;
  private readonly meas: Int32Array;
  private readonly unmeas: Int32Array;
  /** Position of each variable in meas or unmeas. */
  private readonly position: Int32Array;
  private p = 0;
  private q = 0;
  // Linear algebra buffers.
  private readonly rowScale: Float64Array;
  private readonly cs: Float64Array;
  private readonly B: Float64Array;
  private readonly A: Float64Array;
  private readonly Gt: Float64Array;
  private readonly QG: Float64Array;
  private readonly T: Float64Array;
  private readonly g: Float64Array;
  private readonly vec: Float64Array;
  private readonly z: Float64Array;
  private readonly dx: Float64Array;
  private readonly qrB: QrWork;
  private readonly qrG: QrWork;
  private evaluations = 0;
  private jacobians = 0;
  /** residualNorms at the last iterate of the current solve. */
  private lastNorms: { abs: number; scaled: number; worst: number } | undefined;
  /** Which variables each balance involves, when the constraints say (and the Jacobian is analytic). */
  private readonly pattern: ConstraintPattern | undefined;
  /** The problem's structure (structured.ts), when it has one to use. */
  private readonly structure: StructuredSteps | undefined;
  private readonly structuredState: StructuredState;
  /** The balances' products for second-order steps (curvature.ts), when they state them. */
  private readonly curvature: CurvatureStep | undefined;
  /** Whether the factorisation in the buffers is the structured one (else the whole one). */
  private lastStructured = false;
  /** The confidence as the messages print it (the options are fixed). */
  private confidenceText: string | undefined;
  /** Work space of summarise: the covariance position of each variable, leverages, scales. */
  private readonly covPosition: Int32Array;
  private readonly leverageWork: Float64Array;
  private readonly scaleWork: Float64Array;

  constructor(problem: ReconciliationProblem, options: ReconcileOptions = {}) {
    this.problem = problem;
    const vars = problem.variables;
    const cons = problem.constraints;
    const n = vars.length;
    // A count that is not a whole number >= 0 is reported by checkShape; allocate for none.
    const m = Number.isInteger(cons.count) && cons.count >= 0 ? cons.count : 0;
    this.n = n;
    this.m = m;
    this.names = vars.map((v) => v.name);
    this.constraintNames = cons.names;
    this.options = { ...RECONCILE_DEFAULTS };
    for (const [k, v] of Object.entries(options)) if (v !== undefined) (this.options as unknown as Record<string, number | boolean>)[k] = v as number | boolean;
    this.issues = checkShape(problem, this.options);

    const M = m + n;
    this.maxRows = M;
    this.x = new Float64Array(n);
    this.xBase = new Float64Array(n);
    this.c = new Float64Array(m);
    this.cWork = new Float64Array(m);
    this.J = new Float64Array(m * n);
    this.y = new Float64Array(n);
    this.sigma = new Float64Array(n);
    this.typical = new Float64Array(n);
    this.lower = new Float64Array(n);
    this.upper = new Float64Array(n);
    this.isMeasured = new Uint8Array(n);
    this.active = new Int8Array(n);
    this.meas = new Int32Array(n);
    this.unmeas = new Int32Array(n);
    this.position = new Int32Array(n);
    this.rowScale = new Float64Array(M);
    this.cs = new Float64Array(M);
    this.B = new Float64Array(M * n);
    this.A = new Float64Array(M * n);
    this.Gt = new Float64Array(n * M);
    this.QG = new Float64Array(n * M);
    this.T = new Float64Array(M * n);
    this.g = new Float64Array(M);
    this.vec = new Float64Array(Math.max(M, n));
    this.z = new Float64Array(n);
    this.dx = new Float64Array(n);
    this.covPosition = new Int32Array(n);
    this.leverageWork = new Float64Array(n);
    this.scaleWork = new Float64Array(n);
    this.qrB = newQrWork(n);
    this.qrG = newQrWork(M);
    this.nullWork = new Float64Array(Math.max(1, n * n));
    this.followWork = new Float64Array(Math.max(1, n * n));
    this.multiplierWork = new Float64Array(M);
    this.basicWork = new Int32Array(n);
    this.coordinateWork = new Float64Array(M);
    for (let j = 0; j < n; j++) {
      this.lower[j] = vars[j].lower ?? -Infinity;
      this.upper[j] = vars[j].upper ?? Infinity;
    }
    this.structure = this.issues.length === 0 && this.options.structured !== false ? StructuredSteps.build(problem, this.options.rankTolerance) : undefined;
    this.curvature = this.issues.length === 0 && this.options.secondOrder !== false ? CurvatureStep.build(problem, n) : undefined;
    if (this.curvature) this.curvature.below = this.options.stepTolerance;
    const pat = this.issues.length === 0 && cons.jacobian && cons.pattern ? cons.pattern() : undefined;
    this.pattern = pat && pat.start.length === m + 1 && pat.index.every((j) => j >= 0 && j < n) ? pat : undefined;
    const self = this;
    this.structuredState = {
      get p() {
        return self.p;
      },
      get q() {
        return self.q;
      },
      J: this.J, c: this.c, x: this.x, y: this.y, sigma: this.sigma, typical: this.typical,
      meas: this.meas, unmeas: this.unmeas, isMeasured: this.isMeasured, position: this.position, dx: this.dx,
    };
  }

  /** Linear balances eliminated once per problem by the structured steps (0 without them). */
  get eliminatedRows(): number {
    return this.structure?.linearRows ?? 0;
  }

  /** Reconciles one snapshot (default: the readings, sigmas and starts in the problem). */
  solve(snapshot: Snapshot = {}): ReconcileResult {
    this.evaluations = 0;
    this.jacobians = 0;
    this.lastNorms = undefined;
    const issues = [...this.issues];
    this.load(snapshot, issues);
    if (issues.length > 0) return this.invalid(issues);

    const { n, x, c, active, options } = this;
    const history: ReconcileHistoryEntry[] = [];
    // A reading outside its bounds (an analyzer reading a little below zero) starts held at
    // the bound it crossed; the release rule frees it at the end if the data pull it inside.
    for (let j = 0; j < n; j++) {
      const yj = this.y[j];
      active[j] = this.isMeasured[j] && yj < this.lower[j] ? -1 : this.isMeasured[j] && yj > this.upper[j] ? 1 : 0;
    }
    if (!this.evaluate(x, c)) return this.invalid([this.nonFiniteMessage('at the start')]);

    let iterations = 0;
    let releases = 0;
    let converged = false;
    let stalled = false;
    let info: StepInfo | undefined;
    // With a finite-difference Jacobian the steps cannot fall below its rounding noise (about
    // 1e-7 in scaled units); once the steps are below 1e-4 the Jacobian is kept (a chord
    // iteration) and rebuilt only when a step grows. The balances are then met exactly; the
    // optimality condition holds with a Jacobian at most one small step old, an error of the
    // order of the differencing error itself (the bilinear test compares both to 1e-6).
    const differenced = !this.problem.constraints.jacobian && !this.problem.constraints.linear;
    let frozen = false;
    let lastStep = Infinity;
    while (iterations < options.maxIterations) {
      iterations++;
      if (!frozen) this.formJacobian();
      info = this.linearStep();
      if (differenced) {
        if (frozen && info.step > lastStep) {
          frozen = false;
          this.formJacobian();
          info = this.linearStep();
        } else if (info.step <= CHORD_STEP) {
          frozen = true;
        }
        lastStep = info.step;
      }
      // Bounds held together with the balances may ask the impossible (a start far from the
      // balances can block several variables at once): release the bound that restores a
      // consistent system, then step again.
      if (!this.consistent(info) && releases < 3 * n && this.anyActive()) {
        const released = this.releaseBounds(true);
        if (released > 0) {
          releases += released;
          continue;
        }
      }
      const objective = this.objective(x);
      // Cut the step at the nearest bound it would cross; hold that variable there.
      let alpha = 1;
      for (let j = 0; j < n; j++) {
        if (active[j] !== 0) continue;
        const d = this.dx[j];
        if (d < 0 && x[j] + d < this.lower[j]) alpha = Math.min(alpha, Math.max(0, (this.lower[j] - x[j]) / d));
        else if (d > 0 && x[j] + d > this.upper[j]) alpha = Math.min(alpha, Math.max(0, (this.upper[j] - x[j]) / d));
      }
      this.xBase.set(x);
      for (let j = 0; j < n; j++) {
        // A variable held on a bound stays exactly on it (its step is zero up to rounding).
        if (active[j] !== 0) x[j] = active[j] < 0 ? this.lower[j] : this.upper[j];
        else x[j] += alpha * this.dx[j];
      }
      if (alpha < 1) {
        const tieTol = 1e-12;
        for (let j = 0; j < n; j++) {
          if (active[j] !== 0) continue;
          const d = this.dx[j];
          if (d < 0 && this.xBase[j] + d < this.lower[j] && (this.lower[j] - this.xBase[j]) / d <= alpha + tieTol) {
            active[j] = -1;
            x[j] = this.lower[j];
          } else if (d > 0 && this.xBase[j] + d > this.upper[j] && (this.upper[j] - this.xBase[j]) / d <= alpha + tieTol) {
            active[j] = 1;
            x[j] = this.upper[j];
          }
        }
      }
      if (!this.evaluate(x, c)) {
        x.set(this.xBase);
        return this.notConverged(iterations, history, this.nonFiniteMessage(`after iteration ${iterations}`));
      }
      const norms = this.residualNorms();
      this.lastNorms = norms;
      const { scaled } = norms;
      let activeCount = 0;
      for (let j = 0; j < n; j++) if (active[j] !== 0) activeCount++;
      history.push({ iteration: iterations, objective, residual: scaled, step: info.step, stepLength: alpha, activeBounds: activeCount });
      const residualOk = scaled <= options.constraintTolerance;
      // Linear balances: the step just taken was exact, so a consistent system is converged once
      // its residual is.
      const stepOk = info.step <= options.stepTolerance || (this.problem.constraints.linear === true && this.consistent(info));
      if (alpha === 1 && stepOk && residualOk) {
        if (activeCount > 0 && releases < 3 * n) {
          const released = this.releaseBounds();
          if (released > 0) {
            releases += released;
            continue;
          }
        }
        converged = true;
        break;
      }
      if (alpha === 1 && info.step <= options.stepTolerance && !residualOk) {
        stalled = true;
        break;
      }
    }
    if (!converged || !info) {
      const why = stalled
        ? 'the balances cannot all be met: the step has stopped but the residual has not'
        : `not converged after ${iterations} iterations`;
      return this.notConverged(iterations, history, why);
    }
    // The factorisations in the buffers belong to the last linearisation with the bounds in force
    // (releaseBounds leaves them so); the step they gave is below tolerance, so they describe the solution.
    return this.summarise(info, iterations, history);
  }

  // ---------------------------------------------------------------- set-up

  private load(snapshot: Snapshot, issues: string[]): void {
    const vars = this.problem.variables;
    const { n } = this;
    const before = issues.length;
    const unmeasured = snapshot.unmeasured && snapshot.unmeasured.length > 0 ? new Set(snapshot.unmeasured) : NONE;
    for (const j of unmeasured) {
      if (!Number.isInteger(j) || j < 0 || j >= n) issues.push(`snapshot: unmeasured index ${j} is not a variable index (0..${n - 1})`);
    }
    sizeIssue(issues, 'values', snapshot.values, n);
    sizeIssue(issues, 'sigmas', snapshot.sigmas, n);
    sizeIssue(issues, 'start', snapshot.start, n);
    if (issues.length > before) return;
    let p = 0;
    let q = 0;
    for (let j = 0; j < n; j++) {
      const v = vars[j];
      const reading = snapshot.values ? snapshot.values[j] : v.measured?.value;
      const sigma = snapshot.sigmas ? snapshot.sigmas[j] : v.measured?.sigma;
      const measured = v.measured !== undefined && !unmeasured.has(j) && Number.isFinite(reading);
      this.isMeasured[j] = measured ? 1 : 0;
      const startGiven = snapshot.start ? snapshot.start[j] : NaN;
      let start = Number.isFinite(startGiven) ? startGiven : v.start;
      if (measured) {
        if (!(Number.isFinite(sigma) && (sigma as number) > 0)) {
          issues.push(`variable "${v.name}": standard uncertainty ${String(sigma)} is not a positive number; give sigma > 0 in the same unit as the reading`);
          continue;
        }
        this.y[j] = reading as number;
        this.sigma[j] = sigma as number;
        start = reading as number;
        this.meas[p] = j;
        this.position[j] = p++;
      } else {
        this.y[j] = NaN;
        this.sigma[j] = NaN;
        this.unmeas[q] = j;
        this.position[j] = q++;
      }
      if (!Number.isFinite(start)) {
        issues.push(`variable "${v.name}": start value ${String(start)} is not a finite number`);
        continue;
      }
      this.x[j] = Math.min(this.upper[j], Math.max(this.lower[j], start));
      const t = v.typical ?? (start !== 0 ? Math.abs(start) : measured && reading !== 0 ? Math.abs(reading as number) : 1);
      this.typical[j] = t > 0 && Number.isFinite(t) ? t : 1;
    }
    this.p = p;
    this.q = q;
  }

  private evaluate(x: Float64Array, out: Float64Array): boolean {
    this.evaluations++;
    this.problem.constraints.evaluate(x, out);
    for (let i = 0; i < this.m; i++) if (!Number.isFinite(out[i])) return false;
    return true;
  }

  private nonFiniteMessage(when: string): string {
    const bad: string[] = [];
    for (let i = 0; i < this.m && bad.length < 3; i++) if (!Number.isFinite(this.c[i])) bad.push(`"${this.constraintNames[i]}"`);
    return `balance ${bad.join(', ')} is not a finite number ${when}; check that it is defined for the start values and bounds`;
  }

  /** J = dc/dx at this.x (this.c holds c(x)): analytic, or forward differences. */
  private formJacobian(): void {
    const cons = this.problem.constraints;
    if (cons.linear && this.linearJacobianReady) return;
    const { n, m, x, J } = this;
    this.jacobians++;
    J.fill(0);
    if (cons.jacobian) {
      cons.jacobian(x, J);
    } else {
      // Forward differences, step relative to the variable (Dennis and Schnabel 1983, Sec. 5.4),
      // taken backwards where the forward step would leave the upper bound; c(x) reused. For
      // linear balances a difference quotient has no truncation error, so the step is the
      // variable's whole size, which keeps the rounding error near machine precision.
      const cw = this.cWork;
      const rel = cons.linear ? 1 : SQRT_EPS;
      for (let j = 0; j < n; j++) {
        const xj = x[j];
        let h = rel * Math.max(Math.abs(xj), this.typical[j]);
        if (xj + h > this.upper[j]) h = -h;
        x[j] = xj + h;
        h = x[j] - xj;
        this.evaluations++;
        cons.evaluate(x, cw);
        x[j] = xj;
        for (let i = 0; i < m; i++) J[i * n + j] = (cw[i] - this.c[i]) / h;
      }
    }
    if (cons.linear) this.linearJacobianReady = true;
  }

  // ---------------------------------------------------------------- one linearised step

  /**
   * Builds the scaled linearised system at this.x (balances, then one row per bound held),
   * factorises it and leaves the step in this.dx. Buffers afterwards: B holds the pivoted QR of
   * the unmeasured columns, A holds Q' times the measured columns, Gt the pivoted QR of G'.
   */
  private linearStep(): StepInfo {
    if (this.structure && this.p > 0 && !this.anyActive()) {
      const s = this.structure.step(this.structuredState, this.options.rankTolerance, this.trialStep ? undefined : this.curvature);
      if (s) {
        this.lastStructured = true;
        return { rows: this.m, ...s };
      }
    }
    this.lastStructured = false;
    return this.wholeStep();
  }

  /** The step from a factorisation of the whole linearised system (see the file header). */
  private wholeStep(): StepInfo {
    const { n, m, p, q, x, J, c, active, meas, unmeas, sigma, typical, rowScale, cs, B, A } = this;
    const R = this.maxRows;
    const tol = this.options.rankTolerance;
    // Rows: balances.
    let M = 0;
    for (let i = 0; i < m; i++) {
      let s = 0;
      for (let k = 0; k < p; k++) s = Math.max(s, Math.abs(J[i * n + meas[k]]) * sigma[meas[k]]);
      for (let k = 0; k < q; k++) s = Math.max(s, Math.abs(J[i * n + unmeas[k]]) * typical[unmeas[k]]);
      if (s === 0) s = 1;
      rowScale[M] = s;
      for (let k = 0; k < p; k++) A[k * R + M] = (J[i * n + meas[k]] * sigma[meas[k]]) / s;
      for (let k = 0; k < q; k++) B[k * R + M] = (J[i * n + unmeas[k]] * typical[unmeas[k]]) / s;
      cs[M] = c[i] / s;
      M++;
    }
    // Rows: bounds held as x_j = bound.
    for (let j = 0; j < n; j++) {
      if (active[j] === 0) continue;
      const measured = this.isMeasured[j] === 1;
      const bound = active[j] < 0 ? this.lower[j] : this.upper[j];
      const s = measured ? sigma[j] : typical[j];
      for (let k = 0; k < p; k++) A[k * R + M] = 0;
      for (let k = 0; k < q; k++) B[k * R + M] = 0;
      if (measured) A[this.position[j] * R + M] = 1;
      else B[this.position[j] * R + M] = 1;
      rowScale[M] = s;
      cs[M] = (x[j] - bound) / s;
      M++;
    }
    // Unmeasured columns: B P = Q R, rank r.
    const r = q > 0 ? qrPivoted(B, M, q, R, tol, this.qrB) : 0;
    // Q' A and Q' c.
    for (let k = 0; k < p; k++) applyQt(B, M, R, this.qrB.beta, r, A, k * R);
    applyQt(B, M, R, this.qrB.beta, r, cs);
    // Projected balances G = (Q'A)[r:, :], h = (Q'c)[r:]; current z; g = G z - h.
    const z = this.z;
    for (let k = 0; k < p; k++) z[k] = (x[meas[k]] - this.y[meas[k]]) / sigma[meas[k]];
    const mg = M - r;
    const Gt = this.Gt;
    const ldG = n;
    const g = this.g;
    let gScale = 0;
    for (let i = 0; i < mg; i++) {
      let s = -cs[r + i];
      for (let k = 0; k < p; k++) {
        const v = A[k * R + r + i];
        Gt[i * ldG + k] = v;
        s += v * z[k];
      }
      g[i] = s;
      gScale = Math.max(gScale, Math.abs(s));
    }
    // Minimum-norm z with G z = g: G' P = Q_G R_G; R11' w = (P'g)[0:rho]; z = Q_G w.
    const rho = p > 0 && mg > 0 ? qrPivoted(Gt, p, mg, ldG, tol, this.qrG) : 0;
    const t = this.vec;
    const permG = this.qrG.perm;
    for (let i = 0; i < mg; i++) t[i] = g[permG[i]];
    solveUpperTransposed(Gt, ldG, rho, t);
    let inconsistency = 0;
    for (let i = rho; i < mg; i++) {
      let s = -t[i];
      for (let k = 0; k < rho; k++) s += Gt[i * ldG + k] * t[k];
      inconsistency = Math.max(inconsistency, Math.abs(s));
    }
    // R_G's coordinates of zeta_GN, kept for the second-order step (this.vec is reused below).
    if (this.curvature) for (let i = 0; i < rho; i++) this.coordinateWork[i] = t[i];
    const dx = this.dx;
    const zNew = this.QG; // scratch: first p entries (QG is formed later, in summarise)
    for (let k = 0; k < p; k++) zNew[k] = k < rho ? t[k] : 0;
    applyQ(Gt, p, ldG, this.qrG.beta, rho, zNew);
    let step = 0;
    for (let k = 0; k < p; k++) {
      const dz = zNew[k] - z[k];
      step = Math.max(step, Math.abs(dz));
      dx[meas[k]] = dz * sigma[meas[k]];
      z[k] = dz; // z now holds dz for the unmeasured solve
    }
    // Unmeasured: R11 dv_basic = -(Q1'c + (Q1'A) dz), free columns unchanged.
    const rhs = this.vec;
    for (let k = 0; k < r; k++) {
      let s = cs[k];
      for (let l = 0; l < p; l++) s += A[l * R + k] * z[l];
      rhs[k] = -s;
    }
    solveUpper(B, R, r, rhs);
    const permB = this.qrB.perm;
    let stepGN = step;
    for (let k = 0; k < r; k++) stepGN = Math.max(stepGN, Math.abs(rhs[k]));
    if (this.curvature && !this.trialStep && p > rho && this.curvature.applies(stepGN) && this.wholeSecondOrder(M, r, rho, rhs, this.coordinateWork)) {
      // dz = dz_GN + N u, dv_B = dv_GN - (R11^-1 Q1'A N) u.
      const { u } = this.curvature;
      const k = p - rho;
      const { nullWork: N, followWork: X } = this;
      for (let l = 0; l < p; l++) {
        let s = 0;
        for (let c = 0; c < k; c++) s += N[c * p + l] * u[c];
        z[l] += s;
      }
      for (let b = 0; b < r; b++) {
        let s = 0;
        for (let c = 0; c < k; c++) s += X[c * r + b] * u[c];
        rhs[b] -= s;
      }
      step = 0;
      for (let l = 0; l < p; l++) {
        step = Math.max(step, Math.abs(z[l]));
        dx[meas[l]] = z[l] * sigma[meas[l]];
      }
    }
    for (let k = 0; k < q; k++) dx[unmeas[permB[k]]] = 0;
    for (let k = 0; k < r; k++) {
      const j = unmeas[permB[k]];
      dx[j] = rhs[k] * typical[j];
      step = Math.max(step, Math.abs(rhs[k]));
    }
    return { rows: M, rankB: r, rankG: rho, step, inconsistency, gScale };
  }

  /** Null space of G (N, p x (p - rho), column c at c * p) and R11^-1 Q1'A N (r x (p - rho), column c at c * r). */
  private readonly nullWork: Float64Array;
  private readonly followWork: Float64Array;
  private readonly multiplierWork: Float64Array;
  private readonly basicWork: Int32Array;
  private readonly coordinateWork: Float64Array;

  /**
   * The second-order correction (curvature.ts) of the whole step just made, into curvature.u:
   * the steps that meet the linearised balances are dz = dz_GN + N u with N an orthonormal basis
   * of the null space of G (the last p - rho columns of Q_G), the basic unmeasured variables
   * following by R11 dv_B = -(Q1'c + Q1'A dz); |zeta|^2 = |zeta_GN|^2 + |u|^2, so H0 = I.
   * Multipliers (scaled rows): lambda~ = Q_B [0; eta] with G' eta = -zeta_GN (from G' P = Q_G R_G:
   * R11 (P' eta)[0:rho] = -t, the rest zero), lambda_i = lambda~_i / rowScale_i.
   * dvB: the basic unmeasured steps (r entries); t: R_G's coordinates of zeta_GN (rho entries;
   * overwritten). z holds dz_GN.
   */
  private wholeSecondOrder(M: number, r: number, rho: number, dvB: Float64Array, t: Float64Array): boolean {
    const cv = this.curvature!;
    const { n, m, p, A, B, Gt, z, sigma, typical, isMeasured, position, rowScale } = this;
    const R = this.maxRows;
    const ldG = n;
    const k = p - rho;
    const { nullWork: N, followWork: X, multiplierWork: lt } = this;
    // Multipliers.
    for (let i = 0; i < rho; i++) t[i] = -t[i];
    solveUpper(Gt, ldG, rho, t);
    lt.fill(0, 0, M);
    const permG = this.qrG.perm;
    for (let i = 0; i < rho; i++) lt[r + permG[i]] = t[i];
    applyQ(B, M, R, this.qrB.beta, r, lt);
    const lambda = cv.lambda;
    for (let i = 0; i < m; i++) lambda[i] = lt[i] / rowScale[i];
    // N and X = R11^-1 (Q1'A) N.
    for (let c = 0; c < k; c++) {
      const o = c * p;
      N.fill(0, o, o + p);
      N[o + rho + c] = 1;
      applyQ(Gt, p, ldG, this.qrG.beta, rho, N, o);
      const ox = c * r;
      X.fill(0, ox, ox + r);
      for (let l = 0; l < p; l++) {
        const nl = N[o + l];
        if (nl === 0) continue;
        const ol = l * R;
        for (let b = 0; b < r; b++) X[ox + b] += A[ol + b] * nl;
      }
      solveUpper(B, R, r, X, ox);
    }
    // Rows of E, steps and scales of the variables in a product.
    const basicOf = this.basicWork;
    basicOf.fill(-1, 0, this.q);
    const permB = this.qrB.perm;
    for (let b = 0; b < r; b++) basicOf[permB[b]] = b;
    const { E, alpha, scale, ld, curved } = cv;
    for (let sl = 0; sl < curved.length; sl++) {
      const v = curved[sl];
      const o = sl * ld;
      const pos = position[v];
      if (isMeasured[v]) {
        for (let c = 0; c < k; c++) E[o + c] = N[c * p + pos];
        alpha[sl] = z[pos];
        scale[sl] = sigma[v];
      } else {
        const b = basicOf[pos];
        scale[sl] = typical[v];
        if (b < 0) {
          E.fill(0, o, o + k);
          alpha[sl] = 0;
        } else {
          for (let c = 0; c < k; c++) E[o + c] = -X[c * r + b];
          alpha[sl] = dvB[b];
        }
      }
    }
    const H = cv.H;
    H.fill(0, 0, k * k);
    for (let c = 0; c < k; c++) H[c * k + c] = 1;
    return cv.solve(k);
  }

  /**
   * Releases held bounds; returns how many (0 when every held bound is needed: the buffers then
   * hold the system with the bounds in force again).
   * At a converged point: the bound whose release alone moves its variable furthest back
   * inside (a negative multiplier in the language of active-set methods). Held bounds can pin
   * each other through a balance (three zero flows around a mixer: releasing any one alone
   * leaves it pinned by the other two), so when no single release moves inward, all are
   * released together for one trial step and those whose variables move inward are freed.
   * For an inconsistent system (forConsistency): the same, counting only trial systems that
   * are consistent, the single release whose variable moves furthest inside (or least outside).
   */
  private releaseBounds(forConsistency = false): number {
    this.trialStep = true;
    try {
      return this.releaseTrials(forConsistency);
    } finally {
      this.trialStep = false;
    }
  }

  /**
   * Whether the steps made now are trials of releaseBounds: they take no second-order correction
   * (they only tell which way a released variable would move, and whether the system is
   * consistent; the iteration then steps with the correction).
   */
  private trialStep = false;

  private releaseTrials(forConsistency: boolean): number {
    const { n, active, options } = this;
    this.saveStep();
    let best = -1;
    let bestMove = forConsistency ? -Infinity : options.stepTolerance;
    let held = 0;
    for (let j = 0; j < n; j++) {
      const side = active[j];
      if (side === 0) continue;
      held++;
      active[j] = 0;
      const trial = this.linearStep();
      active[j] = side;
      if (forConsistency && !this.consistent(trial)) continue;
      const inward = this.inward(j, side);
      if (inward > bestMove) {
        bestMove = inward;
        best = j;
      }
    }
    if (best >= 0) {
      active[best] = 0;
      return 1;
    }
    if (held >= 2) {
      // Release all; hold again the one the trial step moves furthest outward, and repeat until
      // every released variable moves inward (each round holds one again, so it ends).
      const sides = Int8Array.from(active);
      active.fill(0);
      let released = held;
      while (released > 0) {
        const trial = this.linearStep();
        if (forConsistency && !this.consistent(trial)) {
          released = 0;
          break;
        }
        let worst = -1;
        let worstMove = options.stepTolerance;
        for (let j = 0; j < n; j++) {
          if (sides[j] === 0 || active[j] !== 0) continue;
          const move = this.inward(j, sides[j]);
          if (move <= worstMove) {
            worstMove = move;
            worst = j;
          }
        }
        if (worst < 0) break;
        active[worst] = sides[worst];
        released--;
      }
      if (released > 0) return released;
      active.set(sides);
    }
    this.restoreStep();
    return 0;
  }

  /** How far the last step moves variable j back inside from the bound on `side` (scaled). */
  private inward(j: number, side: number): number {
    const scale = this.isMeasured[j] === 1 ? this.sigma[j] : this.typical[j];
    return (side < 0 ? this.dx[j] : -this.dx[j]) / scale;
  }

  /** Copies of what linearStep leaves behind, so that trial steps can be undone without
   *  factorising again. */
  private saved?: { buffers: Float64Array[]; perms: Int32Array[]; copies: Float64Array[]; permCopies: Int32Array[]; structured: boolean };

  private saveStep(): void {
    if (!this.saved) {
      const buffers = [this.rowScale, this.cs, this.B, this.A, this.Gt, this.g, this.z, this.dx, this.qrB.beta, this.qrG.beta];
      const perms = [this.qrB.perm, this.qrG.perm];
      this.saved = { buffers, perms, copies: buffers.map((b) => new Float64Array(b.length)), permCopies: perms.map((b) => new Int32Array(b.length)), structured: false };
    }
    const sv = this.saved;
    sv.structured = this.lastStructured;
    sv.buffers.forEach((b, i) => sv.copies[i].set(b));
    sv.perms.forEach((b, i) => sv.permCopies[i].set(b));
  }

  private restoreStep(): void {
    const sv = this.saved!;
    this.lastStructured = sv.structured;
    sv.buffers.forEach((b, i) => b.set(sv.copies[i]));
    sv.perms.forEach((b, i) => b.set(sv.permCopies[i]));
  }

  private anyActive(): boolean {
    for (let j = 0; j < this.n; j++) if (this.active[j] !== 0) return true;
    return false;
  }

  /** The linearised balances (with the bounds held) can be met: G z = g has a solution. */
  private consistent(info: StepInfo): boolean {
    return info.inconsistency <= INCONSISTENCY_TOL * Math.max(1, info.gScale);
  }

  // ---------------------------------------------------------------- measures

  private objective(x: Float64Array): number {
    let s = 0;
    for (let k = 0; k < this.p; k++) {
      const j = this.meas[k];
      const d = (x[j] - this.y[j]) / this.sigma[j];
      s += d * d;
    }
    return s;
  }

  /** Largest |c_i| and largest |c_i| / (sum_j |J_ij| max(|x_j|, typical_j)), with J at hand. */
  private residualNorms(): { abs: number; scaled: number; worst: number } {
    const { n, m, c, J, x, typical } = this;
    const pattern = this.pattern;
    let abs = 0;
    let scaled = 0;
    let worst = -1;
    for (let i = 0; i < m; i++) {
      let size = 0;
      // Only the pattern's entries can be non-zero (the same sum: the others add exact zeros).
      if (pattern) for (let t = pattern.start[i]; t < pattern.start[i + 1]; t++) size += Math.abs(J[i * n + pattern.index[t]]) * Math.max(Math.abs(x[pattern.index[t]]), typical[pattern.index[t]]);
      else for (let j = 0; j < n; j++) size += Math.abs(J[i * n + j]) * Math.max(Math.abs(x[j]), typical[j]);
      const a = Math.abs(c[i]);
      const s = size > 0 ? a / size : a;
      abs = Math.max(abs, a);
      if (s > scaled || worst < 0) {
        scaled = Math.max(scaled, s);
        worst = i;
      }
    }
    return { abs, scaled, worst };
  }

  // ---------------------------------------------------------------- results

  private invalid(issues: string[]): ReconcileResult {
    const x = new Float64Array(this.n);
    this.problem.variables.forEach((v, j) => (x[j] = v.start));
    return {
      status: 'invalid',
      message: `invalid: ${issues.length} problem${issues.length === 1 ? '' : 's'} with the reconciliation problem: ${issues[0]}`,
      issues,
      x,
      estimates: [],
      covariance: { indices: [], matrix: new Float64Array(0) },
      redundancy: 0,
      objective: NaN,
      iterations: 0,
      evaluations: this.evaluations,
      jacobians: this.jacobians,
      residual: NaN,
      scaledResidual: NaN,
      history: [],
      notes: [],
    };
  }

  private notConverged(iterations: number, history: ReconcileHistoryEntry[], why: string): ReconcileResult {
    const norms = this.residualNorms();
    const where = norms.worst >= 0 && Number.isFinite(norms.abs) ? `; largest balance residual ${norms.abs.toPrecision(3)} in "${this.constraintNames[norms.worst]}"` : '';
    return {
      status: 'not-converged',
      message: `not converged: ${why}${where}. The last iterate is not a solution; check the balances and the readings, or raise maxIterations`,
      issues: [],
      x: Float64Array.from(this.x),
      estimates: [],
      covariance: { indices: [], matrix: new Float64Array(0) },
      redundancy: 0,
      objective: this.objective(this.x),
      iterations,
      evaluations: this.evaluations,
      jacobians: this.jacobians,
      residual: norms.abs,
      scaledResidual: norms.scaled,
      history,
      notes: [],
    };
  }

  /** Classification, covariance and tests from the factorisations of the last linearisation. */
  private summarise(info: StepInfo, iterations: number, history: ReconcileHistoryEntry[]): ReconcileResult {
    const { n, p, q, meas, unmeas, sigma, typical, A, B, Gt, QG, T, active, options } = this;
    const ldG = n;
    const R = this.maxRows;
    const r = info.rankB;
    const rho = info.rankG;
    const zeroTol = options.zeroTolerance;
    const x = Float64Array.from(this.x);

    // Q_G explicitly (p x rho), observability, and how the observable unmeasured variables follow
    // the measured ones (L below), from whichever factorisation made the last step.
    let observable: Uint8Array;
    let followRow: (j: number, L: Float64Array, offset: number) => void;
    let structured: StructuredSummary | undefined;
    if (this.lastStructured) {
      structured = this.structure!.summary(this.structuredState, zeroTol, QG, ldG);
      observable = structured.observable;
      followRow = () => undefined;
    } else {
      for (let l = 0; l < rho; l++) {
        const col = this.vec;
        col.fill(0, 0, p);
        col[l] = 1;
        applyQ(Gt, p, ldG, this.qrG.beta, rho, col);
        for (let k = 0; k < p; k++) QG[l * ldG + k] = col[k];
      }
      // K = R11^-1 (Q1'A): how the basic unmeasured variables follow the measured ones.
      const permB = this.qrB.perm;
      for (let l = 0; l < p; l++) solveUpper(B, R, r, A, l * R);
      // Observability: basic columns with a zero row of R11^-1 R12 (on the balances alone, so that a
      // bound held on an unmeasured variable does not make it look determined by the data).
      observable = new Uint8Array(q);
      let anyUnmeasuredBound = false;
      for (let k = 0; k < q; k++) if (active[unmeas[k]] !== 0) anyUnmeasuredBound = true;
      const basicPos = new Int32Array(q).fill(-1);
      for (let k = 0; k < r; k++) basicPos[permB[k]] = k;
      if (q > 0) {
        if (anyUnmeasuredBound) {
          // Factorise B of the balances alone in T's space (A is not needed again).
          this.factorBalancesOnly();
        }
        const Bf = anyUnmeasuredBound ? T : B;
        const rf = anyUnmeasuredBound ? this.rankBalancesOnly : r;
        const permF = anyUnmeasuredBound ? this.permBalancesOnly : permB;
        // Row k of R11^-1 R12 for each basic k: solve column by column into vec.
        const free = q - rf;
        const maxRow = new Float64Array(rf);
        const col = this.vec;
        for (let f = 0; f < free; f++) {
          for (let k = 0; k < rf; k++) col[k] = Bf[(rf + f) * R + k];
          solveUpper(Bf, R, rf, col);
          for (let k = 0; k < rf; k++) maxRow[k] = Math.max(maxRow[k], Math.abs(col[k]));
        }
        for (let k = 0; k < rf; k++) if (maxRow[k] <= zeroTol) observable[permF[k]] = 1;
        // An observable variable must also be basic in the system with the bounds (it always is;
        // the guard keeps a numerical tie from giving a number without a covariance row).
        for (let k = 0; k < q; k++) if (observable[k] && basicPos[k] < 0) observable[k] = 0;
      }
      followRow = (j, L, offset) => {
        const b = basicPos[this.position[j]];
        for (let l = 0; l < p; l++) L[offset + l] = -A[l * R + b];
      };
    }
    const leverage = this.leverageWork;
    for (let k = 0; k < p; k++) {
      let s = 0;
      for (let l = 0; l < rho; l++) s += QG[l * ldG + k] * QG[l * ldG + k];
      leverage[k] = Math.min(1, s);
    }
    const redundant = new Uint8Array(p);
    for (let k = 0; k < p; k++) redundant[k] = Math.sqrt(leverage[k]) > zeroTol ? 1 : 0;

    // Covariance over measured + observable unmeasured, scaled: L C L' with C = I - Q_G Q_G',
    // L = [I; -K], then unscaled by sigma and typical magnitudes.
    const indices: number[] = [];
    for (let k = 0; k < p; k++) indices.push(meas[k]);
    for (let k = 0; k < q; k++) if (observable[k]) indices.push(unmeas[k]);
    const N = indices.length;
    const scale = this.scaleWork;
    for (let k = 0; k < p; k++) scale[k] = sigma[meas[k]];
    for (let a = p; a < N; a++) scale[a] = typical[indices[a]];
    let covariance: ReconcileResult['covariance'];
    let variance: (a: number) => number;
    if (structured) {
      // The factor W = L Q_C1 (N x r), scaled; the matrix W W' is formed only if read.
      const { Q1, r, follow } = structured;
      const W = new Float64Array(N * r);
      for (let k = 0; k < p; k++) for (let i = 0; i < r; i++) W[k * r + i] = Q1[i * p + k] * scale[k];
      for (let a = p; a < N; a++) {
        const o = indices[a] * r;
        for (let i = 0; i < r; i++) W[a * r + i] = follow[o + i] * scale[a];
      }
      covariance = factoredCovariance(indices, W, r);
      variance = (a) => {
        let s = 0;
        for (let i = 0; i < r; i++) s += W[a * r + i] * W[a * r + i];
        return s;
      };
    } else {
      const L = new Float64Array(N * p);
      for (let k = 0; k < p; k++) L[k * p + k] = 1;
      for (let a = p; a < N; a++) followRow(indices[a], L, a * p);
      const cov = projectedCovariance(L, N, p, QG, ldG, rho, scale);
      covariance = { indices, matrix: cov };
      variance = (a) => cov[a * N + a];
    }
    // Covariance position of each variable (indices holds each variable once).
    const covIndex = this.covPosition;
    for (let a = 0; a < N; a++) covIndex[indices[a]] = a;

    // Tests.
    let redundantCount = 0;
    for (let k = 0; k < p; k++) if (redundant[k]) redundantCount++;
    const confidence = options.confidence;
    const objective = this.objective(x);
    const globalTest: GlobalTest =
      rho === 0
        ? { status: 'not-redundant', statistic: objective, dof: 0, critical: NaN, pValue: NaN, confidence }
        : (() => {
            const critical = this.cached(`chi2 ${rho}`, () => chiSquareCritical(rho, confidence));
            return {
              status: objective > critical ? 'failed' : 'passed',
              statistic: objective,
              dof: rho,
              critical,
              pValue: chiSquarePValue(objective, rho),
              confidence,
            };
          })();
    let measurementTest: MeasurementTestInfo | undefined;
    if (redundantCount > 0) {
      const level = sidakLevel(confidence, redundantCount);
      measurementTest = { count: redundantCount, confidence, level, critical: this.cached(`normal ${redundantCount}`, () => normalCritical(level)) };
    }

    // Estimates.
    const notes: string[] = [];
    const estimates: VariableEstimate[] = [];
    for (let j = 0; j < n; j++) {
      const name = this.names[j];
      const atBound = active[j] < 0 ? 'lower' : active[j] > 0 ? 'upper' : undefined;
      if (this.isMeasured[j]) {
        const k = this.position[j];
        const isRedundant = redundant[k] === 1;
        if (!isRedundant && !atBound) x[j] = this.y[j];
        const a = covIndex[j];
        const adjustment = x[j] - this.y[j];
        const adjustmentSigma = sigma[j] * Math.sqrt(leverage[k]);
        const e: VariableEstimate = {
          index: j,
          name,
          role: 'measured',
          classification: isRedundant ? 'redundant' : 'non-redundant',
          reading: this.y[j],
          sigma: sigma[j],
          value: x[j],
          uncertainty: Math.sqrt(Math.max(0, variance(a))),
          adjustment,
          adjustmentSigma: isRedundant ? adjustmentSigma : 0,
        };
        if (isRedundant && measurementTest) {
          const statistic = Math.abs(adjustment) / adjustmentSigma;
          e.test = { statistic, critical: measurementTest.critical, failed: statistic > measurementTest.critical };
        }
        if (!isRedundant) {
          e.note = 'non-redundant: no balance checks this reading; it passes through unadjusted and takes no part in the tests';
          notes.push(`"${name}": ${e.note}`);
        }
        if (atBound) {
          e.atBound = atBound;
          notes.push(`"${name}": reconciled value held at its ${atBound} bound ${x[j]}; the tests take the bound as exact`);
        }
        estimates.push(e);
      } else {
        const k = this.position[j];
        if (observable[k]) {
          const a = covIndex[j];
          const e: VariableEstimate = {
            index: j,
            name,
            role: 'unmeasured',
            classification: 'observable',
            value: x[j],
            uncertainty: Math.sqrt(Math.max(0, variance(a))),
          };
          if (atBound) {
            e.atBound = atBound;
            notes.push(`"${name}": estimate held at its ${atBound} bound ${x[j]}; the tests take the bound as exact`);
          }
          estimates.push(e);
        } else {
          x[j] = NaN;
          const note = 'unobservable: the readings and balances do not determine it; no value is given';
          notes.push(`"${name}": ${note}`);
          estimates.push({ index: j, name, role: 'unmeasured', classification: 'unobservable', value: null, uncertainty: null, note });
        }
      }
    }
    // The residual at this x, as the last iteration measured it (c, J and x have not changed since).
    const norms = this.lastNorms ?? this.residualNorms();
    const status = rho === 0 ? 'not-redundant' : 'reconciled';
    const pct = (this.confidenceText ??= `${+(confidence * 100).toPrecision(4)} %`);
    const message =
      status === 'not-redundant'
        ? 'not redundant: no reading is checked by another (redundancy 0); the readings pass through unadjusted and no gross-error test is possible'
        : `reconciled: redundancy ${rho}; global test ${globalTest.status} at ${pct} (gamma ${objective.toPrecision(4)}, critical ${globalTest.critical.toPrecision(4)}, ${pValueText(globalTest.pValue, 3)})`;
    return {
      status,
      message,
      issues: [],
      x,
      estimates,
      covariance,
      redundancy: rho,
      globalTest,
      measurementTest,
      objective,
      iterations,
      evaluations: this.evaluations,
      jacobians: this.jacobians,
      residual: norms.abs,
      scaledResidual: norms.scaled,
      history,
      notes,
    };
  }

  /** Critical values by degrees of freedom or number of tests (the confidence is fixed per
   *  prepared problem): a chi-square quantile costs as much as a whole linearised step. */
  private readonly criticalValues = new Map<string, number>();

  private cached(key: string, compute: () => number): number {
    let v = this.criticalValues.get(key);
    if (v === undefined) {
      v = compute();
      this.criticalValues.set(key, v);
    }
    return v;
  }

  private rankBalancesOnly = 0;
  private permBalancesOnly: Int32Array = new Int32Array(0);

  /** Pivoted QR of the scaled unmeasured columns of the balances alone (no bound rows), into T. */
  private factorBalancesOnly(): void {
    const { n, m, q, J, unmeas, typical, T, rowScale } = this;
    const R = this.maxRows;
    for (let i = 0; i < m; i++) {
      for (let k = 0; k < q; k++) T[k * R + i] = (J[i * n + unmeas[k]] * typical[unmeas[k]]) / rowScale[i];
    }
    const w = newQrWork(n);
    this.rankBalancesOnly = q > 0 ? qrPivoted(T, m, q, R, this.options.rankTolerance, w) : 0;
    this.permBalancesOnly = w.perm;
  }
}

/**
 * Scaled covariance L (I - Q Q') L' of N linear functions (rows of L, N x p) of p unit-variance
 * readings, Q the p x rho orthonormal basis (column-major, leading dimension ldQ), unscaled: cov_ab = s_a s_b (...).
 * Computed as L L' - (L Q)(L Q)'.
 */
function projectedCovariance(L: Float64Array, N: number, p: number, Q: Float64Array, ldQ: number, rho: number, scale: Float64Array): Float64Array {
  const LQ = new Float64Array(N * rho);
  for (let a = 0; a < N; a++) {
    for (let l = 0; l < rho; l++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += L[a * p + k] * Q[l * ldQ + k];
      LQ[a * rho + l] = s;
    }
  }
  const cov = new Float64Array(N * N);
  for (let a = 0; a < N; a++) {
    for (let b = a; b < N; b++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += L[a * p + k] * L[b * p + k];
      for (let l = 0; l < rho; l++) s -= LQ[a * rho + l] * LQ[b * rho + l];
      s *= scale[a] * scale[b];
      cov[a * N + b] = s;
      cov[b * N + a] = s;
    }
  }
  return cov;
}

/**
 * A covariance held as its factor W (N x r, row-major): matrix = W W', formed on first read; the
 * factor itself is there for callers that can use it (derived.ts).
 */
function factoredCovariance(indices: number[], W: Float64Array, r: number): ReconcileResult['covariance'] {
  const N = indices.length;
  let matrix: Float64Array | undefined;
  const out = { indices, factor: { W, rank: r } } as ReconcileResult['covariance'];
  Object.defineProperty(out, 'matrix', {
    enumerable: true,
    get: () => {
      if (!matrix) {
        matrix = new Float64Array(N * N);
        for (let a = 0; a < N; a++) {
          for (let b = a; b < N; b++) {
            let s = 0;
            for (let i = 0; i < r; i++) s += W[a * r + i] * W[b * r + i];
            matrix[a * N + b] = s;
            matrix[b * N + a] = s;
          }
        }
      }
      return matrix;
    },
  });
  return out;
}

/** Problems with the problem's shape and constant data (one message per problem). */
function checkShape(problem: ReconciliationProblem, options: Required<ReconcileOptions>): string[] {
  const issues: string[] = [];
  const vars = problem.variables;
  const cons = problem.constraints;
  if (!Number.isInteger(cons.count) || cons.count < 0) issues.push(`constraints: count ${cons.count} is not a whole number >= 0`);
  if (cons.names.length !== cons.count) issues.push(`constraints: ${cons.names.length} names for ${cons.count} constraints; give one name per constraint`);
  const seen = new Set<string>();
  vars.forEach((v) => {
    if (seen.has(v.name)) issues.push(`variable "${v.name}" appears twice; give each variable its own name`);
    seen.add(v.name);
    if (v.lower !== undefined && v.upper !== undefined && !(v.lower <= v.upper)) {
      issues.push(`variable "${v.name}": lower bound ${v.lower} is above upper bound ${v.upper}`);
    }
    if (v.typical !== undefined && !(Number.isFinite(v.typical) && v.typical > 0)) {
      issues.push(`variable "${v.name}": typical magnitude ${v.typical} is not a positive number`);
    }
    if (v.measured && !Number.isFinite(v.measured.value)) {
      issues.push(`variable "${v.name}": reading ${v.measured.value} is not a finite number; leave out measured for a meter with no reading`);
    }
  });
  const o = options;
  if (!(Number.isInteger(o.maxIterations) && o.maxIterations >= 1)) issues.push(`options: maxIterations ${o.maxIterations} is not a whole number >= 1`);
  for (const key of ['stepTolerance', 'constraintTolerance', 'rankTolerance', 'zeroTolerance'] as const) {
    if (!(o[key] > 0 && o[key] < 1)) issues.push(`options: ${key} ${o[key]} is not between 0 and 1`);
  }
  if (!(o.confidence > 0 && o.confidence < 1)) issues.push(`options: confidence ${o.confidence} is not between 0 and 1 (e.g. 0.95)`);
  return issues;
}
