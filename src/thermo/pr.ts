/**
 * Peng-Robinson equation of state.
 * Peng, D.-Y. and Robinson, D. B., "A new two-constant equation of state",
 * Ind. Eng. Chem. Fundam. 15 (1976) 59-64:
 *   P = RT/(V - b) - a(T) / (V (V + b) + b (V - b)),
 *   a_i(T) = Omega_a R^2 Tc^2 / Pc * alpha(T),  b_i = Omega_b R Tc / Pc,
 *   alpha = [1 + m (1 - sqrt(T/Tc))]^2,  m = 0.37464 + 1.54226 omega - 0.26992 omega^2 (1976).
 * In the generic two-parameter form P = RT/(V-b) - a/((V + d1 b)(V + d2 b)):
 * d1 = 1 + sqrt 2, d2 = 1 - sqrt 2. Omega_a = 0.457236 and Omega_b = 0.077796 follow from the
 * critical conditions (the paper rounds them to 0.45724 and 0.07780).
 *
 * Option PR78: the later m(omega) for omega > 0.49 (Robinson and Peng, "The characterization of
 * the heptanes and heavier fractions for the GPA Peng-Robinson programs", GPA Research Report
 * RR-28, 1978): m = 0.379642 + 1.48503 omega - 0.164423 omega^2 + 0.016666 omega^3; below
 * omega = 0.49 it is the 1976 polynomial. Not used unless asked for.
 */
import type { CubicParameters } from './eos-params.js';
import { criticalConstants } from './eos-params.js';

const D1 = 1 + Math.SQRT2;
const D2 = 1 - Math.SQRT2;
const crit = criticalConstants(D1, D2);

export function prM1976(omega: number): number {
  return 0.37464 + (1.54226 - 0.26992 * omega) * omega;
}

export function prM1978(omega: number): number {
  if (omega <= 0.49) return prM1976(omega);
  return 0.379642 + (1.48503 + (-0.164423 + 0.016666 * omega) * omega) * omega;
}

export const PR_PARAMETERS: CubicParameters = {
  name: 'PR',
  delta1: D1,
  delta2: D2,
  omegaA: crit.omegaA,
  omegaB: crit.omegaB,
  zc: crit.zc,
  m: prM1976,
};

export const PR78_PARAMETERS: CubicParameters = { ...PR_PARAMETERS, m: prM1978 };
