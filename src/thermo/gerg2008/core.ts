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
  /** Density exponents and exp(-delta^c) exponents as integers (array indices). */
  private readonly d: Int32Array;
  private readonly t: Float64Array;
  private readonly c: Int32Array;
  /**
   * tau^t = tau^tInt * tau^frac: the integer part from a table of integer powers, the fraction
   * from a table of the few distinct fractions (one exp each) instead of one exp per term.
   */
  private readonly tInt: Int32Array;
  private readonly tFracIndex: Int32Array;
  private readonly fracs: Float64Array;
  private readonly fracPow: Float64Array;
  private readonly minTInt: number;
  private readonly intPow: Float64Array;
  private readonly eta: Float64Array;
  private readonly eps: Float64Array;
  private readonly beta: Float64Array;
  private readonly gam: Float64Array;
  private readonly blocks: Block[];
  /** Composition-weighted coefficients of all terms. */
  private readonly N: Float64Array;
  /**
   * The active terms (N != 0) of the current composition, compact and in kind order: exponents,
   * exp group, eta and 2 eta eps - beta of departure terms, t and its split, N, and A = N tau^t.
   */
  private readonly qD: Int32Array;
  private readonly qC: Int32Array;
  private readonly qG: Int32Array;
  private readonly qEta: Float64Array;
  private readonly qS: Float64Array;
  private readonly qT: Float64Array;
  private readonly qTInt: Int32Array;
  private readonly qTFrac: Int32Array;
  private readonly qN: Float64Array;
  private readonly qA: Float64Array;
  private nPoly = 0;
  private nPureExp = 0;
  private nDepExp = 0;
  /**
   * Departure exponential terms with equal (eta, eps, beta, gamma) share one exp per density:
   * expGroup[k] indexes groups of (eta, eps, beta, gamma) whose value is kept in groupExp.
   */
  private readonly expGroup: Int32Array;
  private readonly groupEta: Float64Array;
  private readonly groupEps: Float64Array;
  private readonly groupBeta: Float64Array;
  private readonly groupGam: Float64Array;
  private readonly groupExp: Float64Array;
  private readonly groupActive: Uint8Array;
  private readonly maxC: number;
  private readonly expC: Float64Array;
  /** exp(-delta^c) is needed for these c (by the active terms). */
  private readonly cActive: Uint8Array;
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
  /** Temperature part of the ideal sums, kept for the last temperature and composition. */
  private idealT = NaN;
  private idealA = 0;
  private idealT1 = 0;
  private idealT2 = 0;

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
    for (const members of bySet.values()) {
      const e = fluids[members[0]].exponents;
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
    this.d = Int32Array.from(ds);
    this.t = Float64Array.from(ts);
    this.c = Int32Array.from(cs);
    const tInts = ts.map((v) => Math.floor(v));
    const fracList: number[] = [];
    const fracIndex = ts.map((v, k) => {
      const f = v - tInts[k];
      let j = fracList.findIndex((g) => Math.abs(g - f) < 1e-12);
      if (j < 0) {
        j = fracList.length;
        fracList.push(f);
      }
      return j;
    });
    this.tInt = Int32Array.from(tInts);
    this.tFracIndex = Int32Array.from(fracIndex);
    this.fracs = Float64Array.from(fracList);
    this.fracPow = new Float64Array(fracList.length);
    this.minTInt = Math.min(0, ...tInts);
    this.intPow = new Float64Array(Math.max(0, ...tInts) - this.minTInt + 1);
    this.eta = Float64Array.from(etas);
    this.eps = Float64Array.from(epss);
    this.beta = Float64Array.from(betas);
    this.gam = Float64Array.from(gams);
    const groups: number[][] = [];
    const expGroup = kinds.map((kd, k) => {
      if (kd !== KIND_DEP_EXP) return -1;
      const key = [etas[k], epss[k], betas[k], gams[k]];
      let j = groups.findIndex((g) => g.every((v, i) => v === key[i]));
      if (j < 0) {
        j = groups.length;
        groups.push(key);
      }
      return j;
    });
    this.expGroup = Int32Array.from(expGroup);
    this.groupEta = Float64Array.from(groups, (g) => g[0]);
    this.groupEps = Float64Array.from(groups, (g) => g[1]);
    this.groupBeta = Float64Array.from(groups, (g) => g[2]);
    this.groupGam = Float64Array.from(groups, (g) => g[3]);
    this.groupExp = new Float64Array(groups.length);
    this.groupActive = new Uint8Array(groups.length);
    this.N = new Float64Array(this.nTerms);
    const nt = this.nTerms;
    this.qD = new Int32Array(nt);
    this.qC = new Int32Array(nt);
    this.qG = new Int32Array(nt);
    this.qEta = new Float64Array(nt);
    this.qS = new Float64Array(nt);
    this.qT = new Float64Array(nt);
    this.qTInt = new Int32Array(nt);
    this.qTFrac = new Int32Array(nt);
    this.qN = new Float64Array(nt);
    this.qA = new Float64Array(nt);
    this.maxC = cs.reduce((m, v) => Math.max(m, v), 0);
    this.expC = new Float64Array(this.maxC + 1);
    this.powC = new Float64Array(this.maxC + 1);
    this.cActive = new Uint8Array(this.maxC + 1);
    this.maxD = ds.reduce((m, v) => Math.max(m, v), this.maxC);
    if (!ds.every((v) => Number.isInteger(v) && v >= 0) || !cs.every((v) => Number.isInteger(v) && v >= 0)) {
      throw new Error('GERG-2008 data: density exponents must be whole numbers');
    }
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
    // Active terms (N != 0), copied in kind order (polynomial, pure exponential, departure
    // exponential) into compact arrays that the evaluations walk without indirection.
    let m = 0;
    for (const kindWanted of [KIND_POLY, KIND_PURE_EXP, KIND_DEP_EXP]) {
      const before = m;
      for (let k = 0; k < this.nTerms; k++) {
        if (this.kind[k] !== kindWanted || this.N[k] === 0) continue;
        this.qD[m] = this.d[k];
        this.qC[m] = this.c[k];
        this.qG[m] = this.expGroup[k];
        this.qEta[m] = this.eta[k];
        this.qS[m] = 2 * this.eta[k] * this.eps[k] - this.beta[k];
        this.qT[m] = this.t[k];
        this.qTInt[m] = this.tInt[k];
        this.qTFrac[m] = this.tFracIndex[k];
        this.qN[m] = this.N[k];
        m++;
      }
      if (kindWanted === KIND_POLY) this.nPoly = m - before;
      else if (kindWanted === KIND_PURE_EXP) this.nPureExp = m - before;
      else this.nDepExp = m - before;
    }
    this.cActive.fill(0);
    this.groupActive.fill(0);
    for (let q = this.nPoly; q < m; q++) {
      if (q < this.nPoly + this.nPureExp) this.cActive[this.qC[q]] = 1;
      else this.groupActive[this.qG[q]] = 1;
    }
    this.compositionSet = true;
    this.tempT = NaN;
    this.idealT = NaN;
  }

  /** Sets the temperature (after the composition); cheap when it has not changed. */
  setTemperature(T: number): void {
    if (T === this.tempT) return;
    const tau = this.TR / T;
    const lnTau = Math.log(tau);
    for (let j = 0; j < this.fracs.length; j++) {
      const f = this.fracs[j];
      this.fracPow[j] = f === 0 ? 1 : Math.exp(f * lnTau);
    }
    // Integer powers tau^minTInt .. tau^maxTInt (minTInt <= 0).
    const ip = this.intPow;
    const z = -this.minTInt;
    ip[z] = 1;
    for (let k = z + 1; k < ip.length; k++) ip[k] = ip[k - 1] * tau;
    const inv = 1 / tau;
    for (let k = z - 1; k >= 0; k--) ip[k] = ip[k + 1] * inv;
    const total = this.nPoly + this.nPureExp + this.nDepExp;
    const qA = this.qA;
    for (let m = 0; m < total; m++) qA[m] = this.qN[m] * ip[this.qTInt[m] + z] * this.fracPow[this.qTFrac[m]];
    this.tau = tau;
    this.tempT = T;
  }

  private prepareDelta(delta: number): void {
    const pd = this.powD;
    pd[0] = 1;
    for (let k = 1; k <= this.maxD; k++) pd[k] = pd[k - 1] * delta;
    for (let c = 1; c <= this.maxC; c++) {
      if (this.cActive[c] === 0) continue;
      const p = pd[c];
      this.powC[c] = p;
      this.expC[c] = Math.exp(-p);
    }
    for (let j = 0; j < this.groupExp.length; j++) {
      if (this.groupActive[j] === 0) continue;
      const e = delta - this.groupEps[j];
      this.groupExp[j] = Math.exp(-this.groupEta[j] * e * e - this.groupBeta[j] * (delta - this.groupGam[j]));
    }
  }

  /**
   * delta d(alpha_r)/d(delta) and delta^2 d2(alpha_r)/d(delta)2 at the current composition and
   * temperature: all that pressure and its density derivative need. Results in out[0], out[1].
   */
  pressureDerivatives(delta: number, out: Float64Array): void {
    this.prepareDelta(delta);
    const qA = this.qA;
    const qD = this.qD;
    const qC = this.qC;
    const pd = this.powD;
    const expC = this.expC;
    const powC = this.powC;
    let s1 = 0;
    let s2 = 0;
    let m = 0;
    const endPoly = this.nPoly;
    for (; m < endPoly; m++) {
      const dk = qD[m];
      const a = qA[m] * pd[dk];
      s1 += a * dk;
      s2 += a * dk * (dk - 1);
    }
    const endPure = endPoly + this.nPureExp;
    for (; m < endPure; m++) {
      const dk = qD[m];
      const ck = qC[m];
      const a = qA[m] * pd[dk] * expC[ck];
      const u = -ck * powC[ck];
      const q = dk + u;
      s1 += a * q;
      s2 += a * (q * q + ck * u - q);
    }
    const endDep = endPure + this.nDepExp;
    const qG = this.qG;
    const qEta = this.qEta;
    const qS = this.qS;
    const groupExp = this.groupExp;
    const dd2 = delta * delta;
    for (; m < endDep; m++) {
      const dk = qD[m];
      const a = qA[m] * pd[dk] * groupExp[qG[m]];
      const ed2 = qEta[m] * dd2;
      const sd = qS[m] * delta;
      const u = -2 * ed2 + sd;
      const v = -4 * ed2 + sd;
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
    const qA = this.qA;
    const qD = this.qD;
    const qT = this.qT;
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
    const dd2 = delta * delta;
    for (let m = 0; m < total; m++) {
      const dk = qD[m];
      const tk = qT[m];
      let a: number;
      let u: number;
      let v: number;
      let w: number;
      if (m < endPoly) {
        a = qA[m] * pd[dk];
        u = 0;
        v = 0;
        w = 0;
      } else if (m < endPure) {
        const ck = this.qC[m];
        a = qA[m] * pd[dk] * this.expC[ck];
        u = -ck * this.powC[ck];
        v = ck * u;
        w = ck * v;
      } else {
        a = qA[m] * pd[dk] * this.groupExp[this.qG[m]];
        const ed2 = this.qEta[m] * dd2;
        const sd = this.qS[m] * delta;
        u = -2 * ed2 + sd;
        v = -4 * ed2 + sd;
        w = -8 * ed2 + sd;
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
    if (T !== this.idealT) this.idealTemperaturePart(T);
    out.a = this.idealA + Math.log(rho) - this.lnRho0;
    out.t1 = this.idealT1;
    out.t2 = this.idealT2;
    return out;
  }

  private idealTemperaturePart(T: number): void {
    const r = R_STAR / R_GERG;
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
      a += xi * (Math.log(xi) + r * (this.idA1[i] + this.idA2[i] / T - c0m1 * lnT + h0) + shift);
      t1 += xi * (r * (this.idA2[i] / T + c0m1 + h1) + shift);
      t2 -= xi * r * (c0m1 + h2);
    }
    this.idealA = a;
    this.idealT1 = t1;
    this.idealT2 = t2;
    this.idealT = T;
  }

  /** Molar mass of the current or given composition, kg/mol. */
  molarMass(x: ArrayLike<number>): number {
    let m = 0;
    for (let i = 0; i < this.n; i++) m += x[i] * this.M[i];
    return m;
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
