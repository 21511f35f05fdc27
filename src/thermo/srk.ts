/**
 * Soave-Redlich-Kwong equation of state.
 * Soave, G., "Equilibrium constants from a modified Redlich-Kwong equation of state",
 * Chem. Eng. Sci. 27 (1972) 1197-1203:
 *   P = RT/(V - b) - a(T) / (V (V + b)),
 *   a_i(T) = Omega_a R^2 Tc^2 / Pc * alpha(T),  b_i = Omega_b R Tc / Pc,
 *   alpha = [1 + m (1 - sqrt(T/Tc))]^2,  m = 0.480 + 1.574 omega - 0.176 omega^2.
 * In the generic two-parameter form P = RT/(V-b) - a/((V + d1 b)(V + d2 b)): d1 = 1, d2 = 0.
 * Omega_a and Omega_b are computed from the critical conditions (dP/dV = d2P/dV2 = 0 at Tc, Pc),
 * which gives Omega_b = (2^(1/3) - 1)/3 = 0.086640 and Omega_a = 0.427480 (Soave's paper
 * quotes the rounded 0.08664 and 0.42747); exact values make the model's critical point sit
 * exactly at the given Tc, Pc.
 */
import type { CubicParameters } from './eos-params.js';
import { criticalConstants } from './eos-params.js';

const D1 = 1;
const D2 = 0;
const crit = criticalConstants(D1, D2);

export const SRK_PARAMETERS: CubicParameters = {
  name: 'SRK',
  delta1: D1,
  delta2: D2,
  omegaA: crit.omegaA,
  omegaB: crit.omegaB,
  zc: crit.zc,
  m: (omega: number): number => 0.48 + (1.574 - 0.176 * omega) * omega,
};
