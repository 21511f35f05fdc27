/**
 * The GERG-2008 model object: density from (T, P, x), properties from (T, D, x), molar mass.
 * See index.ts for what the model is, its range and its API.
 */
import { GergCore, R_GERG, type IdealDerivatives, type ResidualDerivatives } from './core.js';
import { DensitySolver } from './density.js';
import type { GergDensityOptions, GergDensityResult, GergProperties, GergRoot } from './types.js';
import type { GergPureFluid } from './data/pure.js';

/** Tolerance on the sum of the mole fractions. */
const SUM_TOL = 1e-9;
const RESIDUAL_TOL = 1e-9;
/**
 * Above this multiple of the reducing temperature a P(rho) isotherm at fixed composition is taken
 * to have one root, and a dense result of the fast gas search is not re-checked by the scan from
 * low density (a margin of this project's choosing: the loops of P(rho) end near the mixture's
 * critical temperature, which the reducing temperature approximates).
 */
const SINGLE_ROOT_TR = 1.5;

export function emptyDensityResult(): GergDensityResult {
  return {
    status: 'invalid', D: NaN, Z: NaN, root: 'gas', phase: 'gas-like', phaseParameter: NaN, reducedDensity: NaN,
    iterations: 0, evaluations: 0, residual: NaN, message: '',
  };
}

export function emptyProperties(): GergProperties {
  return {
    P: NaN, Z: NaN, dPdD: NaN, d2PdD2: NaN, dPdT: NaN, d2PdTD: NaN, U: NaN, H: NaN, G: NaN, A: NaN, S: NaN,
    Cv: NaN, Cp: NaN, W: NaN, JT: NaN, kappa: NaN, M: NaN,
  };
}

/** GERG-2008 prepared for one ordered set of components. */
export class Gerg2008Model {
  /** The loopclose component ids, in the order of every composition array. */
  readonly ids: readonly string[];
  readonly n: number;
  private readonly core: GergCore;
  private readonly solver: DensitySolver;
  private readonly res: ResidualDerivatives = { a: 0, d1: 0, d2: 0, d3: 0, t1: 0, t2: 0, d1t1: 0, d2t1: 0 };
  private readonly ide: IdealDerivatives = { a: 0, t1: 0, t2: 0 };

  constructor(fluids: readonly GergPureFluid[]) {
    this.ids = Object.freeze(fluids.map((f) => f.id));
    this.n = fluids.length;
    this.core = new GergCore(fluids);
    this.solver = new DensitySolver(this.core);
  }

  /** Molar mass of composition x, kg/mol. */
  molarMass(x: ArrayLike<number>): number {
    return this.core.molarMass(x);
  }

  /** Reducing density (mol/m3) and temperature (K) of composition x. */
  reducing(x: ArrayLike<number>): { rhoR: number; TR: number } {
    this.core.setComposition(x);
    return { rhoR: this.core.rhoR, TR: this.core.TR };
  }

  /** What is wrong with a composition, or '' when it is usable. */
  private compositionProblem(x: ArrayLike<number>): string {
    if (!x || x.length !== this.n) return `composition has ${x ? x.length : 0} mole fractions, the model has ${this.n} components (${this.ids.join(', ')})`;
    let sum = 0;
    for (let i = 0; i < this.n; i++) {
      const v = x[i];
      if (!(v >= 0) || !Number.isFinite(v)) return `mole fraction of ${this.ids[i]} is ${v}; it must be a number from 0 to 1`;
      sum += v;
    }
    if (Math.abs(sum - 1) > SUM_TOL) return `mole fractions sum to ${sum}, not 1; normalize the composition first`;
    return '';
  }

  /**
   * Molar density (mol/m3) at temperature T (K), pressure P (Pa) and mole fractions x. Returns the
   * gas-like (lowest) root unless options.root is 'liquid'; the result's `phase` says when the
   * state is dense and liquid-like, and `status` when no density could be found. Pass `out` to
   * reuse a result object (no allocation).
   */
  density(T: number, P: number, x: ArrayLike<number>, options?: GergDensityOptions, out?: GergDensityResult): GergDensityResult {
    const r = out ?? emptyDensityResult();
    r.message = '';
    r.iterations = 0;
    r.evaluations = 0;
    r.root = options?.root ?? 'gas';
    let problem = '';
    if (!(T > 0) || !Number.isFinite(T)) problem = `temperature ${T} K is not a positive number`;
    else if (!(P > 0) || !Number.isFinite(P)) problem = `pressure ${P} Pa is not a positive number`;
    else problem = this.compositionProblem(x);
    if (problem === '' && options?.guess !== undefined && !(options.guess > 0 && Number.isFinite(options.guess))) {
      problem = `starting density ${options.guess} mol/m3 is not a positive number`;
    }
    if (problem !== '') {
      r.status = 'invalid';
      r.D = NaN;
      r.Z = NaN;
      r.phaseParameter = NaN;
      r.reducedDensity = NaN;
      r.residual = NaN;
      r.message = problem;
      return r;
    }
    const core = this.core;
    core.setComposition(x);
    core.setTemperature(T);
    const s = this.solver;
    s.begin(T, P);
    const want: GergRoot = options?.root ?? 'gas';
    let rho = NaN;
    let root: GergRoot = want;
    let note = '';
    if (want === 'gas') {
      rho = s.gasNewton(options?.guess ?? P / (R_GERG * T));
      let sure = Number.isFinite(rho) && !s.unstableSeen;
      if (sure && T < SINGLE_ROOT_TR * core.TR) {
        this.phaseAt(T, rho, r);
        sure = r.phase === 'gas-like';
      }
      if (!sure) {
        const g = s.gasScan();
        if (g.found) rho = g.rho;
        else if (g.noRoot) {
          const l = s.liquidScan();
          rho = l.found ? l.rho : NaN;
          root = 'liquid';
          note = l.found
            ? 'no gas-like root at this temperature and pressure: the isotherm reaches this pressure only on its dense branch, so the liquid-like root is returned'
            : 'no root found on either branch';
        } else {
          rho = NaN;
        }
      }
    } else {
      const l = s.liquidScan();
      if (l.found) rho = l.rho;
      else if (l.noRoot) {
        const g = s.gasScan();
        rho = g.found ? g.rho : NaN;
        root = 'gas';
        note = g.found
          ? 'no liquid-like root at this temperature and pressure: the dense branch does not come down to this pressure, so the gas-like root is returned'
          : 'no root found on either branch';
      }
    }
    r.root = root;
    r.iterations = s.iterations;
    if (Number.isFinite(rho) && rho > 0) {
      s.evaluate(rho);
      r.evaluations = s.evaluations;
      r.D = rho;
      r.Z = s.p / (rho * R_GERG * T);
      r.residual = (s.p - P) / P;
      r.reducedDensity = rho / core.rhoR;
      this.phaseAt(T, rho, r);
      const ok = Math.abs(r.residual) <= RESIDUAL_TOL && s.dp > 0;
      r.status = ok ? 'converged' : 'not-converged';
      r.message = ok ? note : `the density iteration stopped at a relative pressure residual of ${r.residual.toExponential(2)}${note ? `; ${note}` : ''}`;
    } else {
      // Never a silent guess: report the ideal-gas density for orientation, flagged as not converged.
      const rhoIdeal = P / (R_GERG * T);
      s.evaluate(rhoIdeal);
      r.evaluations = s.evaluations;
      r.status = 'not-converged';
      r.D = rhoIdeal;
      r.Z = s.p / (rhoIdeal * R_GERG * T);
      r.residual = (s.p - P) / P;
      r.reducedDensity = rhoIdeal / core.rhoR;
      r.phase = 'gas-like';
      r.phaseParameter = NaN;
      r.message = `no density found at ${T} K and ${P} Pa${note ? ` (${note})` : ''}; D is the ideal-gas density, not a solution`;
    }
    return r;
  }

  /** Phase identification parameter at (T, rho) into r.phase and r.phaseParameter. */
  private phaseAt(T: number, rho: number, r: GergDensityResult): void {
    const core = this.core;
    const a = core.residual(rho / core.rhoR, this.res);
    const RT = R_GERG * T;
    const dPdD = RT * (1 + 2 * a.d1 + a.d2);
    const d2PdD2 = (RT * (2 * a.d1 + 4 * a.d2 + a.d3)) / rho;
    const dPdT = rho * R_GERG * (1 + a.d1 - a.d1t1);
    const d2PdTD = R_GERG * (1 + 2 * a.d1 + a.d2 - 2 * a.d1t1 - a.d2t1);
    const pi = 2 - rho * (d2PdTD / dPdT - d2PdD2 / dPdD);
    r.phaseParameter = pi;
    if (T < core.TR) r.phase = pi > 1 ? 'liquid-like' : 'gas-like';
    else r.phase = rho > core.rhoR ? 'dense' : 'gas-like';
  }

  /**
   * Properties at temperature T (K), molar density D (mol/m3) and mole fractions x. Throws a
   * RangeError for a non-positive T or D or a composition that is not normalized (a caller's
   * mistake, not a state). Pass `out` to reuse a result object (no allocation).
   */
  properties(T: number, D: number, x: ArrayLike<number>, out?: GergProperties): GergProperties {
    if (!(T > 0) || !Number.isFinite(T)) throw new RangeError(`GERG-2008 properties: temperature ${T} K is not a positive number`);
    if (!(D > 0) || !Number.isFinite(D)) throw new RangeError(`GERG-2008 properties: density ${D} mol/m3 is not a positive number`);
    const problem = this.compositionProblem(x);
    if (problem !== '') throw new RangeError(`GERG-2008 properties: ${problem}`);
    const core = this.core;
    core.setComposition(x);
    core.setTemperature(T);
    const a = core.residual(D / core.rhoR, this.res);
    const o = core.ideal(T, D, this.ide);
    const p = out ?? emptyProperties();
    const R = R_GERG;
    const RT = R * T;
    const M = core.molarMass(x);
    p.M = M;
    p.Z = 1 + a.d1;
    p.P = D * RT * p.Z;
    p.dPdD = RT * (1 + 2 * a.d1 + a.d2);
    p.d2PdD2 = (RT * (2 * a.d1 + 4 * a.d2 + a.d3)) / D;
    p.dPdT = D * R * (1 + a.d1 - a.d1t1);
    p.d2PdTD = R * (1 + 2 * a.d1 + a.d2 - 2 * a.d1t1 - a.d2t1);
    p.A = RT * (o.a + a.a);
    p.G = RT * (1 + a.d1 + o.a + a.a);
    p.U = RT * (o.t1 + a.t1);
    p.H = RT * (1 + a.d1 + o.t1 + a.t1);
    p.S = R * (o.t1 + a.t1 - o.a - a.a);
    p.Cv = -R * (o.t2 + a.t2);
    p.Cp = p.Cv + (T * (p.dPdT / D) * (p.dPdT / D)) / p.dPdD;
    const w2 = ((p.Cp / p.Cv) * p.dPdD) / M;
    p.W = w2 > 0 ? Math.sqrt(w2) : NaN;
    p.JT = ((T / D) * (p.dPdT / p.dPdD) - 1) / (p.Cp * D);
    p.kappa = (w2 * M) / (RT * p.Z);
    return p;
  }
}
