/**
 * Equation-of-state factory and the generic two-parameter cubic (SRK, PR) for pure fluids and
 * mixtures.
 *
 * Cubic: P = RT/(V - b) - a / ((V + d1 b)(V + d2 b)); in Z = PV/RT with A = aP/(RT)^2,
 * B = bP/(RT): Z^3 + c2 Z^2 + c1 Z + c0 = 0 (coefficients in eos-params.ts).
 *
 * Mixing: van der Waals one-fluid rules, a = sum_i sum_j x_i x_j a_ij with
 * a_ij = sqrt(a_i a_j)(1 - k_ij), b = sum_i x_i b_i.
 *
 * Fugacity coefficients (e.g. Michelsen and Mollerup, Thermodynamic Models: Fundamentals and
 * Computational Aspects, 2nd ed., chapter 3; the SRK and PR special cases are given in Soave
 * 1972 and Peng and Robinson 1976):
 *   ln phi_i = (b_i/b)(Z - 1) - ln(Z - B)
 *              - A/((d1 - d2) B) * (2 sum_j x_j a_ij / a - b_i/b) * ln((Z + d1 B)/(Z + d2 B))
 * and the residual Gibbs energy of the mixture (used to choose between roots)
 *   G^R/(RT) = sum_i x_i ln phi_i = Z - 1 - ln(Z - B) - A/((d1 - d2) B) ln((Z + d1 B)/(Z + d2 B)).
 * At fixed T, P, x the root with the lower G^R has the lower Gibbs energy, since the ideal part
 * sum x_i ln x_i is the same for both.
 *
 * Root classification when the cubic has only one physical root (documented rule): the mixture
 * is treated as a pseudo-pure fluid with its own a(T) and b. That fluid is below its critical
 * temperature exactly when a/(bRT) > Omega_a/Omega_b (i.e. A/B > Omega_a/Omega_b; at a pure
 * component's Tc the two are equal and a(T)/T falls with T). Below it, the single root is
 * 'liquid' when its volume is below the pseudo-critical volume, V/b < Zc/Omega_b (3.85 SRK,
 * 3.95 PR), else 'vapor'; above it, 'vapor'. For a pure component this is exact (below Tc the
 * liquid spinodal volume lies below Vc and the vapor spinodal above it). For mixtures it is a
 * label only, and near the critical region of an asymmetric mixture it can call a dense phase
 * 'vapor' just above its bubble point (methane + n-butane 0.6/0.4 at 310 K, SRK: bubble point
 * about 122 bar, single phase above it labelled 'vapor'), as any pseudo-critical rule does.
 * The tangent-plane stability test (stability.ts) decides whether a mixture splits; with three
 * roots 'stable' compares Gibbs energies.
 *
 * Everything that depends only on the components (a_c,i, b_i, m_i, 1 - k_ij) is computed once
 * in the constructor; per temperature only sqrt(a_i(T)), cached for the last T. The hot path
 * (z, zValue, molarVolume, lnPhi) uses scratch arrays allocated in the constructor.
 *
 * alpha(T) = [1 + m(1 - sqrt(Tr))]^2 is used for every component, including supercritical
 * ones such as hydrogen (negative omega): 1 + m(1 - sqrt(Tr)) stays positive for hydrogen up
 * to about 2400 K with SRK. Its absolute value is used for sqrt(a_i).
 */
import type { ComponentData, Eos, EosName, EosWork, RootChoice, RootResult } from './types.js';
import { R } from './constants.js';
import { solveCubic } from './cubic.js';
import type { CubicParameters } from './eos-params.js';
import { SRK_PARAMETERS } from './srk.js';
import { PR_PARAMETERS, PR78_PARAMETERS } from './pr.js';
import { IdealGasEos } from './ideal.js';
import { checkState } from './state-check.js';

/** An Eos with a few allocation-free extras used by the flash and the meter code. */
export interface EosModel extends Eos {
  /** Z of the chosen root only; allocation-free. */
  zValue(T: number, P: number, x: ArrayLike<number>, which?: RootChoice): number;
  /** Residual Gibbs energy G^R/(RT) of the chosen root. */
  residualGibbs(T: number, P: number, x: ArrayLike<number>, which?: RootChoice): number;
}

export interface MakeEosOptions {
  /** PR only: use the 1978 m(omega) for omega > 0.49 (default false: the 1976 polynomial). */
  pr78?: boolean;
}

/** Which physical root was selected, and what the cubic looked like. Internal scratch. */
const ROOT_VAPOR = 0;
const ROOT_LIQUID = 1;

export class CubicEos implements EosModel {
  readonly name: 'SRK' | 'PR';
  readonly n: number;
  readonly components: readonly ComponentData[];
  readonly params: CubicParameters;
  readonly work: EosWork = {};

  private readonly d1: number;
  private readonly d2: number;
  /** sqrt(a_c,i), J^0.5 m^1.5 / mol. */
  private readonly sqrtAc: Float64Array;
  /** b_i, m3/mol. */
  readonly b: Float64Array;
  private readonly m: Float64Array;
  private readonly invTc: Float64Array;
  /** 1 - k_ij, row-major; null when every k_ij is zero. */
  private readonly oneMinusK: Float64Array | null;

  // T-dependent cache
  private lastT = NaN;
  private readonly sqrtA: Float64Array;
  /** d sqrt(a_i)/dT scratch of aDerivatives. */
  private readonly dSqrtA: Float64Array;
  /** Omega_a/Omega_b and Zc/Omega_b of the model (single-root classification). */
  private readonly critRatio: number;
  private readonly critVolume: number;
  // per-call scratch
  private readonly sumA: Float64Array; // sum_j x_j a_ij (normalized x)
  private readonly roots = new Float64Array(3);
  private aMix = 0;
  private bMix = 0;
  // last solve
  private zSel = 0;
  private rootSel = ROOT_VAPOR;
  private nPhys: 1 | 3 = 1;
  private Asel = 0;
  private Bsel = 0;

  constructor(params: CubicParameters, comps: readonly ComponentData[], kij?: Float64Array) {
    const n = comps.length;
    if (n === 0) throw new RangeError('makeEos: at least one component is needed');
    this.name = params.name;
    this.params = params;
    this.n = n;
    this.components = comps;
    this.d1 = params.delta1;
    this.d2 = params.delta2;
    this.sqrtAc = new Float64Array(n);
    this.b = new Float64Array(n);
    this.m = new Float64Array(n);
    this.invTc = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const c = comps[i];
      if (!(c.Tc > 0) || !(c.Pc > 0) || !Number.isFinite(c.omega)) {
        throw new RangeError(`component ${c.id}: Tc, Pc must be positive and omega finite`);
      }
      this.sqrtAc[i] = Math.sqrt((params.omegaA * R * R * c.Tc * c.Tc) / c.Pc);
      this.b[i] = (params.omegaB * R * c.Tc) / c.Pc;
      this.m[i] = params.m(c.omega);
      this.invTc[i] = 1 / c.Tc;
    }
    let anyK = false;
    if (kij !== undefined) {
      if (kij.length !== n * n) throw new RangeError(`makeEos: kij must have ${n * n} entries (n*n row-major), got ${kij.length}`);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const k = kij[i * n + j];
          if (!Number.isFinite(k)) throw new RangeError(`makeEos: kij[${i}][${j}] is not finite`);
          if (Math.abs(k - kij[j * n + i]) > 1e-12) throw new RangeError(`makeEos: kij must be symmetric (kij[${i}][${j}] != kij[${j}][${i}])`);
          if (i === j && k !== 0) throw new RangeError(`makeEos: kij[${i}][${i}] must be 0`);
          if (k !== 0) anyK = true;
        }
      }
    }
    if (anyK) {
      const omk = new Float64Array(n * n);
      for (let i = 0; i < n * n; i++) omk[i] = 1 - kij![i];
      this.oneMinusK = omk;
    } else {
      this.oneMinusK = null;
    }
    this.sqrtA = new Float64Array(n);
    this.dSqrtA = new Float64Array(n);
    this.critRatio = params.omegaA / params.omegaB;
    this.critVolume = params.zc / params.omegaB;
    this.sumA = new Float64Array(n);
  }

  /** sqrt(a_i(T)) for every component, cached for the last T. */
  private setT(T: number): void {
    if (T === this.lastT) return;
    const n = this.n;
    for (let i = 0; i < n; i++) {
      const s = 1 + this.m[i] * (1 - Math.sqrt(T * this.invTc[i]));
      this.sqrtA[i] = this.sqrtAc[i] * Math.abs(s);
    }
    this.lastT = T;
  }

  /** a, b, Tpc and sum_j x_j a_ij of the (normalized) composition x. */
  private mix(x: ArrayLike<number>): void {
    const n = this.n;
    const sa = this.sqrtA;
    const sumA = this.sumA;
    let xs = 0;
    let bm = 0;
    let S = 0;
    for (let i = 0; i < n; i++) {
      const xi = x[i];
      if (!(xi >= 0)) throw new RangeError(`mole fraction ${i} must be >= 0, got ${xi}`);
      xs += xi;
      bm += xi * this.b[i];
      S += xi * sa[i];
    }
    if (!(xs > 0) || xs === Infinity) throw new RangeError('composition must have a positive finite sum');
    const inv = 1 / xs;
    this.bMix = bm * inv;
    const omk = this.oneMinusK;
    if (omk === null) {
      S *= inv;
      for (let i = 0; i < n; i++) sumA[i] = sa[i] * S;
      this.aMix = S * S;
    } else {
      let am = 0;
      for (let i = 0; i < n; i++) {
        let s = 0;
        const row = i * n;
        for (let j = 0; j < n; j++) s += omk[row + j] * sa[j] * x[j];
        s *= sa[i] * inv;
        sumA[i] = s;
        am += x[i] * s;
      }
      this.aMix = am * inv;
    }
  }

  /**
   * ln((Z + d1 B)/(Z + d2 B)) / ((d1 - d2) B), written to stay finite as B -> 0 (limit 1/Z).
   */
  private logTerm(Z: number, B: number): number {
    const den = Z + this.d2 * B;
    const u = ((this.d1 - this.d2) * B) / den;
    return (u === 0 ? 1 : Math.log1p(u) / u) / den;
  }

  /** G^R/(RT) of root Z. */
  private gr(Z: number, A: number, B: number): number {
    return Z - 1 - Math.log(Z - B) - A * this.logTerm(Z, B);
  }

  /** Solves the cubic for the current mixture and stores the selected root. */
  private solve(T: number, P: number, which: RootChoice): void {
    const RT = R * T;
    const B = (this.bMix * P) / RT;
    const A = (this.aMix * P) / (RT * RT);
    const s = this.d1 + this.d2;
    const p = this.d1 * this.d2;
    const c2 = (s - 1) * B - 1;
    const c1 = A + p * B * B - s * B * (B + 1);
    const c0 = -(A * B + p * B * B * (B + 1));
    const r = this.roots;
    const k = solveCubic(c2, c1, c0, r);
    // physical roots: Z > B. f(B) = -2B^2 < 0 for both SRK and PR, so there are 1 or 3 of them.
    let zl: number;
    let zv: number;
    let nPhys: 1 | 3;
    if (k === 1) {
      zl = zv = r[0];
      nPhys = 1;
    } else if (r[0] > B) {
      zl = r[0];
      zv = r[2];
      nPhys = zv > zl ? 3 : 1;
    } else {
      // at most the two upper roots are physical: near-degenerate case, keep the largest
      zl = zv = r[2];
      nPhys = 1;
    }
    if (!(zv > B)) throw new RangeError(`no physical root of the cubic (T=${T} K, P=${P} Pa)`);
    this.Asel = A;
    this.Bsel = B;
    this.nPhys = nPhys;
    if (nPhys === 1) {
      this.zSel = zv;
      this.rootSel = A > this.critRatio * B && zv < this.critVolume * B ? ROOT_LIQUID : ROOT_VAPOR;
      return;
    }
    let useLiquid: boolean;
    if (which === 'vapor') useLiquid = false;
    else if (which === 'liquid') useLiquid = true;
    else useLiquid = this.gr(zl, A, B) < this.gr(zv, A, B);
    this.zSel = useLiquid ? zl : zv;
    this.rootSel = useLiquid ? ROOT_LIQUID : ROOT_VAPOR;
  }

  private result(): RootResult {
    return {
      Z: this.zSel,
      root: this.rootSel === ROOT_LIQUID ? 'liquid' : 'vapor',
      nRoots: this.nPhys,
      A: this.Asel,
      B: this.Bsel,
    };
  }

  /** Label of the root selected by the last zValue/z/lnPhi/molarVolume/residualGibbs call (allocation-free). */
  get lastRoot(): 'vapor' | 'liquid' {
    return this.rootSel === ROOT_LIQUID ? 'liquid' : 'vapor';
  }

  zValue(T: number, P: number, x: ArrayLike<number>, which: RootChoice = 'stable'): number {
    checkState(T, P, x, this.n);
    this.setT(T);
    this.mix(x);
    this.solve(T, P, which);
    return this.zSel;
  }

  z(T: number, P: number, x: ArrayLike<number>, which: RootChoice = 'stable'): RootResult {
    this.zValue(T, P, x, which);
    return this.result();
  }

  molarVolume(T: number, P: number, x: ArrayLike<number>, which: RootChoice = 'stable'): number {
    return (this.zValue(T, P, x, which) * R * T) / P;
  }

  residualGibbs(T: number, P: number, x: ArrayLike<number>, which: RootChoice = 'stable'): number {
    this.zValue(T, P, x, which);
    return this.gr(this.zSel, this.Asel, this.Bsel);
  }

  /**
   * Mixture energy parameter and its temperature derivatives for composition x (normalised
   * here) at T, for the residual enthalpy, entropy and heat capacity (departure.ts). Writes
   * out[0] = a (J m3/mol2), out[1] = da/dT, out[2] = d2a/dT2, out[3] = b (m3/mol); returns out.
   * With s_i = sqrt(a_i) = sqrt(a_c,i) |1 + m_i (1 - sqrt(T/Tc_i))|:
   *   s_i' = -sigma_i sqrt(a_c,i) m_i / (2 sqrt(T Tc_i)),  s_i'' = -s_i' / (2T)
   * (sigma_i the sign of 1 + m_i(1 - sqrt(T/Tc_i))), and with a = sum_ij x_i x_j (1 - k_ij) s_i s_j:
   *   a'  = 2 sum_i x_i s_i' sum_j (1 - k_ij) x_j s_j
   *   a'' = 2 sum_i x_i s_i'' sum_j (1 - k_ij) x_j s_j + 2 sum_i x_i s_i' sum_j (1 - k_ij) x_j s_j'.
   * Allocation-free.
   */
  aDerivatives(T: number, x: ArrayLike<number>, out: Float64Array): Float64Array {
    if (!(T > 0) || T === Infinity) throw new RangeError(`temperature must be a finite positive number of kelvin, got ${T}`);
    if (x.length !== this.n) throw new RangeError(`composition has ${x.length} entries, expected ${this.n}`);
    this.setT(T);
    const n = this.n;
    const s = this.sqrtA;
    const ds = this.dSqrtA;
    let xs = 0;
    let bm = 0;
    for (let i = 0; i < n; i++) {
      const xi = x[i];
      if (!(xi >= 0)) throw new RangeError(`mole fraction ${i} must be >= 0, got ${xi}`);
      xs += xi;
      bm += xi * this.b[i];
      const f = 1 + this.m[i] * (1 - Math.sqrt(T * this.invTc[i]));
      const sigma = f < 0 ? -1 : 1;
      ds[i] = (-sigma * this.sqrtAc[i] * this.m[i] * Math.sqrt(this.invTc[i] / T)) / 2;
    }
    if (!(xs > 0) || xs === Infinity) throw new RangeError('composition must have a positive finite sum');
    const inv = 1 / xs;
    // s'' = -s'/(2T) for every component, so sum x_i s_i'' (...) = -(1/(2T)) sum x_i s_i' (...)
    const omk = this.oneMinusK;
    let a = 0;
    let a1 = 0;
    let a2b = 0; // sum_i x_i s_i' sum_j k_ij x_j s_j'
    if (omk === null) {
      let S = 0;
      let S1 = 0;
      for (let i = 0; i < n; i++) {
        S += x[i] * s[i];
        S1 += x[i] * ds[i];
      }
      S *= inv;
      S1 *= inv;
      a = S * S;
      a1 = 2 * S * S1;
      a2b = S1 * S1;
    } else {
      for (let i = 0; i < n; i++) {
        const xi = x[i] * inv;
        if (xi === 0) continue;
        const row = i * n;
        let t0 = 0;
        let t1 = 0;
        for (let j = 0; j < n; j++) {
          const w = omk[row + j] * x[j] * inv;
          t0 += w * s[j];
          t1 += w * ds[j];
        }
        a += xi * s[i] * t0;
        a1 += 2 * xi * ds[i] * t0;
        a2b += xi * ds[i] * t1;
      }
    }
    out[0] = a;
    out[1] = a1;
    out[2] = -a1 / (2 * T) + 2 * a2b;
    out[3] = bm * inv;
    return out;
  }

  lnPhi(T: number, P: number, x: ArrayLike<number>, which: RootChoice, out: Float64Array): RootResult {
    this.lnPhiInto(T, P, x, which, out);
    return this.result();
  }

  /** lnPhi without the RootResult (allocation-free: the flashes' inner loops); the root is `lastRoot`. */
  lnPhiInto(T: number, P: number, x: ArrayLike<number>, which: RootChoice, out: Float64Array): void {
    this.zValue(T, P, x, which);
    const Z = this.zSel;
    const A = this.Asel;
    const B = this.Bsel;
    const n = this.n;
    const invB = 1 / this.bMix;
    const invA2 = 2 / this.aMix;
    const lnZB = Math.log(Z - B);
    const AL = A * this.logTerm(Z, B);
    const zm1 = Z - 1;
    const b = this.b;
    const sumA = this.sumA;
    for (let i = 0; i < n; i++) {
      const bi = b[i] * invB;
      out[i] = bi * zm1 - lnZB - AL * (invA2 * sumA[i] - bi);
    }
  }
}

/**
 * Builds an equation of state for the given components.
 * kij: binary interaction parameters, n*n row-major, symmetric, zero diagonal; default all 0.
 */
export function makeEos(
  name: EosName,
  comps: readonly ComponentData[],
  kij?: Float64Array,
  options: MakeEosOptions = {},
): EosModel {
  switch (name) {
    case 'SRK':
      return new CubicEos(SRK_PARAMETERS, comps, kij);
    case 'PR':
      return new CubicEos(options.pr78 ? PR78_PARAMETERS : PR_PARAMETERS, comps, kij);
    case 'ideal':
      if (comps.length === 0) throw new RangeError('makeEos: at least one component is needed');
      return new IdealGasEos(comps);
    default:
      throw new RangeError(`unknown equation of state "${String(name)}" (use SRK, PR or ideal)`);
  }
}
