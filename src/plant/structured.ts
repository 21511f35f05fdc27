/**
 * Structured steps of the reconciliation engine: the linearised step of reconcile.ts and the
 * statistics at the solution, computed on smaller matrices where the problem's structure allows.
 * The answer is the same to rounding; only the order of the arithmetic differs.
 *
 * The step (reconcile.ts) is  min |zeta|^2  subject to the linearised balances
 *     J_m diag(sigma) (zeta - z) + J_u diag(t) v = -c,
 * zeta the measured values in sigmas from their readings, v the unmeasured steps in their typical
 * magnitudes t. Three kinds of rows are told apart by the constraints' pattern
 * (PlantConstraints.pattern), once per problem:
 *   L  linear rows with no variable that can be measured (the unit balances of a flowsheet:
 *      mixers, reactors' element balances, condensers; a splitter's fraction sum). Their Jacobian
 *      is the same at every x, so their pivoted QR is made once per problem: L P = Q [R11 R12],
 *      full row rank, and every step expresses their basic unmeasured variables through the rest,
 *      v_B = p_L - K_L v_N with K_L = R11^-1 R12 (constant) and p_L = R11^-1 (Q' (-c_L))[0:r].
 *   I  the row of a measured variable, when every variable that can be measured appears in one row
 *      only and alone among the measurable ones (an instrument's own equation: m = sum of the
 *      stream's flows, w (sum of the basis) = flow). Such a row gives zeta_j directly:
 *          zeta_j = d_j - C_j v,   d_j = z_j - c_i / a_j,   C_j = (J_iu t_u) / a_j,   a_j = J_ij sigma_j.
 *   S  every other row (a splitter's bilinear rows, the equation of an instrument whose reading is
 *      left out): factorised per step, after L's substitution, by pivoted QR, giving
 *      v_SB = p_S - K_S v_SN.
 * What is left is  min |d~ - C~ v_SN|^2  over the remaining unmeasured columns (C~ = C after the
 * substitutions, p x k). Its pivoted QR C~ P = Q_C [R11 R12; 0 0] (rank r) gives the reconciled
 * zeta = Q_C2 Q_C2' d~ (the part of d~ no unmeasured change can explain), v_SN = R11^-1 (Q_C' d~)[0:r]
 * with the free columns held, and then v_SB and v_B by the substitutions. This is the step of the
 * whole factorisation: the set of zeta the linearised balances allow is {d~ - C~ v} either way,
 * so the minimum-norm zeta, the redundancy p - r, the projector Q_C2 Q_C2' (the whole method's
 * Q_G Q_G'), and the unmeasured values that are determined are all the same; only the values of
 * unobservable variables (which are never reported) may differ with the pivots.
 * Statistics: leverages are the squared row norms of Q_C2; an unmeasured variable is observable
 * when it is zero in every null vector of the whole system (each free column of C~ carried back
 * through K_S and K_L); d v / d zeta = -R11^-1 Q_C1' for the basic columns of C~, carried back the
 * same way, is the L matrix of the covariance (reconcile.ts); since I - Q_G Q_G' = Q_C1 Q_C1', the
 * covariance is W W' with W = L Q_C1, and on the basic columns L Q_C1 = -R11^-1 (the inverse of a
 * small triangle), so W is carried back directly.
 * A step falls back to the whole factorisation when a bound is held (its row would hold a
 * measured variable a second time) or when an instrument's row has a zero coefficient on its own
 * variable at this x.
 * Cost on the ammonia demo (49 variables, 41 balances, 15 readings): QR of 25 x 18 and 15 x 8 per
 * step, against 41 x 34 plus Q' applied to 15 columns for the whole one.
 */
import { applyQ, applyQt, newQrWork, qrPivoted, solveUpper, solveUpperTransposed, type QrWork } from './dense.js';
import type { CurvatureStep } from './curvature.js';
import type { ReconciliationProblem } from './types.js';

/** What a step reads from the engine (its per-solve buffers; the engine owns them). */
export interface StructuredState {
  p: number;
  q: number;
  J: Float64Array;
  c: Float64Array;
  x: Float64Array;
  y: Float64Array;
  sigma: Float64Array;
  typical: Float64Array;
  meas: Int32Array;
  unmeas: Int32Array;
  isMeasured: Uint8Array;
  position: Int32Array;
  /** The step, written here. */
  dx: Float64Array;
}

export interface StructuredStepInfo {
  rankB: number;
  rankG: number;
  step: number;
  inconsistency: number;
  gScale: number;
}

/** The statistics of the last step (summarise in reconcile.ts). */
export interface StructuredSummary {
  /** Observable, by unmeasured position. */
  observable: Uint8Array;
  /** Q_C1 (p x r, column i at i * p): I - Q_G Q_G' = Q_C1 Q_C1'. Q1 and follow are the steps' work space, read before the next summary. */
  Q1: Float64Array;
  r: number;
  /**
   * (d v_u / d zeta) Q_C1 (length r) of each unmeasured variable u, at u * r: its row of the
   * covariance factor (the covariance of the scaled estimates is W W', W = L Q_C1).
   */
  follow: Float64Array;
}

export class StructuredSteps {
  private readonly n: number;
  private readonly m: number;
  private readonly rowStart: Int32Array;
  private readonly rowIndex: Int32Array;
  /** Row -> its measurable variable (-1: none). */
  private readonly owner: Int32Array;
  private readonly isL: Uint8Array;
  // L stage (made once).
  private readonly mL: number;
  private readonly rL: number;
  private readonly nLN: number;
  private readonly Lrows: Int32Array;
  private readonly Lscale: Float64Array;
  private readonly QL: Float64Array;
  private readonly betaL: Float64Array;
  private readonly lbVar: Int32Array;
  private readonly lnVar: Int32Array;
  private readonly lbOf: Int32Array;
  private readonly KL: Float64Array;
  // Per step.
  private readonly rhsL: Float64Array;
  private readonly pL: Float64Array;
  private readonly F: Int32Array;
  private readonly colF: Int32Array;
  private readonly vAll: Float64Array;
  private readonly S: Float64Array;
  private readonly rhsS: Float64Array;
  private readonly qrS: QrWork;
  private readonly KS: Float64Array;
  private readonly pS: Float64Array;
  private readonly C: Float64Array;
  private readonly d: Float64Array;
  private readonly Ct: Float64Array;
  private readonly qrC: QrWork;
  private readonly w: Float64Array;
  private readonly zeta: Float64Array;
  private readonly vFN: Float64Array;
  private readonly col: Float64Array;
  /** Work space of summary (what it returns in Q1 and follow lives here until the next summary). */
  private readonly Q1work: Float64Array;
  private readonly followWork: Float64Array;
  private readonly sizeWork: Float64Array;
  private readonly nvWork: Float64Array;
  // Second-order steps (curvature.ts): the row of each reading's equation and its coefficient
  // a_j, the rows of S and their scales, C~ before its factorisation, positions in the pivots.
  private readonly rowI: Int32Array;
  private readonly aI: Float64Array;
  private readonly rowS: Int32Array;
  private readonly scaleS: Float64Array;
  private readonly CtCopy: Float64Array;
  private readonly posS: Int32Array;
  private readonly posC: Int32Array;
  private readonly mu: Float64Array;
  private readonly eWork: Float64Array;
  private readonly unitWork: Int32Array;
  private readonly kCol: Int32Array;
  private readonly lnF: Int32Array;
  private readonly kVal: Float64Array;
  // Shape of the last step.
  private f = 0;
  private rS = 0;
  private kN = 0;
  private rC = 0;
  private p = 0;

  /** The structure of a problem, or undefined when it has none to use (no pattern or no analytic Jacobian). */
  static build(problem: ReconciliationProblem, rankTolerance: number): StructuredSteps | undefined {
    const cons = problem.constraints;
    if (!cons.pattern || !cons.jacobian) return undefined;
    const n = problem.variables.length;
    const m = cons.count;
    if (!(n > 0 && m > 0)) return undefined;
    const pat = cons.pattern();
    if (pat.start.length !== m + 1) return undefined;
    const measurable = problem.variables.map((v) => v.measured !== undefined);
    const rowsOf = new Int32Array(n);
    const owner = new Int32Array(m).fill(-1);
    for (let i = 0; i < m; i++) {
      for (let t = pat.start[i]; t < pat.start[i + 1]; t++) {
        const v = pat.index[t];
        if (v < 0 || v >= n) return undefined;
        if (!measurable[v]) continue;
        rowsOf[v]++;
        if (owner[i] >= 0) return undefined; // two measurable variables in one row
        owner[i] = v;
      }
    }
    for (let v = 0; v < n; v++) if (measurable[v] && rowsOf[v] !== 1) return undefined;
    return new StructuredSteps(problem, pat.start, pat.index, pat.linear, owner, rankTolerance);
  }

  private constructor(problem: ReconciliationProblem, rowStart: Int32Array, rowIndex: Int32Array, linear: Uint8Array, owner: Int32Array, rankTolerance: number) {
    const vars = problem.variables;
    const n = vars.length;
    const m = problem.constraints.count;
    this.n = n;
    this.m = m;
    this.rowStart = rowStart;
    this.rowIndex = rowIndex;
    this.owner = owner;
    // L: linear rows without a measurable variable, over variables with a stated typical
    // magnitude (the scaling must not change from one solve to the next).
    const J0 = new Float64Array(m * n);
    const x0 = Float64Array.from(vars, (v) => v.start);
    problem.constraints.jacobian!(x0, J0);
    const isL = new Uint8Array(m);
    const Lrows: number[] = [];
    const Lscale: number[] = [];
    for (let i = 0; i < m; i++) {
      if (!linear[i] || owner[i] >= 0) continue;
      let s = 0;
      let typed = true;
      for (let t = rowStart[i]; t < rowStart[i + 1]; t++) {
        const v = rowIndex[t];
        if (vars[v].typical === undefined) typed = false;
        else s = Math.max(s, Math.abs(J0[i * n + v] * vars[v].typical!));
      }
      if (!typed || !(s > 0) || !Number.isFinite(s)) continue;
      isL[i] = 1;
      Lrows.push(i);
      Lscale.push(s);
    }
    const colSet = new Set<number>();
    for (const i of Lrows) for (let t = rowStart[i]; t < rowStart[i + 1]; t++) colSet.add(rowIndex[t]);
    const Lcols = [...colSet].sort((a, b) => a - b);
    let mL = Lrows.length;
    const nLc = Lcols.length;
    const QL = new Float64Array(Math.max(1, mL * nLc));
    Lcols.forEach((v, k) => {
      Lrows.forEach((i, r) => (QL[k * mL + r] = (J0[i * n + v] * vars[v].typical!) / Lscale[r]));
    });
    const qrL = newQrWork(nLc);
    let rL = mL > 0 && nLc > 0 ? qrPivoted(QL, mL, nLc, mL, rankTolerance, qrL) : 0;
    if (rL < mL) {
      // Dependent linear rows: left to the per-step stage with the others.
      for (const i of Lrows) isL[i] = 0;
      mL = 0;
      rL = 0;
    }
    this.isL = isL;
    this.mL = mL;
    this.rL = rL;
    this.Lrows = Int32Array.from(mL > 0 ? Lrows : []);
    this.Lscale = Float64Array.from(mL > 0 ? Lscale : []);
    this.QL = QL;
    this.betaL = qrL.beta;
    const nLN = mL > 0 ? nLc - rL : 0;
    this.nLN = nLN;
    this.lbVar = Int32Array.from({ length: rL }, (_, b) => Lcols[qrL.perm[b]]);
    this.lnVar = Int32Array.from({ length: nLN }, (_, c) => Lcols[qrL.perm[rL + c]]);
    this.lbOf = new Int32Array(n).fill(-1);
    for (let b = 0; b < rL; b++) this.lbOf[this.lbVar[b]] = b;
    // K_L = R11^-1 R12, row-major r_L x n_LN.
    this.KL = new Float64Array(Math.max(1, rL * nLN));
    const col = new Float64Array(Math.max(1, rL));
    for (let c = 0; c < nLN; c++) {
      for (let b = 0; b < rL; b++) col[b] = QL[(rL + c) * mL + b];
      solveUpper(QL, mL, rL, col);
      for (let b = 0; b < rL; b++) this.KL[b * nLN + c] = col[b];
    }
    this.rhsL = new Float64Array(Math.max(1, mL));
    this.pL = new Float64Array(Math.max(1, rL));
    this.F = new Int32Array(n);
    this.colF = new Int32Array(n);
    this.vAll = new Float64Array(n);
    this.S = new Float64Array(m * n);
    this.rhsS = new Float64Array(m);
    this.qrS = newQrWork(n);
    this.KS = new Float64Array(n * n);
    this.pS = new Float64Array(n);
    this.C = new Float64Array(n * n);
    this.d = new Float64Array(n);
    this.Ct = new Float64Array(n * n);
    this.qrC = newQrWork(n);
    this.w = new Float64Array(n);
    this.zeta = new Float64Array(n);
    this.vFN = new Float64Array(n);
    this.col = new Float64Array(n);
    this.Q1work = new Float64Array(Math.max(1, n * n));
    this.followWork = new Float64Array(Math.max(1, n * n));
    this.sizeWork = new Float64Array(n);
    this.nvWork = new Float64Array(n);
    this.rowI = new Int32Array(n);
    this.aI = new Float64Array(n);
    this.rowS = new Int32Array(m);
    this.scaleS = new Float64Array(m);
    this.CtCopy = new Float64Array(n * n);
    this.posS = new Int32Array(n);
    this.posC = new Int32Array(n);
    this.mu = new Float64Array(Math.max(m, n));
    this.eWork = new Float64Array(n * n);
    this.unitWork = new Int32Array(n);
    this.kCol = new Int32Array(n);
    this.lnF = new Int32Array(n);
    this.kVal = new Float64Array(n);
  }

  /** Rows eliminated once per problem (the linear balances), for the record. */
  get linearRows(): number {
    return this.mL;
  }

  /**
   * One linearised step into st.dx, or undefined when this x does not allow it (an instrument's
   * row with a zero coefficient on its own variable): the caller then factorises the whole system.
   * The caller makes sure that no bound is held and that p >= 1.
   */
  step(st: StructuredState, rankTolerance: number, curvature?: CurvatureStep): StructuredStepInfo | undefined {
    const { n, m, mL, rL, nLN, Lrows, Lscale, QL, KL, lbOf, lnVar, lbVar, owner, rowStart, rowIndex, F, colF, vAll, S, rhsS, C, d, Ct } = this;
    const { p, q, J, c, x, y, sigma, typical, meas, unmeas, isMeasured, position, dx } = st;
    // L: the particular solution of the linear rows.
    const rhsL = this.rhsL;
    const pL = this.pL;
    for (let r = 0; r < mL; r++) rhsL[r] = -c[Lrows[r]] / Lscale[r];
    applyQt(QL, mL, mL, this.betaL, rL, rhsL);
    for (let b = 0; b < rL; b++) pL[b] = rhsL[b];
    solveUpper(QL, mL, rL, pL);
    // The unmeasured columns left after L.
    let f = 0;
    for (let k = 0; k < q; k++) {
      const u = unmeas[k];
      if (lbOf[u] < 0) {
        colF[u] = f;
        F[f++] = u;
      } else colF[u] = -1;
    }
    for (let k = 0; k < p; k++) colF[meas[k]] = -1;
    // Rows I (into C, column-major, leading dimension n) and S (into S, leading dimension m).
    const lnF = this.lnF;
    for (let cc = 0; cc < nLN; cc++) lnF[cc] = colF[lnVar[cc]];
    C.fill(0, 0, f * n);
    S.fill(0, 0, f * m);
    let mS = 0;
    for (let i = 0; i < m; i++) {
      if (this.isL[i]) continue;
      const j = owner[i];
      const inI = j >= 0 && isMeasured[j] === 1;
      const target = inI ? C : S;
      const ld = inI ? n : m;
      const r = inI ? position[j] : mS++;
      let rhs = -c[i];
      let a = 0;
      const row = i * n;
      for (let t = rowStart[i]; t < rowStart[i + 1]; t++) {
        const v = rowIndex[t];
        const Jv = J[row + v];
        if (inI && v === j) {
          a = Jv * sigma[j];
          continue;
        }
        if (Jv === 0) continue;
        const e = Jv * typical[v];
        const b = lbOf[v];
        if (b >= 0) {
          rhs -= e * pL[b];
          const kb = b * nLN;
          for (let cc = 0; cc < nLN; cc++) {
            const kv = KL[kb + cc];
            if (kv !== 0) target[lnF[cc] * ld + r] -= e * kv;
          }
        } else target[colF[v] * ld + r] += e;
      }
      if (inI) {
        if (!(a !== 0 && Number.isFinite(a))) return undefined;
        for (let col = 0; col < f; col++) C[col * n + r] /= a;
        d[r] = (x[j] - y[j]) / sigma[j] + rhs / a;
        this.rowI[r] = i;
        this.aI[r] = a;
      } else {
        let s = 0;
        for (let col = 0; col < f; col++) s = Math.max(s, Math.abs(S[col * m + r]));
        if (s === 0) s = 1;
        for (let col = 0; col < f; col++) S[col * m + r] /= s;
        rhsS[r] = rhs / s;
        this.rowS[r] = i;
        this.scaleS[r] = s;
      }
    }
    // S: pivoted QR, particular solution and K_S = R11^-1 R12 (column c at c * n).
    const tol = rankTolerance;
    const permS = this.qrS.perm;
    const rS = mS > 0 && f > 0 ? qrPivoted(S, mS, f, m, tol, this.qrS) : 0;
    if (!(mS > 0 && f > 0)) for (let k = 0; k < f; k++) permS[k] = k;
    applyQt(S, mS, m, this.qrS.beta, rS, rhsS);
    let inconsistency = 0;
    for (let r = rS; r < mS; r++) inconsistency = Math.max(inconsistency, Math.abs(rhsS[r]));
    let gScale = inconsistency;
    const pS = this.pS;
    for (let k = 0; k < rS; k++) pS[k] = rhsS[k];
    solveUpper(S, m, rS, pS);
    const kN = f - rS;
    const KS = this.KS;
    for (let cc = 0; cc < kN; cc++) {
      const o = cc * n;
      for (let k = 0; k < rS; k++) KS[o + k] = S[(rS + cc) * m + k];
      solveUpper(S, m, rS, KS, o);
    }
    // C~ = C[:, SN] - C[:, SB] K_S and d~ = d - C[:, SB] p_S.
    // Entry by entry, the non-zero terms of K_S's column in order (the same sums as column by column).
    const kCol = this.kCol;
    const kVal = this.kVal;
    const copy = curvature ? this.CtCopy : undefined;
    for (let cc = 0; cc < kN; cc++) {
      const o = cc * n;
      const src = permS[rS + cc] * n;
      let nk = 0;
      for (let b = 0; b < rS; b++) {
        const ks = KS[o + b];
        if (ks === 0) continue;
        kCol[nk] = permS[b] * n;
        kVal[nk++] = ks;
      }
      for (let k = 0; k < p; k++) {
        let v = C[src + k];
        for (let t = 0; t < nk; t++) v -= C[kCol[t] + k] * kVal[t];
        Ct[o + k] = v;
        if (copy) copy[o + k] = v;
      }
    }
    for (let b = 0; b < rS; b++) {
      const ps = pS[b];
      if (ps === 0) continue;
      const cb = permS[b] * n;
      for (let k = 0; k < p; k++) d[k] -= C[cb + k] * ps;
    }
    // The core: pivoted QR of C~; zeta = Q_C2 Q_C2' d~.
    const rC = p > 0 && kN > 0 ? qrPivoted(Ct, p, kN, n, tol, this.qrC) : 0;
    const permC = this.qrC.perm;
    if (!(p > 0 && kN > 0)) for (let k = 0; k < kN; k++) permC[k] = k;
    const w = this.w;
    for (let k = 0; k < p; k++) w[k] = d[k];
    applyQt(Ct, p, n, this.qrC.beta, rC, w);
    const zeta = this.zeta;
    for (let k = 0; k < p; k++) {
      zeta[k] = k < rC ? 0 : w[k];
      if (k >= rC) gScale = Math.max(gScale, Math.abs(w[k]));
    }
    applyQ(Ct, p, n, this.qrC.beta, rC, zeta);
    solveUpper(Ct, n, rC, w);
    // Back: the columns left free are held; the basic ones of S and L follow.
    const vFN = this.vFN;
    vFN.fill(0, 0, kN);
    for (let k = 0; k < rC; k++) vFN[permC[k]] = w[k];
    this.f = f;
    this.rS = rS;
    this.kN = kN;
    this.rC = rC;
    this.p = p;
    let step = this.back(st);
    if (curvature && rC > 0 && curvature.applies(step) && this.secondOrder(st, curvature, mS)) {
      // zeta = Q_C [w1 - R11 (u_GN + du) ; w2] = zeta_GN - C~_B du, and the unmeasured from u_GN + du.
      const du = curvature.u;
      for (let k = 0; k < rC; k++) {
        let s = 0;
        for (let l = k; l < rC; l++) s += Ct[l * n + k] * du[l];
        zeta[k] = -s;
        vFN[permC[k]] += du[k];
      }
      for (let k = rC; k < p; k++) zeta[k] = w[k];
      applyQ(Ct, p, n, this.qrC.beta, rC, zeta);
      step = this.back(st);
    }
    return { rankB: rL + rS + rC, rankG: p - rC, step, inconsistency, gScale };
  }

  /** vAll and st.dx from vFN (the basic columns of C~; the free ones zero) and zeta; returns the largest scaled step. */
  private back(st: StructuredState): number {
    const { n, rL, nLN, KL, lnVar, lbVar, F, vAll, KS, vFN, zeta } = this;
    const { rS, kN, p } = this;
    const { q, x, y, sigma, typical, meas, unmeas, dx } = st;
    const { pS, pL } = this;
    const permS = this.qrS.perm;
    for (let cc = 0; cc < kN; cc++) vAll[F[permS[rS + cc]]] = vFN[cc];
    for (let b = 0; b < rS; b++) {
      let s = pS[b];
      for (let cc = 0; cc < kN; cc++) s -= KS[cc * n + b] * vFN[cc];
      vAll[F[permS[b]]] = s;
    }
    for (let b = 0; b < rL; b++) {
      let s = pL[b];
      const kb = b * nLN;
      for (let cc = 0; cc < nLN; cc++) s -= KL[kb + cc] * vAll[lnVar[cc]];
      vAll[lbVar[b]] = s;
    }
    let step = 0;
    for (let k = 0; k < p; k++) {
      const j = meas[k];
      const dz = zeta[k] - (x[j] - y[j]) / sigma[j];
      step = Math.max(step, Math.abs(dz));
      dx[j] = dz * sigma[j];
    }
    for (let k = 0; k < q; k++) {
      const u = unmeas[k];
      dx[u] = vAll[u] * typical[u];
      step = Math.max(step, Math.abs(vAll[u]));
    }
    return step;
  }

  /**
   * The second-order correction of the last Gauss-Newton step (curvature.ts) into cv.u, in the
   * coordinates of the basic columns of C~; false when there is none to take.
   * Multipliers: an instrument's row from its reading's stationarity, zeta_j + lambda_i a_j = 0;
   * the rows of S from that of the free unmeasured columns, S' mu = C' zeta (min-norm mu by the
   * QR of S), lambda_i = mu_r / s_r. Null space: u moves the basic columns of C~; the basic ones
   * of S and L follow through K_S and K_L, the readings through -C~. H0 = R11' R11.
   */
  private secondOrder(st: StructuredState, cv: CurvatureStep, mS: number): boolean {
    const { n, m, nLN, KL, lnVar, lbOf, colF, C, Ct, CtCopy, KS, zeta, vAll, posS, posC, mu, eWork } = this;
    const { f, rS, kN, rC, p } = this;
    const { x, y, sigma, typical, isMeasured, position } = st;
    const permS = this.qrS.perm;
    const permC = this.qrC.perm;
    const lambda = cv.lambda;
    lambda.fill(0);
    for (let k = 0; k < p; k++) lambda[this.rowI[k]] = -zeta[k] / this.aI[k];
    if (mS > 0 && rS > 0) {
      for (let b = 0; b < rS; b++) {
        const o = permS[b] * n;
        let s = 0;
        for (let k = 0; k < p; k++) s += C[o + k] * zeta[k];
        mu[b] = s;
      }
      solveUpperTransposed(this.S, m, rS, mu);
      for (let r = rS; r < mS; r++) mu[r] = 0;
      applyQ(this.S, mS, m, this.qrS.beta, rS, mu);
      for (let r = 0; r < mS; r++) lambda[this.rowS[r]] = mu[r] / this.scaleS[r];
    }
    for (let b = 0; b < f; b++) posS[permS[b]] = b;
    for (let k = 0; k < kN; k++) posC[permC[k]] = k;
    const { E, alpha, scale, ld, curved } = cv;
    // Rows of E of the unmeasured columns of S's stage (column c at c * rC): a basic column of C~
    // moves with its own u, a free one is held, a basic one of S follows through -K_S.
    // unitOf: the basic column of C~ a column of S's stage is (its row of E is e_k), -2 a free
    // one (zero), -1 a basic one of S (a row of -K_S).
    const EF = eWork;
    const unitOf = this.unitWork;
    for (let c = 0; c < f; c++) {
      const b = posS[c];
      const o = c * rC;
      unitOf[c] = -1;
      if (b >= rS) {
        EF.fill(0, o, o + rC);
        const k = posC[b - rS];
        if (k < rC) EF[o + k] = 1;
        unitOf[c] = k < rC ? k : -2;
      } else {
        for (let k = 0; k < rC; k++) EF[o + k] = -KS[permC[k] * n + b];
      }
    }
    for (let sl = 0; sl < curved.length; sl++) {
      const v = curved[sl];
      const o = sl * ld;
      if (isMeasured[v]) {
        const r = position[v];
        for (let k = 0; k < rC; k++) E[o + k] = -CtCopy[permC[k] * n + r];
        alpha[sl] = zeta[r] - (x[v] - y[v]) / sigma[v];
        scale[sl] = sigma[v];
        continue;
      }
      alpha[sl] = vAll[v];
      scale[sl] = typical[v];
      const b = lbOf[v];
      if (b < 0) {
        const of = colF[v] * rC;
        for (let k = 0; k < rC; k++) E[o + k] = EF[of + k];
        continue;
      }
      E.fill(0, o, o + rC);
      for (let cc = 0; cc < nLN; cc++) {
        const kv = KL[b * nLN + cc];
        if (kv === 0) continue;
        const c = colF[lnVar[cc]];
        const unit = unitOf[c];
        if (unit >= 0) {
          E[o + unit] -= kv;
          continue;
        }
        if (unit === -2) continue;
        const of = c * rC;
        for (let k = 0; k < rC; k++) E[o + k] -= kv * EF[of + k];
      }
    }
    // H0 = R11' R11 (row-major, leading dimension rC).
    const H = cv.H;
    for (let a = 0; a < rC; a++) {
      for (let b = 0; b <= a; b++) {
        let s = 0;
        for (let i = 0; i <= b; i++) s += Ct[a * n + i] * Ct[b * n + i];
        H[a * rC + b] = s;
        H[b * rC + a] = s;
      }
    }
    return cv.solve(rC);
  }

  /**
   * Q_G (into QG, p x (p - r) at leading dimension ldQ), observability and the covariance factor
   * from the last step (see the file header).
   */
  summary(st: StructuredState, zeroTolerance: number, QG: Float64Array, ldQ: number): StructuredSummary {
    const { n, rL, nLN, KL, lnVar, lbVar, F, Ct, KS } = this;
    const { f, rS, kN, rC, p } = this;
    const { q, unmeas } = st;
    const permS = this.qrS.perm;
    const permC = this.qrC.perm;
    const beta = this.qrC.beta;
    const rho = p - rC;
    const col = this.col;
    for (let l = 0; l < rho; l++) {
      col.fill(0, 0, p);
      col[rC + l] = 1;
      applyQ(Ct, p, n, beta, rC, col);
      for (let k = 0; k < p; k++) QG[l * ldQ + k] = col[k];
    }
    const Q1 = this.Q1work;
    for (let i = 0; i < rC; i++) {
      col.fill(0, 0, p);
      col[i] = 1;
      applyQ(Ct, p, n, beta, rC, col);
      for (let k = 0; k < p; k++) Q1[i * p + k] = col[k];
    }
    // (d v / d zeta) Q_C1: on the basic columns of C~, -R11^-1 Q_C1' Q_C1 = -R11^-1 (row i of
    // the inverse for basic column i); then back through K_S and K_L.
    const r = rC;
    const follow = this.followWork;
    follow.fill(0, 0, n * r);
    for (let l = 0; l < r; l++) {
      // Column l of R11^-1: solve R11 y = e_l.
      col.fill(0, 0, r);
      col[l] = 1;
      solveUpper(Ct, n, r, col);
      for (let i = 0; i <= l; i++) follow[F[permS[rS + permC[i]]] * r + l] = -col[i];
    }
    for (let b = 0; b < rS; b++) {
      const o = F[permS[b]] * r;
      for (let cc = 0; cc < kN; cc++) {
        const ks = KS[cc * n + b];
        if (ks === 0) continue;
        const src = F[permS[rS + cc]] * r;
        for (let l = 0; l < r; l++) follow[o + l] -= ks * follow[src + l];
      }
    }
    for (let b = 0; b < rL; b++) {
      const o = lbVar[b] * r;
      for (let cc = 0; cc < nLN; cc++) {
        const kv = KL[b * nLN + cc];
        if (kv === 0) continue;
        const src = lnVar[cc] * r;
        for (let l = 0; l < r; l++) follow[o + l] -= kv * follow[src + l];
      }
    }
    // Observability: every null vector of the whole system, one per free column of C~.
    const size = this.sizeWork;
    const nv = this.nvWork;
    size.fill(0);
    nv.fill(0);
    const nvFN = this.vFN;
    for (let fr = rC; fr < kN; fr++) {
      nvFN.fill(0, 0, kN);
      nvFN[permC[fr]] = 1;
      for (let k = 0; k < rC; k++) col[k] = Ct[fr * n + k];
      solveUpper(Ct, n, rC, col);
      for (let k = 0; k < rC; k++) nvFN[permC[k]] = -col[k];
      for (let cc = 0; cc < kN; cc++) nv[F[permS[rS + cc]]] = nvFN[cc];
      for (let b = 0; b < rS; b++) {
        let s = 0;
        for (let cc = 0; cc < kN; cc++) s -= KS[cc * n + b] * nvFN[cc];
        nv[F[permS[b]]] = s;
      }
      for (let b = 0; b < rL; b++) {
        let s = 0;
        for (let cc = 0; cc < nLN; cc++) s -= KL[b * nLN + cc] * nv[lnVar[cc]];
        nv[lbVar[b]] = s;
      }
      for (let k = 0; k < f; k++) size[F[k]] = Math.max(size[F[k]], Math.abs(nv[F[k]]));
      for (let b = 0; b < rL; b++) size[lbVar[b]] = Math.max(size[lbVar[b]], Math.abs(nv[lbVar[b]]));
    }
    const observable = new Uint8Array(q);
    for (let k = 0; k < q; k++) observable[k] = size[unmeas[k]] <= zeroTolerance ? 1 : 0;
    return { observable, Q1, r: rC, follow };
  }
}
