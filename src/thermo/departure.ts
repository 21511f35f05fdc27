/**
 * Residual (departure) properties of one phase from the cubic equations of state: the property
 * of the real fluid at T, P and composition x less that of the ideal-gas mixture at the same
 * T, P and x.
 *
 * Method: the residual Helmholtz energy of the generic two-parameter cubic
 *   P = RT/(V - b) - a(T) / ((V + d1 b)(V + d2 b))
 * (Michelsen and Mollerup, Thermodynamic Models: Fundamentals and Computational Aspects,
 * 2nd ed., chapter 3, where it is written F = A^r/(RT) = -n ln(1 - B/V) - D(T)/T f(V); the
 * same results for SRK and PR are tabulated in Poling, Prausnitz and O'Connell, The Properties
 * of Gases and Liquids, 5th ed., chapter 6) is
 *   A^R(T, V) = -RT ln(1 - b/V) - a/(b (d1 - d2)) ln((V + d1 b)/(V + d2 b)),
 * and its temperature and volume derivatives give, at the chosen root Z = PV/(RT), with
 * A = aP/(RT)^2, B = bP/(RT) and lambda = ln((Z + d1 B)/(Z + d2 B)) / ((d1 - d2) B)
 * (finite as B -> 0, limit 1/Z):
 *   G^R/(RT) = Z - 1 - ln(Z - B) - A lambda
 *   H^R/(RT) = Z - 1 - A (1 - T a'/a) lambda
 *   S^R/R    = ln(Z - B) + A (T a'/a) lambda
 *   Cv^R     = a'' P lambda / R                                   (= -T d2A^R/dT2 at fixed V)
 *   Cp^R     = Cv^R + T (dP/dT)_V^2 / (-(dP/dV)_T) - R
 *   (dP/dT)_V = R/(V - b) - a'/((V + d1 b)(V + d2 b))
 *   (dP/dV)_T = -RT/(V - b)^2 + a (2V + (d1 + d2) b)/((V + d1 b)(V + d2 b))^2
 * where a' = da/dT and a'' = d2a/dT2 of the mixture come from the alpha function and the k_ij
 * mixing rule analytically (CubicEos.aDerivatives). G^R/(RT) equals sum_i x_i ln phi_i of
 * eos.lnPhi, and H^R = -R T^2 d(G^R/RT)/dT at fixed P and x; the tests check both.
 *
 * S^R is taken at the same T and P (not at the same T and V): the ideal-gas reference is the
 * mixture at the pressure of the phase, which is what enthalpy.ts adds it to.
 *
 * For the ideal-gas model every residual property is zero. Other models are refused.
 */
import { R } from './constants.js';
import { CubicEos } from './eos.js';
import { eosWork, type Eos, type RootChoice } from './types.js';

/** Residual properties of one phase (SI: J/mol, J/(mol K)). */
export interface Departure {
  /** Compressibility factor of the root used. */
  Z: number;
  /** Which root it is (see types.ts RootResult). */
  root: 'vapor' | 'liquid';
  /** Residual enthalpy H - H^ig(T, P), J/mol. */
  H: number;
  /** Residual entropy S - S^ig(T, P), J/(mol K). */
  S: number;
  /** Residual Gibbs energy G - G^ig(T, P), J/mol. */
  G: number;
  /** Residual isobaric heat capacity Cp - Cp^ig, J/(mol K). */
  Cp: number;
}

/** A zeroed Departure to reuse with departureInto (one per caller, allocated once). */
export function newDeparture(): Departure {
  return { Z: 1, root: 'vapor', H: 0, S: 0, G: 0, Cp: 0 };
}

/** Scratch of aDerivatives, in the equation of state's work areas. */
function aScratch(eos: CubicEos): Float64Array {
  return eosWork(eos, 'departure', () => new Float64Array(4));
}

/**
 * Residual properties of composition x (mole fractions, normalised internally) at T (K),
 * P (Pa) on the chosen root, written into `out` (allocation-free). The root label is 'vapor'
 * or 'liquid' as eos.z gives it.
 */
export function departureInto(eos: Eos, T: number, P: number, x: ArrayLike<number>, which: RootChoice, out: Departure): Departure {
  if (eos.name === 'ideal') {
    // argument checks of the model itself
    eos.z(T, P, x, which);
    out.Z = 1;
    out.root = 'vapor';
    out.H = 0;
    out.S = 0;
    out.G = 0;
    out.Cp = 0;
    return out;
  }
  if (!(eos instanceof CubicEos)) {
    throw new RangeError(`departure functions are defined for the SRK, PR and ideal-gas models, not "${eos.name}"`);
  }
  const Z = eos.zValue(T, P, x, which);
  const root = eos.lastRoot;
  const d1 = eos.params.delta1;
  const d2 = eos.params.delta2;
  const ad = eos.aDerivatives(T, x, aScratch(eos));
  const a = ad[0];
  const a1 = ad[1];
  const a2 = ad[2];
  const b = ad[3];
  const RT = R * T;
  const A = (a * P) / (RT * RT);
  const B = (b * P) / RT;
  const den = Z + d2 * B;
  const u = ((d1 - d2) * B) / den;
  const lambda = (u === 0 ? 1 : Math.log1p(u) / u) / den;
  const lnZB = Math.log(Z - B);
  const Ta1a = (T * a1) / a;
  const gR = Z - 1 - lnZB - A * lambda;
  const hR = Z - 1 - A * (1 - Ta1a) * lambda;
  const sR = lnZB + A * Ta1a * lambda;
  // heat capacity
  const V = (Z * RT) / P;
  const q1 = V + d1 * b;
  const q2 = V + d2 * b;
  const q = q1 * q2;
  const dPdT = R / (V - b) - a1 / q;
  const dPdV = -RT / ((V - b) * (V - b)) + (a * (2 * V + (d1 + d2) * b)) / (q * q);
  const cvR = (a2 * P * lambda) / R;
  const cpR = cvR + (T * dPdT * dPdT) / -dPdV - R;
  out.Z = Z;
  out.root = root;
  out.G = gR * RT;
  out.H = hR * RT;
  out.S = sR * R;
  out.Cp = cpR;
  return out;
}

/** Residual properties of one phase (see departureInto); allocates the result. */
export function departure(eos: Eos, T: number, P: number, x: ArrayLike<number>, which: RootChoice = 'stable'): Departure {
  return departureInto(eos, T, P, x, which, newDeparture());
}
