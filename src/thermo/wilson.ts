/**
 * Wilson's estimate of equilibrium ratios (Wilson, G. M., "A modified Redlich-Kwong equation of
 * state, applicable to general physical data calculations", paper 15C, 65th AIChE National
 * Meeting, Cleveland, 1968; as used in Michelsen, Fluid Phase Equilibria 9 (1982) 1):
 *   ln K_i = ln(Pc_i / P) + 5.373 (1 + omega_i)(1 - Tc_i / T).
 */
import type { ComponentData } from './types.js';

export function wilsonK(comps: readonly ComponentData[], T: number, P: number, out: Float64Array): Float64Array {
  for (let i = 0; i < comps.length; i++) {
    const c = comps[i];
    const k = (c.Pc / P) * Math.exp(5.373 * (1 + c.omega) * (1 - c.Tc / T));
    // keep K positive and finite for very heavy or very light components
    out[i] = k < 1e-200 ? 1e-200 : k > 1e200 ? 1e200 : k;
  }
  return out;
}
