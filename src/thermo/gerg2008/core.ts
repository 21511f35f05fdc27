/**
 * The GERG-2008 reduced Helmholtz energy for one set of components, written from the equations
 * of Kunz and Wagner (J. Chem. Eng. Data 57 (2012) 3032-3091):
 *
 *   alpha(delta, tau, x) = alpha°(rho, T, x) + sum_i x_i alpha_r,i(delta, tau)
 *                          + sum_{i<j} x_i x_j F_ij alpha_r,ij(delta, tau)
 *   delta = rho / rho_r(x),  tau = T_r(x) / T
 *
 * Every pure-fluid and departure term has the shape A_k delta^d_k g_k(delta), where A_k = N_k tau^t_k
 * carries all the composition and temperature dependence: N_k sums the coefficient over the
 * components (or pairs) that share the term's exponents, weighted by x_i (or x_i x_j F_ij). The
 * terms are therefore laid out once, when the model is made, in flat Float64Arrays; a change of
 * composition recomputes N, a change of temperature recomputes A, and an evaluation at a density
 * is one pass over the terms with no allocation.
 *
 * Derivatives are analytic. With D = delta d/d(delta) and, for one term, q = d + u, u = D ln g,
 * v = D u, w = D v:
 *   D alpha = alpha q,  delta^2 alpha_dd = alpha (q^2 + v - q),
 *   delta^3 alpha_ddd = alpha (q^3 + 3 q v + w - 3 q^2 - 3 v + 2 q),
 * and every tau derivative multiplies by t (tau alpha_t = t alpha, tau^2 alpha_tt = t (t - 1) alpha).
 * For g = exp(-delta^c): u = -c delta^c, v = -c^2 delta^c, w = -c^3 delta^c. For the departure
 * terms g = exp(-eta (delta - eps)^2 - beta (delta - gamma)): with s = 2 eta eps - beta,
 * u = -2 eta delta^2 + s delta, v = -4 eta delta^2 + s delta, w = -8 eta delta^2 + s delta.
 */
import { DEPARTURE, GERG_DEPARTURE_PAIRS, GERG_REDUCING } from './data/binary.js';
import { GERG_PURE, type GergPureFluid } from './data/pure.js';

/** Molar gas constant of GERG-2008, J/(mol K) (Kunz and Wagner 2012; the CODATA value of its time). */
export const R_GERG = 8.314472;
/** Gas constant with which the ideal-gas parts were fitted, J/(mol K) (Kunz and Wagner 2012, R* in the ideal part). */
export const R_STAR = 8.31451;
/** Reference state of the ideal-gas parts: h° = 0 and s° = 0 for each pure ideal gas at T0 and p0. */
export const T0 = 298.15;
export const P0 = 101325;

/** Residual reduced Helmholtz energy and its derivatives at one state (all dimensionless). */
export interface ResidualDerivatives {
  a: number;
  /** delta d(alpha_r)/d(delta) */
  d1: number;
  /** delta^2 d2(alpha_r)/d(delta)2 */
  d2: number;
  /** delta^3 d3(alpha_r)/d(delta)3 */
  d3: number;
  /** tau d(alpha_r)/d(tau) */
  t1: number;
  /** tau^2 d2(alpha_r)/d(tau)2 */
  t2: number;
  /** delta tau d2(alpha_r)/d(delta)d(tau) */
  d1t1: number;
  /** delta^2 tau d3(alpha_r)/d(delta)2 d(tau) */
  d2t1: number;
}

/** Ideal-gas reduced Helmholtz energy and its temperature derivatives at constant density (dimensionless). */
export interface IdealDerivatives {
  a: number;
  /** tau d(alpha°)/d(tau) = -T d(alpha°)/dT */
  t1: number;
  /** tau^2 d2(alpha°)/d(tau)2 */
  t2: number;
}

const KIND_POLY = 0;
const KIND_PURE_EXP = 1;
const KIND_DEP_EXP = 2;

/** A group of terms whose coefficients combine with weights from the composition. */
interface Block {
  /** First term of the block in the flat arrays, and its term count. */
  start: number;
  count: number;
  /** Pure block: component indices and their coefficient rows (members x count). */
  members: Int32Array;
  coef: Float64Array;
  /** Departure block: pairs (2 indices each), their F_ij, and the one coefficient row. */
  pairs: Int32Array;
  F: Float64Array;
}

/**
 * The GERG-2008 Helmholtz energy prepared for components `fluids` (in the caller's order).
 * Not for use outside src/thermo/gerg2008: the public API is in index.ts.
 */
export class GergCore {
  readonly n: number;
  readonly fluids: readonly GergPureFluid[];
  /** Molar masses, kg/mol. */
  readonly M: Float64Array;
  readonly Tc: Float64Array;
  /** Critical densities, mol/m3. */
  readonly rhoc: Float64Array;

  // Reducing functions: for each unordered pair (i < j) beta^2 and 2 beta gamma times the pair's
  // critical volume or temperature combination.
  private readonly pairI: Int32Array;
  private readonly pairJ: Int32Array;
  private readonly bv2: Float64Array;
  private readonly kv: Float64Array;
  private readonly bt2: Float64Array;
  private readonly kt: Float64Array;

  // Flat term arrays.
  private readonly nTerms: number;
  private readonly kind: Uint8Array;
  private readonly d: Float64Array;
  private readonly t: Float64Array;
  private readonly c: Float64Array;
  private readonly eta: Float64Array;
  private readonly eps: Float64Array;
  private readonly beta: Float64Array;
  private readonly gam: Float64Array;
  private readonly blocks: Block[];
  /** Composition-weighted coefficients and the same times tau^t. */
  private readonly N: Float64Array;
  private readonly A: Float64Array;
  /** Indices of the terms with N != 0 (for the current composition), split by kind. */
  private readonly active: Int32Array;
  private nPoly = 0;
  private nPureExp = 0;
  private nDepExp = 0;
  private readonly maxC: number;
  private readonly expC: Float64Array;
  private readonly powC: Float64Array;
  /** delta^d for the integer exponents d of the terms. */
  private readonly maxD: number;
  private readonly powD: Float64Array;

  // Ideal part.
  private readonly idA1: Float64Array;
  private readonly idA2: Float64Array;
  private readonly idC0: Float64Array;
  private readonly idN: Float64Array; // n x 4
  private readonly idTh: Float64Array; // n x 4
  private readonly lnRho0: number;

  // Current composition and temperature.
  private readonly x: Float64Array;
  private compositionSet = false;
  private tempT = NaN;
  /** Reducing density (mol/m3) and temperature (K) of the current composition. */
  rhoR = NaN;
  TR = NaN;
  /** tau of the current temperature. */
  tau = NaN;

  constructor(fluids: readonly GergPureFluid[]) {
    const n = fluids.length;
    this.n = n;
    this.fluids = fluids;
    this.M = Float64Array.from(fluids, (f) => f.M * 1e-3);
    this.Tc = Float64Array.from(fluids, (f) => f.Tc);
    this.rhoc = Float64Array.from(fluids, (f) => f.rhoc * 1e3);
    this.x = new Float64Array(n);

    // Reducing-function constants for every pair.
    const index = new Map(fluids.map((f, k) => [f.id, k]));
    const nPairs = (n * (n - 1)) / 2;
    this.pairI = new Int32Array(nPairs);
    this.pairJ = new Int32Array(nPairs);
    this.bv2 = new Float64Array(nPairs);
    this.kv = new Float64Array(nPairs);
    this.bt2 = new Float64Array(nPairs);
    this.kt = new Float64Array(nPairs);
    const pairSlot = (i: number, j: number): number => {
      // slot of (min, max) in row-major upper-triangle order
      const a = Math.min(i, j);
      const b = Math.max(i, j);
      return a * n - (a * (a + 1)) / 2 + (b - a - 1);
    };
    const seen = new Uint8Array(nPairs);
    for (const [idA, idB, bv, gv, bt, gt] of GERG_REDUCING) {
      const ia = index.get(idA);
      const ib = index.get(idB);
      if (ia === undefined || ib === undefined) continue;
      const s = pairSlot(ia, ib);
      // The row is written for the order (idA, idB); the model's pair is (min, max).
      const forward = ia < ib;
      const i = forward ? ia : ib;
      const j = forward ? ib : ia;
      const betaV = forward ? bv : 1 / bv;
      const betaT = forward ? bt : 1 / bt;
      const vc = Math.pow(Math.pow(this.rhoc[i], -1 / 3) + Math.pow(this.rhoc[j], -1 / 3), 3) / 8;
      this.pairI[s] = i;
      this.pairJ[s] = j;
      this.bv2[s] = betaV * betaV;
      this.kv[s] = 2 * betaV * gv * vc;
      this.bt2[s] = betaT * betaT;
      this.kt[s] = 2 * betaT * gt * Math.sqrt(this.Tc[i] * this.Tc[j]);
      seen[s] = 1;
    }
    for (let s = 0; s < nPairs; s++) {
      if (!seen[s]) throw new Error('GERG-2008 data: a pair of components has no reducing parameters');
    }

    // Term blocks: one per distinct pure-fluid exponent set, one per departure function.
    const blocks: Block[] = [];
    const kinds: number[] = [];
    const ds: number[] = [];
    const ts: number[] = [];
    const cs: number[] = [];
    const etas: number[] = [];
    const epss: number[] = [];
    const betas: number[] = [];
    const gams: number[] = [];
    const bySet = new Map<object, number[]>();
    fluids.forEach((f, k) => {
      const list = bySet.get(f.exponents) ?? [];
      list.push(k);
      bySet.set(f.exponents, list);
    });
    for (const [set, members] of bySet) {
      const e = fluids[members[0]].exponents;
      void set;
      const start = kinds.length;
      const count = e.d.length;
      for (let k = 0; k < count; k++) {
        kinds.push(e.c[k] === 0 ? KIND_POLY : KIND_PURE_EXP);
        ds.push(e.d[k]);
        ts.push(e.t[k]);
        cs.push(e.c[k]);
        etas.push(0);
        epss.push(0);
        betas.push(0);
        gams.push(0);
      }
      const coef = new Float64Array(members.length * count);
      members.forEach((m, r) => {
        const nk = fluids[m].n;
        if (nk.length !== count) throw new Error(`GERG-2008 data: ${fluids[m].id} has ${nk.length} coefficients for ${count} exponents`);
        for (let k = 0; k < count; k++) coef[r * count + k] = nk[k];
      });
      blocks.push({ start, count, members: Int32Array.from(members), coef, pairs: new Int32Array(0), F: new Float64Array(0) });
    }
    const byFunction = new Map<string, { pairs: number[]; F: number[] }>();
    for (const [idA, idB, fn, F] of GERG_DEPARTURE_PAIRS) {
      const ia = index.get(idA);
      const ib = index.get(idB);
      if (ia === undefined || ib === undefined) continue;
      const entry = byFunction.get(fn) ?? { pairs: [], F: [] };
      entry.pairs.push(ia, ib);
      entry.F.push(F);
      byFunction.set(fn, entry);
    }
    for (const [fn, { pairs, F }] of byFunction) {
      const dep = DEPARTURE[fn];
      const start = kinds.length;
      const count = dep.n.length;
      for (let k = 0; k < count; k++) {
        kinds.push(k < dep.kPol ? KIND_POLY : KIND_DEP_EXP);
        ds.push(dep.d[k]);
        ts.push(dep.t[k]);
        cs.push(0);
        etas.push(dep.eta[k]);
        epss.push(dep.eps[k]);
        betas.push(dep.beta[k]);
        gams.push(dep.gamma[k]);
      }
      blocks.push({ start, count, members: new Int32Array(0), coef: Float64Array.from(dep.n), pairs: Int32Array.from(pairs), F: Float64Array.from(F) });
    }
    this.blocks = blocks;
    this.nTerms = kinds.length;
    this.kind = Uint8Array.from(kinds);
    this.d = Float64Array.from(ds);
    this.t = Float64Array.from(ts);
    this.c = Float64Array.from(cs);
    this.eta = Float64Array.from(etas);
    this.eps = Float64Array.from(epss);
    this.beta = Float64Array.from(betas);
    this.gam = Float64Array.from(gams);
    this.N = new Float64Array(this.nTerms);
    this.A = new Float64Array(this.nTerms);
    this.active = new Int32Array(this.nTerms);
    this.maxC = cs.reduce((m, v) => Math.max(m, v), 0);
    this.expC = new Float64Array(this.maxC + 1);
    this.powC = new Float64Array(this.maxC + 1);
    this.maxD = ds.reduce((m, v) => Math.max(m, v), this.maxC);
    if (!ds.every((v) => Number.isInteger(v) && v >= 0)) throw new Error('GERG-2008 data: density exponents must be whole numbers');
    this.powD = new Float64Array(this.maxD + 1);

    // Ideal part.
    this.idA1 = Float64Array.from(fluids, (f) => f.a1);
    this.idA2 = Float64Array.from(fluids, (f) => f.a2);
    this.idC0 = Float64Array.from(fluids, (f) => f.c0);
    this.idN = new Float64Array(4 * n);
    this.idTh = new Float64Array(4 * n);
    fluids.forEach((f, k) => {
      for (let m = 0; m < 4; m++) {
        this.idN[4 * k + m] = f.n0[m];
        this.idTh[4 * k + m] = f.theta[m];
      }
    });
    this.lnRho0 = Math.log(P0 / (R_GERG * T0));
  }

  /** Sets the composition (mole fractions, length n); cheap when it has not changed. */
  setComposition(x: ArrayLike<number>): void {
    const n = this.n;
    if (this.compositionSet) {
      let same = true;
      for (let i = 0; i < n; i++) {
        if (x[i] !== this.x[i]) {
          same = false;
          break;
        }
      }
      if (same) return;
    }
    for (let i = 0; i < n; i++) this.x[i] = x[i];
    const xs = this.x;
    // Reducing functions.
    let v = 0;
    let tr = 0;
    for (let i = 0; i < n; i++) {
      const xi2 = xs[i] * xs[i];
      v += xi2 / this.rhoc[i];
      tr += xi2 * this.Tc[i];
    }
    const nPairs = this.pairI.length;
    for (let s = 0; s < nPairs; s++) {
      const xi = xs[this.pairI[s]];
      const xj = xs[this.pairJ[s]];
      if (xi === 0 || xj === 0) continue;
      const xx = xi * xj * (xi + xj);
      v += (this.kv[s] * xx) / (this.bv2[s] * xi + xj);
      tr += (this.kt[s] * xx) / (this.bt2[s] * xi + xj);
    }
    this.rhoR = 1 / v;
    this.TR = tr;
    // Composition-weighted coefficients.
    this.N.fill(0);
    for (const b of this.blocks) {
      const { start, count } = b;
      if (b.members.length > 0) {
        for (let r = 0; r < b.members.length; r++) {
          const w = xs[b.members[r]];
          if (w === 0) continue;
          const row = r * count;
          for (let k = 0; k < count; k++) this.N[start + k] += w * b.coef[row + k];
        }
      } else {
        let w = 0;
        for (let p = 0; p < b.F.length; p++) w += xs[b.pairs[2 * p]] * xs[b.pairs[2 * p + 1]] * b.F[p];
        if (w === 0) continue;
        for (let k = 0; k < count; k++) this.N[start + k] += w * b.coef[k];
      }
    }
    // Active terms in kind order: polynomial, pure exponential, departure exponential.
    let m = 0;
    for (const kindWanted of [KIND_POLY, KIND_PURE_EXP, KIND_DEP_EXP]) {
      const before = m;
      for (let k = 0; k < this.nTerms; k++) if (this.kind[k] === kindWanted && this.N[k] !== 0) this.active[m++] = k;
      if (kindWanted === KIND_POLY) this.nPoly = m - before;
      else if (kindWanted === KIND_PURE_EXP) this.nPureExp = m - before;
      else this.nDepExp = m - before;
    }
    this.compositionSet = true;
    this.tempT = NaN;
  }

  /** Sets the temperature (after the composition); cheap when it has not changed. */
  setTemperature(T: number): void {
    if (T === this.tempT) return;
    const tau = this.TR / T;
    const lnTau = Math.log(tau);
    const total = this.nPoly + this.nPureExp + this.nDepExp;
    for (let m = 0; m < total; m++) {
      const k = this.active[m];
      const tk = this.t[k];
      this.A[k] = tk === 0 ? this.N[k] : this.N[k] * Math.exp(tk * lnTau);
    }
    this.tau = tau;
    this.tempT = T;
  }

  private prepareDelta(delta: number): void {
    const pd = this.powD;
    pd[0] = 1;
    for (let k = 1; k <= this.maxD; k++) pd[k] = pd[k - 1] * delta;
    for (let c = 1; c <= this.maxC; c++) {
      const p = pd[c];
      this.powC[c] = p;
      this.expC[c] = Math.exp(-p);
    }
  }

  /**
   * delta d(alpha_r)/d(delta) and delta^2 d2(alpha_r)/d(delta)2 at the current composition and
   * temperature: all that pressure and its density derivative need. Results in out[0], out[1].
   */
  pressureDerivatives(delta: number, out: Float64Array): void {
    this.prepareDelta(delta);
    const active = this.active;
    const A = this.A;
    const d = this.d;
    const pd = this.powD;
    let s1 = 0;
    let s2 = 0;
    let m = 0;
    const endPoly = this.nPoly;
    for (; m < endPoly; m++) {
      const k = active[m];
      const dk = d[k];
      const a = A[k] * pd[dk];
      s1 += a * dk;
      s2 += a * dk * (dk - 1);
    }
    const endPure = endPoly + this.nPureExp;
    for (; m < endPure; m++) {
      const k = active[m];
      const dk = d[k];
      const ck = this.c[k];
      const a = A[k] * pd[dk] * this.expC[ck];
      const u = -ck * this.powC[ck];
      const q = dk + u;
      s1 += a * q;
      s2 += a * (q * q + ck * u - q);
    }
    const endDep = endPure + this.nDepExp;
    for (; m < endDep; m++) {
      const k = active[m];
      const dk = d[k];
      const eta = this.eta[k];
      const e = delta - this.eps[k];
      const a = A[k] * pd[dk] * Math.exp(-eta * e * e - this.beta[k] * (delta - this.gam[k]));
      const sk = 2 * eta * this.eps[k] - this.beta[k];
      const ed2 = eta * delta * delta;
      const u = -2 * ed2 + sk * delta;
      const v = -4 * ed2 + sk * delta;
      const q = dk + u;
      s1 += a * q;
      s2 += a * (q * q + v - q);
    }
    out[0] = s1;
    out[1] = s2;
  }

  /** All residual derivatives at the current composition and temperature. */
  residual(delta: number, out: ResidualDerivatives): ResidualDerivatives {
    this.prepareDelta(delta);
    const active = this.active;
    const A = this.A;
    const pd = this.powD;
    let sa = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    let t1 = 0;
    let t2 = 0;
    let d1t1 = 0;
    let d2t1 = 0;
    const total = this.nPoly + this.nPureExp + this.nDepExp;
    const endPoly = this.nPoly;
    const endPure = endPoly + this.nPureExp;
    for (let m = 0; m < total; m++) {
      const k = active[m];
      const dk = this.d[k];
      const tk = this.t[k];
      let a: number;
      let u: number;
      let v: number;
      let w: number;
      if (m < endPoly) {
        a = A[k] * pd[dk];
        u = 0;
        v = 0;
        w = 0;
      } else if (m < endPure) {
        const ck = this.c[k];
        a = A[k] * pd[dk] * this.expC[ck];
        u = -ck * this.powC[ck];
        v = ck * u;
        w = ck * v;
      } else {
        const eta = this.eta[k];
        const e = delta - this.eps[k];
        a = A[k] * pd[dk] * Math.exp(-eta * e * e - this.beta[k] * (delta - this.gam[k]));
        const sk = 2 * eta * this.eps[k] - this.beta[k];
        const ed2 = eta * delta * delta;
        u = -2 * ed2 + sk * delta;
        v = -4 * ed2 + sk * delta;
        w = -8 * ed2 + sk * delta;
      }
      const q = dk + u;
      const dd = q * q + v - q;
      sa += a;
      s1 += a * q;
      s2 += a * dd;
      s3 += a * (q * q * q + 3 * q * v + w - 3 * q * q - 3 * v + 2 * q);
      t1 += a * tk;
      t2 += a * tk * (tk - 1);
      d1t1 += a * tk * q;
      d2t1 += a * tk * dd;
    }
    out.a = sa;
    out.d1 = s1;
    out.d2 = s2;
    out.d3 = s3;
    out.t1 = t1;
    out.t2 = t2;
    out.d1t1 = d1t1;
    out.d2t1 = d2t1;
    return out;
  }

  /**
   * Ideal-gas part at temperature T (K) and density rho (mol/m3) for the current composition:
   *   alpha° = sum_i x_i [ln(x_i rho/rho0) + r (a1 + a2/T - (c0 - 1) ln T + sum_k n_k ln sinh(theta_k/T)
   *            - sum_k n_k ln cosh(theta_k/T)) + (r - 1) T0/T],   r = R_star / R, rho0 = p0/(R T0).
   * This is the paper's alpha°_oi = ln(rho/rho_c,i) + r [n°1 + n°2 tau_i + n°3 ln tau_i + ...]
   * with n°1, n°2, ln rho_c,i and n°3 ln T_c,i gathered into a1 and a2 as the reference
   * implementation tabulates them; the last term keeps h° = 0 at T0 for r != 1.
   */
  ideal(T: number, rho: number, out: IdealDerivatives): IdealDerivatives {
    const r = R_STAR / R_GERG;
    const lnRho = Math.log(rho) - this.lnRho0;
    const lnT = Math.log(T);
    const shift = ((r - 1) * T0) / T;
    let a = 0;
    let t1 = 0;
    let t2 = 0;
    for (let i = 0; i < this.n; i++) {
      const xi = this.x[i];
      if (xi === 0) continue;
      let h0 = 0;
      let h1 = 0;
      let h2 = 0;
      for (let m = 0; m < 4; m++) {
        const th = this.idTh[4 * i + m];
        if (th === 0) continue;
        const nk = this.idN[4 * i + m];
        const z = th / T;
        const ep = Math.exp(z);
        const em = 1 / ep;
        const sh = 0.5 * (ep - em);
        const ch = 0.5 * (ep + em);
        if (m === 0 || m === 2) {
          h0 += nk * Math.log(sh);
          h1 += (nk * z * ch) / sh;
          h2 += nk * (z / sh) * (z / sh);
        } else {
          h0 -= nk * Math.log(ch);
          h1 -= (nk * z * sh) / ch;
          h2 += nk * (z / ch) * (z / ch);
        }
      }
      const c0m1 = this.idC0[i] - 1;
      a += xi * (Math.log(xi) + lnRho + r * (this.idA1[i] + this.idA2[i] / T - c0m1 * lnT + h0) + shift);
      t1 += xi * (r * (this.idA2[i] / T + c0m1 + h1) + shift);
      t2 -= xi * r * (c0m1 + h2);
    }
    out.a = a;
    out.t1 = t1;
    out.t2 = t2;
    return out;
  }

  /** Molar mass of the current or given composition, kg/mol. */
  molarMass(x: ArrayLike<number>): number {
    let m = 0;
    for (let i = 0; i < this.n; i++) m += x[i] * this.M[i];
    return m;
  }

  /** Mole-fraction average critical temperature and density (a start for dense iterations). */
  pseudoCritical(x: ArrayLike<number>): { Tc: number; rhoc: number } {
    let tc = 0;
    let v = 0;
    for (let i = 0; i < this.n; i++) {
      tc += x[i] * this.Tc[i];
      v += x[i] / this.rhoc[i];
    }
    return { Tc: tc, rhoc: 1 / v };
  }
}

/** The pure-fluid records for loopclose ids, or the ids GERG-2008 does not cover. */
export function lookupFluids(ids: readonly string[]): { fluids: GergPureFluid[]; missing: string[] } {
  const byId = new Map(GERG_PURE.map((f) => [f.id, f]));
  const fluids: GergPureFluid[] = [];
  const missing: string[] = [];
  for (const id of ids) {
    const f = byId.get(id);
    if (f) fluids.push(f);
    else missing.push(id);
  }
  return { fluids, missing };
}
