/**
 * Density from temperature and pressure for the GERG-2008 model: a safeguarded Newton iteration
 * on ln P against ln rho, kept inside a bracket, with bisection when a step would leave it or
 * lands on a mechanically unstable state (dP/drho <= 0 or P <= 0).
 *
 * Gas root (the lowest-density root, what a gas meter wants): Newton from the ideal-gas density.
 * When that path meets an unstable state or ends on a liquid-like root, a slower scan upward from
 * low density finds the lowest root for certain: it walks up the gas branch until the pressure
 * passes the target (a bracket) or the branch turns over (dP/drho <= 0); at a turn-over the
 * spinodal is located by bisection on the sign of dP/drho, and if the pressure there is below the
 * target the isotherm has no gas-like root at this pressure, so the liquid-like root is returned
 * and the result says so.
 *
 * Liquid root (the highest-density root): a scan downward from a dense state (reduced density 3.5,
 * raised until the pressure exceeds the target) to the first density below the target pressure or
 * on the unstable branch, then Newton inside that bracket. With one root only (supercritical
 * isotherms, most meter states), both searches return the same density.
 *
 * Nothing here allocates: the solver keeps its scratch from construction.
 */
import type { GergCore } from './core.js';
import { R_GERG } from './core.js';
import type { GergRoot } from './types.js';

/** Newton stops when a step in ln rho is below this. */
const STEP_TOL = 1e-12;
const MAX_NEWTON = 80;
const MAX_BISECT = 200;

/** What one root search found. */
export interface SearchOutcome {
  found: boolean;
  rho: number;
  /** The pressure target could not be met on this branch (e.g. no gas-like root at this P). */
  noRoot: boolean;
}

export class DensitySolver {
  private readonly pd = new Float64Array(2);
  private RT = 0;
  private rhoR = 0;
  private Pt = 0;
  /** Last evaluation. */
  p = 0;
  dp = 0;
  evaluations = 0;
  iterations = 0;
  unstableSeen = false;
  private readonly outcome: SearchOutcome = { found: false, rho: NaN, noRoot: false };

  constructor(private readonly core: GergCore) {}

  /** Prepares a solve at temperature T (K) and target pressure P (Pa); composition and temperature already set in the core. */
  begin(T: number, P: number): void {
    this.RT = R_GERG * T;
    this.rhoR = this.core.rhoR;
    this.Pt = P;
    this.evaluations = 0;
    this.iterations = 0;
    this.unstableSeen = false;
  }

  /** Pressure (Pa) and dP/drho (J/mol) at rho, in this.p and this.dp. */
  evaluate(rho: number): void {
    this.core.pressureDerivatives(rho / this.rhoR, this.pd);
    this.p = rho * this.RT * (1 + this.pd[0]);
    this.dp = this.RT * (1 + 2 * this.pd[0] + this.pd[1]);
    this.evaluations++;
  }

  private stable(): boolean {
    return this.dp > 0 && this.p > 0 && Number.isFinite(this.p) && Number.isFinite(this.dp);
  }

  /**
   * Safeguarded Newton inside (lo, hi) from rho. 'gas' treats an unstable state as an upper bound
   * (the lowest root lies below it), 'liquid' as a lower bound. Returns the root or NaN.
   */
  newton(rho: number, lo: number, hi: number, mode: GergRoot): number {
    const Pt = this.Pt;
    const lnPt = Math.log(Pt);
    for (let it = 0; it < MAX_NEWTON; it++) {
      this.iterations++;
      this.evaluate(rho);
      let next: number;
      if (!this.stable()) {
        this.unstableSeen = true;
        if (mode === 'gas') hi = Math.min(hi, rho);
        else lo = Math.max(lo, rho);
        next = NaN;
      } else {
        const f = this.p - Pt;
        if (f === 0) return rho;
        if (f < 0) lo = Math.max(lo, rho);
        else hi = Math.min(hi, rho);
        // Newton on ln P(ln rho): d ln P / d ln rho = rho P' / P.
        let step = -((Math.log(this.p) - lnPt) * this.p) / (rho * this.dp);
        if (step > 1) step = 1;
        else if (step < -1) step = -1;
        if (Math.abs(step) <= STEP_TOL) {
          const root = rho * Math.exp(step);
          return root;
        }
        next = rho * Math.exp(step);
      }
      if (!(next > lo && next < hi)) {
        if (hi === Infinity) next = Math.max(2 * rho, 2 * lo);
        else if (lo > 0) next = Math.sqrt(lo * hi);
        else next = 0.5 * hi;
      }
      if (hi < Infinity && lo > 0 && hi - lo <= 4e-16 * hi) return NaN; // bracket collapsed on no root
      rho = next;
    }
    return NaN;
  }

  /** Fast gas search: Newton from `start` (the ideal-gas density unless given). */
  gasNewton(start: number): number {
    return this.newton(start, 0, Infinity, 'gas');
  }

  /**
   * Locates the spinodal between a stable density `a` (dP/drho > 0) and an unstable one `b` by
   * bisection on the sign of dP/drho; returns the stable end.
   */
  private spinodal(a: number, b: number): number {
    for (let k = 0; k < MAX_BISECT && Math.abs(b - a) > 1e-13 * Math.max(a, b); k++) {
      this.iterations++;
      const m = a > 0 && b > 0 ? Math.sqrt(a * b) : 0.5 * (a + b);
      this.evaluate(m);
      if (this.stable()) a = m;
      else b = m;
    }
    return a;
  }

  /** Robust gas search: the lowest root, or noRoot when the gas branch never reaches the target pressure. */
  gasScan(): SearchOutcome {
    const out = this.outcome;
    out.found = false;
    out.noRoot = false;
    out.rho = NaN;
    const Pt = this.Pt;
    const rhoIdeal = Pt / this.RT;
    const top = 12 * this.rhoR;
    let prev = 0; // f(0) = -P < 0, dP/drho(0) = RT > 0
    let rho = Math.min(0.1 * rhoIdeal, 0.01 * this.rhoR);
    while (rho < top) {
      this.iterations++;
      this.evaluate(rho);
      if (!this.stable()) {
        this.unstableSeen = true;
        const s = this.spinodal(prev, rho);
        this.evaluate(s);
        if (this.p >= Pt) {
          out.rho = this.newton(0.5 * (prev + s), prev, s, 'gas');
          out.found = Number.isFinite(out.rho);
        } else {
          out.noRoot = true;
        }
        return out;
      }
      if (this.p >= Pt) {
        out.rho = this.newton(prev > 0 ? Math.sqrt(prev * rho) : 0.5 * rho, prev, rho, 'gas');
        out.found = Number.isFinite(out.rho);
        return out;
      }
      prev = rho;
      rho *= 1.2;
    }
    out.noRoot = true;
    return out;
  }

  /** Liquid search: the highest root, or noRoot when the liquid branch never comes down to the target pressure. */
  liquidScan(): SearchOutcome {
    const out = this.outcome;
    out.found = false;
    out.noRoot = false;
    out.rho = NaN;
    const Pt = this.Pt;
    // A dense start above the target pressure.
    let top = 3.5 * this.rhoR;
    for (let k = 0; ; k++) {
      this.iterations++;
      this.evaluate(top);
      if (this.stable() && this.p > Pt) break;
      if (k >= 12) {
        out.noRoot = true;
        return out;
      }
      top *= 1.25;
    }
    let prev = top;
    let rho = top / 1.1;
    const bottom = 1e-9 * this.rhoR;
    while (rho > bottom) {
      this.iterations++;
      this.evaluate(rho);
      if (!this.stable()) {
        this.unstableSeen = true;
        // Liquid spinodal: bisection between the stable prev and the unstable rho.
        const s = this.spinodal(prev, rho);
        this.evaluate(s);
        if (this.p <= Pt) {
          out.rho = this.newton(0.5 * (s + prev), s, prev, 'liquid');
          out.found = Number.isFinite(out.rho);
        } else {
          out.noRoot = true;
        }
        return out;
      }
      if (this.p <= Pt) {
        out.rho = this.newton(Math.sqrt(rho * prev), rho, prev, 'liquid');
        out.found = Number.isFinite(out.rho);
        return out;
      }
      prev = rho;
      rho /= 1.1;
    }
    out.noRoot = true;
    return out;
  }
}
