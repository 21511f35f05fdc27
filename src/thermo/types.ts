/** Shared thermodynamic types. SI throughout: K, Pa, kg/mol, m3/mol. */

/** Constants of one component, as the equations of state need them. */
export interface ComponentData {
  /** Identifier used in flowsheet files, e.g. "H2", "CH3OH", "nC4H10". */
  id: string;
  name: string;
  /** Hill-style or condensed formula parsed for element balances, e.g. "CH3OH". */
  formula: string;
  /** Molar mass, kg/mol. */
  MW: number;
  /** Critical temperature, K. */
  Tc: number;
  /** Critical pressure, Pa. */
  Pc: number;
  /** Acentric factor (dimensionless). */
  omega: number;
  /** Where the row comes from (author, title, edition, table), "(from memory)" where recalled. */
  source: string;
  /** Ideal-gas heat capacity (energy balances); absent for a component without data. */
  cp?: CpCorrelation;
  /** Standard enthalpy of formation of the ideal gas at 298.15 K, J/mol. */
  hf?: number;
  /** Standard Gibbs energy of formation of the ideal gas at 298.15 K and 1 bar, J/mol. */
  gf?: number;
  /** Where cp, hf and gf come from (author, title, edition, table), "(from memory)" where recalled. */
  thermoSource?: string;
}

/**
 * Ideal-gas heat capacity as contiguous pieces in T, each
 *   Cp/R = a[0] + a[1] T + a[2] T^2 + a[3] T^3 + a[4] T^4 + d / T^2      (T in K)
 * (a may be shorter; missing terms are zero). One piece covers the polynomial of Poling,
 * Prausnitz and O'Connell (Appendix A) and the A + BT + CT^2 + D/T^2 form of Smith, Van Ness
 * and Abbott (Appendix C); two pieces cover the NASA 7-coefficient polynomials and, rescaled,
 * the Shomate ranges of the NIST WebBook. Below the first piece or above the last, the end
 * piece is used and the output says the correlation is outside its range.
 */
export interface CpPiece {
  a: readonly number[];
  d?: number;
  /** Range of this piece, K. */
  Tmin: number;
  Tmax: number;
}

export interface CpCorrelation {
  /** In increasing T, each piece's Tmax the next one's Tmin. */
  pieces: readonly CpPiece[];
}
export type EosName = 'SRK' | 'PR' | 'ideal';

/** Which root of the cubic to take. 'stable' takes the one with the lower Gibbs energy. */
export type RootChoice = 'vapor' | 'liquid' | 'stable';

export interface RootResult {
  /** Compressibility factor of the chosen root. */
  Z: number;
  /** Which root it is: the largest ('vapor') or the smallest ('liquid'); 'vapor' when there is one real root and it is gas-like. */
  root: 'vapor' | 'liquid';
  /** Number of real roots above B (1 or 3). */
  nRoots: 1 | 3;
  /** Dimensionless mixture parameters of the cubic. */
  A: number;
  B: number;
}

/**
 * Work areas of the routines that compute with one equation of state (flash, stability test,
 * departure functions, enthalpies...): arrays made on first use and reused by every call, by
 * routine name. Scratch, never answers. They live in the equation's own object, which its
 * caller owns (a runtime, a study, a test), so that no module keeps state.
 */
export type EosWork = Record<string, unknown>;

/** The work area `key` of an equation of state, made by `make` on first use or when `fits` refuses it. */
export function eosWork<T>(eos: Eos, key: string, make: () => T, fits?: (w: T) => boolean): T {
  const work = eos.work;
  let w = work[key] as T | undefined;
  if (w === undefined || (fits !== undefined && !fits(w))) {
    w = make();
    work[key] = w;
  }
  return w;
}

/**
 * An equation of state prepared for one set of components (constants that do not change with
 * T, P or composition are computed once). Every method is allocation-free in its hot path when
 * the caller passes the output arrays.
 */
export interface Eos {
  readonly name: EosName;
  readonly n: number;
  readonly components: readonly ComponentData[];
  /** Work areas of the routines that use this equation (see EosWork). */
  readonly work: EosWork;
  /** Compressibility factor of composition x (mole fractions, length n) at T (K), P (Pa). */
  z(T: number, P: number, x: ArrayLike<number>, which?: RootChoice): RootResult;
  /** Molar volume, m3/mol. */
  molarVolume(T: number, P: number, x: ArrayLike<number>, which?: RootChoice): number;
  /** ln of the fugacity coefficients of every component, written to out; returns the root used. */
  lnPhi(T: number, P: number, x: ArrayLike<number>, which: RootChoice, out: Float64Array): RootResult;
}
