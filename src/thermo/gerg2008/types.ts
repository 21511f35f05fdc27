/** Types of the GERG-2008 model's public API. SI throughout. */

/** Outcome of a density solve (the project's result statuses). */
export type GergStatus = 'converged' | 'not-converged' | 'invalid';

/** Which root of P(T, rho) = P a density solve looks for. */
export type GergRoot = 'gas' | 'liquid';

/** Phase hint of a state (see GergDensityResult.phase). */
export type GergPhase = 'gas-like' | 'dense' | 'liquid-like';

export interface GergDensityOptions {
  /**
   * 'gas' (the default): the lowest-density root, the one a gas meter wants. 'liquid': the
   * highest-density root. Where the isotherm has a single root both give it.
   */
  root?: GergRoot;
  /** A starting density, mol/m3 (the gas search only); default the ideal-gas density. */
  guess?: number;
}

export interface GergDensityResult {
  status: GergStatus;
  /** Molar density, mol/m3 (NaN only when status is 'invalid'). */
  D: number;
  /** Compressibility factor P/(D R T) of the returned density. */
  Z: number;
  /** Which search produced D: 'gas' (lowest root) or 'liquid' (highest root). */
  root: GergRoot;
  /**
   * 'liquid-like': below the reducing temperature T_r(x) and on the dense branch (phase
   * identification parameter above 1; Venkatarathnam and Oellrich, Fluid Phase Equilib. 301
   * (2011) 225-233); a gas meter should not take such a state at face value.
   * 'dense': at or above T_r(x) and denser than the reducing density rho_r(x) (a supercritical
   * fluid of liquid-like density). 'gas-like' otherwise. (The parameter alone calls every gas
   * whose Z rises with density liquid-like, hydrogen at room temperature for one; hence the
   * temperature condition, this project's choice.)
   */
  phase: GergPhase;
  /** The phase identification parameter at D. */
  phaseParameter: number;
  /** Reduced density D / rho_r of the returned state (above about 1: dense). */
  reducedDensity: number;
  /** Newton and bisection steps, and pressure evaluations. */
  iterations: number;
  evaluations: number;
  /** (P(D) - P) / P at the returned density. */
  residual: number;
  /** Why the solve did not converge, which root it could not find, or what was invalid. */
  message: string;
}

/** Properties at (T, D, x). SI: Pa, mol/m3, K, J/mol, J/(mol K), m/s, kg/mol. */
export interface GergProperties {
  /** Pressure, Pa. */
  P: number;
  Z: number;
  /** (dP/dD)_T, Pa m3/mol (= J/mol). */
  dPdD: number;
  /** (d2P/dD2)_T, Pa m6/mol2. */
  d2PdD2: number;
  /** (dP/dT)_D, Pa/K. */
  dPdT: number;
  /** d2P/(dT dD), Pa m3/(mol K). */
  d2PdTD: number;
  /** Internal energy, enthalpy, Gibbs and Helmholtz energies, J/mol (zero point: see index.ts). */
  U: number;
  H: number;
  G: number;
  A: number;
  /** Entropy, J/(mol K). */
  S: number;
  /** Isochoric and isobaric heat capacities, J/(mol K). */
  Cv: number;
  Cp: number;
  /** Speed of sound, m/s. */
  W: number;
  /** Joule-Thomson coefficient, K/Pa. */
  JT: number;
  /** Isentropic exponent -(V/P)(dP/dV)_S. */
  kappa: number;
  /** Molar mass, kg/mol. */
  M: number;
}
