/**
 * Component data for the enthalpy, entropy and PH/PS flash tests (not a test file).
 *
 * Critical constants and acentric factors: Smith, Van Ness and Abbott, Introduction to Chemical
 * Engineering Thermodynamics, 7th ed., Table B.1 (as in test/thermo/flash.test.ts).
 * Ideal-gas heat capacities: the same book, Table C.1, Cp/R = A + B T + C T^2 + D T^-2 with
 * T in K, valid 298 K to Tmax (from memory; the rows used here agree with several public
 * transcriptions of the table). Tmax as printed in the table is not used by the flashes except
 * through their search range, so every row is given 298.15 K to 1500 K.
 * Standard enthalpies and Gibbs energies of formation of the ideal gases at 298.15 K: the same
 * book, Table C.4 (from memory).
 */
import type { ComponentData, CpCorrelation } from '../../src/thermo/types.js';

const SOURCE = 'Smith, Van Ness and Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed., Table B.1';
const THERMO = 'Smith, Van Ness and Abbott, 7th ed., Tables C.1 and C.4 (from memory)';

/** Table C.1 row: Cp/R = A + B T + C T^2 + D / T^2. */
export function svaCp(A: number, B: number, C: number, D: number): CpCorrelation {
  return { pieces: [{ a: [A, B, C], d: D, Tmin: 298.15, Tmax: 1500 }] };
}

function comp(
  id: string, Tc: number, PcBar: number, omega: number, MW: number, cp: CpCorrelation, hf: number, gf: number,
): ComponentData {
  return { id, name: id, formula: id, MW, Tc, Pc: PcBar * 1e5, omega, source: SOURCE, cp, hf, gf, thermoSource: THERMO };
}

//                        Tc K    Pc bar  omega   kg/mol     Table C.1: A, B, C, D                   hf J/mol   gf J/mol
export const H2 = comp('H2', 33.19, 13.13, -0.216, 0.0020159, svaCp(3.249, 0.422e-3, 0, 0.083e5), 0, 0);
export const N2 = comp('N2', 126.2, 34.0, 0.038, 0.028014, svaCp(3.28, 0.593e-3, 0, 0.04e5), 0, 0);
export const CO2 = comp('CO2', 304.2, 73.83, 0.224, 0.04401, svaCp(5.457, 1.045e-3, 0, -1.157e5), -393509, -394359);
export const H2O = comp('H2O', 647.1, 220.55, 0.345, 0.018015, svaCp(3.47, 1.45e-3, 0, 0.121e5), -241818, -228572);
export const CH3OH = comp('CH3OH', 512.6, 80.97, 0.564, 0.032042, svaCp(2.211, 12.216e-3, -3.45e-6, 0), -200660, -161960);
export const CH4 = comp('CH4', 190.6, 45.99, 0.012, 0.016043, svaCp(1.702, 9.081e-3, -2.164e-6, 0), -74520, -50460);
export const C3H8 = comp('C3H8', 369.8, 42.48, 0.152, 0.044097, svaCp(1.213, 28.785e-3, -8.824e-6, 0), -104680, -24290);
export const NC4 = comp('nC4H10', 425.1, 37.96, 0.2, 0.058123, svaCp(1.935, 36.915e-3, -11.402e-6, 0), -125790, -16570);

/** Methanol-loop components, in this order. */
export const LOOP = [H2, CO2, CH3OH, H2O, N2];
/** Cold separator feed of a methanol loop (illustrative composition for the tests, not plant data). */
export const LOOP_FEED = [0.7, 0.05, 0.15, 0.05, 0.05];
