/**
 * The second-order part of a reconciliation step (reconcile.ts, structured.ts).
 *
 * Why. A Gauss-Newton step minimises |zeta|^2 under the balances linearised at x. Where the
 * balances are bilinear (a flow times a fraction: analyzers, splitters) the Hessian of the
 * Lagrangian is W + sum_i lambda_i grad^2 c_i, not W alone; leaving out the second term makes the
 * iteration converge linearly, at a rate of the order of the multipliers (the adjustments) times
 * the curvature: about 1e-2 per step on the ammonia demo. The step of sequential quadratic
 * programming with the exact Hessian of the Lagrangian (Nocedal and Wright, "Numerical
 * Optimization", 2nd ed., Springer 2006, Sec. 18.1: the Newton-KKT step) converges quadratically
 * near a solution that meets the second-order conditions.
 *
 * How. The factorisation a step makes anyway gives the Gauss-Newton step delta_GN (scaled: in
 * sigmas for measured variables, typical magnitudes for unmeasured ones), its multipliers lambda,
 * and the steps that meet the linearised balances as delta = delta_GN + E u, u in R^k the
 * coordinates of their null space on the observable variables, with
 * |zeta|^2 = |zeta_GN|^2 + u' H0 u (zeta_GN is orthogonal to those directions). The products
 * coef x_a x_b of row i add to the quadratic model  sum_t w_t delta_a delta_b,
 * w_t = lambda_i coef_t s_a s_b (s: the variable's scale), whose minimum over u solves
 *     (H0 + sum_t w_t (e_a e_b' + e_b e_a')) u = -sum_t w_t (alpha_a e_b + alpha_b e_a),
 * alpha = delta_GN and e_a the row of E of variable a (only the variables in a product need
 * theirs). The multipliers are those of the Gauss-Newton subproblem at the same x: they tend to
 * the solution's as x does, so the Hessian's error is of the order of x's and the convergence is
 * quadratic. Where the reduced matrix is not positive definite (far from a solution) the
 * Gauss-Newton step is kept. The statistics at the solution (covariances, tests) are those of the
 * linearised balances as before: the second-order term changes only the path to the solution.
 */
import { choleskySolve } from '../solve/linear.js';
import type { ConstraintProducts, ReconciliationProblem } from './types.js';

export class CurvatureStep {
  /** The variables that appear in a product, and each variable's place among them (-1: none). */
  readonly curved: Int32Array;
  readonly slot: Int32Array;
  /** Multiplier of each balance (the caller sets those of the rows with products). */
  readonly lambda: Float64Array;
  /** Row of E of each curved variable (slot s at s * ld), its Gauss-Newton step and its scale. */
  readonly E: Float64Array;
  readonly alpha: Float64Array;
  readonly scale: Float64Array;
  readonly ld: number;
  /** The reduced matrix (k x k, row-major, leading dimension k): the caller puts H0 here. */
  readonly H: Float64Array;
  /** The correction u, after solve. */
  readonly u: Float64Array;
  /** Gauss-Newton steps (scaled, largest entry) at or below this take no correction: the step tolerance. */
  below = 0;
  /**
   * Whether a Gauss-Newton step of this size (largest scaled entry) takes the correction: not at
   * or below the step tolerance, where the correction (of the order of the step times the
   * multipliers times the curvature, smaller than the step) cannot change the outcome and the
   * step ends the iteration.
   */
  applies(step: number): boolean {
    return step > this.below;
  }

  /**
   * The products grouped by a common variable (terms of group g at groupStart[g] ..
   * groupStart[g + 1]: coef x_a x_b[t] in row[t], a = groupVar[g]): an analyzer's row is its
   * fraction times each flow of its basis, a splitter's fraction multiplies every inlet flow, so
   * that each group adds one rank-2 term e_a g' + g e_a' to H instead of one per product.
   */
  private readonly groupVar: Int32Array;
  private readonly groupStart: Int32Array;
  private readonly row: Int32Array;
  private readonly sb: Int32Array;
  private readonly coef: Float64Array;
  private readonly g: Float64Array;

  /**
   * Undefined when the balances have no products: linear, without an analytic Jacobian, or with
   * a Jacobian that is not affine in x (not every row a sum of constants, linear terms and
   * products); such problems take Gauss-Newton steps.
   */
  static build(problem: ReconciliationProblem, maxK: number): CurvatureStep | undefined {
    const cons = problem.constraints;
    if (!cons.jacobian || cons.linear) return undefined;
    const pr = cons.products ? cons.products() : probeProducts(problem);
    if (!pr || pr.row.length === 0) return undefined;
    return new CurvatureStep(pr, problem.variables.length, cons.count, maxK);
  }

  private constructor(pr: ConstraintProducts, n: number, m: number, maxK: number) {
    this.slot = new Int32Array(n).fill(-1);
    const curved: number[] = [];
    const count = new Int32Array(n);
    for (const list of [pr.a, pr.b]) {
      for (const v of list) {
        count[v]++;
        if (this.slot[v] < 0) {
          this.slot[v] = curved.length;
          curved.push(v);
        }
      }
    }
    this.curved = Int32Array.from(curved);
    // Each product under the one of its two variables that is in more products (ties: the first).
    const groups = new Map<number, number[]>();
    for (let t = 0; t < pr.row.length; t++) {
      const key = count[pr.b[t]] > count[pr.a[t]] ? pr.b[t] : pr.a[t];
      const list = groups.get(key) ?? [];
      list.push(t);
      groups.set(key, list);
    }
    const order = [...groups.keys()];
    this.groupVar = Int32Array.from(order, (v) => this.slot[v]);
    this.groupStart = new Int32Array(order.length + 1);
    const T = pr.row.length;
    this.row = new Int32Array(T);
    this.sb = new Int32Array(T);
    this.coef = new Float64Array(T);
    let at = 0;
    order.forEach((key, gi) => {
      this.groupStart[gi] = at;
      for (const t of groups.get(key)!) {
        this.row[at] = pr.row[t];
        this.sb[at] = this.slot[pr.a[t] === key ? pr.b[t] : pr.a[t]];
        this.coef[at] = pr.coef[t];
        at++;
      }
    });
    this.groupStart[order.length] = at;
    const ld = Math.max(1, maxK);
    this.ld = ld;
    this.lambda = new Float64Array(m);
    this.E = new Float64Array(curved.length * ld);
    this.alpha = new Float64Array(curved.length);
    this.scale = new Float64Array(curved.length);
    this.H = new Float64Array(ld * ld);
    this.u = new Float64Array(ld);
    this.g = new Float64Array(ld);
  }

  /**
   * Adds the products' term to H (holding H0, k x k; the lower triangle is read) and solves for
   * u. Returns false (u left zero) when the reduced matrix is not positive definite or the result
   * is not finite.
   */
  solve(k: number): boolean {
    const { H, u, g, E, alpha, scale, lambda, row, sb, coef, ld, groupVar, groupStart } = this;
    u.fill(0, 0, k);
    if (k === 0) return false;
    for (let gi = 0; gi < groupVar.length; gi++) {
      // g = sum_t w_t e_b, w_t = lambda coef s_a s_b; rhs -= alpha_a g + (sum_t w_t alpha_b) e_a.
      const a = groupVar[gi];
      const sa = scale[a];
      g.fill(0, 0, k);
      let wab = 0;
      let any = false;
      for (let t = groupStart[gi]; t < groupStart[gi + 1]; t++) {
        const lam = lambda[row[t]];
        if (lam === 0) continue;
        const b = sb[t];
        const w = lam * coef[t] * sa * scale[b];
        wab += w * alpha[b];
        const eb = b * ld;
        for (let i = 0; i < k; i++) g[i] += w * E[eb + i];
        any = true;
      }
      if (!any) continue;
      const ea = a * ld;
      const al = alpha[a];
      for (let i = 0; i < k; i++) {
        const ai = E[ea + i];
        const gi2 = g[i];
        u[i] -= al * gi2 + wab * ai;
        const o = i * k;
        for (let j = 0; j <= i; j++) H[o + j] += ai * g[j] + gi2 * E[ea + j];
      }
    }
    // H = L L' in place (lower triangle), then L L' u = rhs
    if (!choleskySolve(H, k, u)) {
      u.fill(0, 0, k);
      return false;
    }
    for (let i = 0; i < k; i++) {
      if (!Number.isFinite(u[i])) {
        u.fill(0, 0, k);
        return false;
      }
    }
    return true;
  }
}

/** Largest n x n x m (variables squared times balances) for which products are looked for by differencing. */
const PROBE_LIMIT = 5e7;

/**
 * The products of balances that give only their Jacobian, found once per problem: the change of
 * the Jacobian along each variable, D_j = (J(x0 + h_j e_j) - J(x0)) / h_j, is exact (up to
 * rounding) when every row is at most bilinear; that this is so is checked at a third point,
 * J(x0 + sum_j theta_j h_j e_j) = J(x0) + sum_j theta_j h_j D_j, and that the second derivatives
 * are symmetric. Undefined when either check fails (the rows are not quadratic), or when the
 * problem is too large to difference this way (n^2 m above PROBE_LIMIT: n + 2 Jacobians and a
 * scan of each), which then takes Gauss-Newton steps.
 */
function probeProducts(problem: ReconciliationProblem): ConstraintProducts | undefined {
  const cons = problem.constraints;
  const n = problem.variables.length;
  const m = cons.count;
  if (!(n > 0 && m > 0) || n * n * m > PROBE_LIMIT) return undefined;
  const x0 = Float64Array.from(problem.variables, (v) => v.start);
  if (!x0.every(Number.isFinite)) return undefined;
  const J0 = new Float64Array(m * n);
  cons.jacobian!(x0, J0);
  const Jj = new Float64Array(m * n);
  const h = Float64Array.from(x0, (v) => Math.max(1, Math.abs(v)));
  // The non-zero entries of each D_j: row i, column l, value (d J_il / d x_j).
  const dRow: number[] = [];
  const dCol: number[] = [];
  const dVar: number[] = [];
  const dVal: number[] = [];
  const x = Float64Array.from(x0);
  for (let j = 0; j < n; j++) {
    x[j] = x0[j] + h[j];
    Jj.fill(0);
    cons.jacobian!(x, Jj);
    x[j] = x0[j];
    for (let k = 0; k < m * n; k++) {
      const d = (Jj[k] - J0[k]) / h[j];
      if (d === 0) continue;
      if (!Number.isFinite(d)) return undefined;
      dRow.push(Math.floor(k / n));
      dCol.push(k % n);
      dVar.push(j);
      dVal.push(d);
    }
  }
  // Affine: the Jacobian at a third point.
  const theta = (j: number) => 0.3 + 0.2 * (j % 4);
  for (let j = 0; j < n; j++) x[j] = x0[j] + theta(j) * h[j];
  const J1 = new Float64Array(m * n);
  cons.jacobian!(x, J1);
  const predicted = Float64Array.from(J0);
  for (let t = 0; t < dVal.length; t++) predicted[dRow[t] * n + dCol[t]] += theta(dVar[t]) * h[dVar[t]] * dVal[t];
  let size = 0;
  for (let k = 0; k < m * n; k++) size = Math.max(size, Math.abs(J0[k]), Math.abs(J1[k]));
  const tol = 1e-9 * Math.max(1, size);
  for (let k = 0; k < m * n; k++) if (!(Math.abs(predicted[k] - J1[k]) <= tol)) return undefined;
  // Products: d2 c_i / dx_a dx_b (symmetric: the entry of D_b at (i, a) and of D_a at (i, b));
  // coef x_a x_b with a < b, coef x_a^2 with half the second derivative. Entries below 1e-9 of
  // the row's largest second derivative are rounding.
  const second = new Map<string, number>();
  const big = new Float64Array(m);
  for (let t = 0; t < dVal.length; t++) {
    second.set(`${dRow[t]} ${dCol[t]} ${dVar[t]}`, dVal[t]);
    big[dRow[t]] = Math.max(big[dRow[t]], Math.abs(dVal[t]));
  }
  const keys = new Set<string>();
  const row: number[] = [];
  const a: number[] = [];
  const b: number[] = [];
  const coef: number[] = [];
  for (let t = 0; t < dVal.length; t++) {
    const i = dRow[t];
    const p = Math.min(dCol[t], dVar[t]);
    const q = Math.max(dCol[t], dVar[t]);
    const key = `${i} ${p} ${q}`;
    if (keys.has(key)) continue;
    keys.add(key);
    const small = 1e-9 * big[i];
    const u = second.get(`${i} ${p} ${q}`) ?? 0;
    const w = second.get(`${i} ${q} ${p}`) ?? 0;
    if (Math.abs(u - w) > small) return undefined;
    const v = (u + w) / 2;
    if (Math.abs(v) <= small) continue;
    row.push(i);
    a.push(p);
    b.push(q);
    coef.push(p === q ? v / 2 : v);
  }
  return { row: Int32Array.from(row), a: Int32Array.from(a), b: Int32Array.from(b), coef: Float64Array.from(coef) };
}
