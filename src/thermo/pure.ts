/**
 * Pure-component helpers on top of an equation of state: phase at (T, P) and the model's own
 * vapor pressure.
 */
import type { Eos } from './types.js';

export type PurePhase = 'vapor' | 'liquid' | 'supercritical';

function unitVector(n: number, i: number): Float64Array {
  const x = new Float64Array(n);
  x[i] = 1;
  return x;
}

function checkIndex(eos: Eos, i: number): void {
  if (!Number.isInteger(i) || i < 0 || i >= eos.n) throw new RangeError(`component index ${i} out of range 0..${eos.n - 1}`);
}

/**
 * Phase of pure component i at T, P.
 * - T >= Tc and P >= Pc: 'supercritical'; T >= Tc and P < Pc: 'vapor' (a gas above Tc).
 *   For SRK and PR the model's critical point is exactly the given (Tc, Pc).
 * - T < Tc: the root of lower Gibbs energy when the cubic has three roots (this is the same as
 *   comparing P with the model's vapor pressure: the liquid is stable above it), otherwise the
 *   single root, classified by the model's critical volume (see eos.ts).
 * For the ideal gas every state is 'vapor' below Tc, as the model has no liquid.
 */
export function purePhase(eos: Eos, i: number, T: number, P: number): PurePhase {
  checkIndex(eos, i);
  const c = eos.components[i];
  if (T >= c.Tc) return P >= c.Pc ? 'supercritical' : 'vapor';
  const r = eos.z(T, P, unitVector(eos.n, i), 'stable');
  return r.root;
}

export interface SaturationResult {
  status: 'converged' | 'not-converged';
  /** Vapor pressure of the model, Pa (NaN when T >= Tc or the model has no liquid). */
  P: number;
  /** Compressibility factors of the coexisting liquid and vapor. */
  zLiquid: number;
  zVapor: number;
  iterations: number;
  /** |ln phi_L - ln phi_V| at the returned P. */
  residual: number;
  note?: string;
}

/**
 * Vapor pressure of pure component i predicted by the equation of state at T < Tc: the
 * pressure where ln phi_L = ln phi_V. Newton on ln P, using d(ln phi)/d(ln P) = Z - 1 for a pure
 * fluid, so d(ln phi_L - ln phi_V)/d ln P = Z_L - Z_V. Start: Wilson's estimate
 * P = Pc exp(5.373 (1 + omega)(1 - Tc/T)) (Wilson, G. M., "A modified Redlich-Kwong equation of
 * state applicable to general physical data calculations", 65th AIChE National Meeting, 1968).
 * When the cubic has one root at the trial P, P is moved towards the three-root range.
 */
export function saturationPressure(eos: Eos, i: number, T: number, tol = 1e-12, maxIterations = 200): SaturationResult {
  checkIndex(eos, i);
  const c = eos.components[i];
  if (eos.name === 'ideal' || !(T < c.Tc)) {
    return { status: 'not-converged', P: NaN, zLiquid: NaN, zVapor: NaN, iterations: 0, residual: NaN, note: eos.name === 'ideal' ? 'the ideal gas has no liquid' : 'T is not below Tc' };
  }
  const x = unitVector(eos.n, i);
  const phiL = new Float64Array(eos.n);
  const phiV = new Float64Array(eos.n);
  let P = c.Pc * Math.exp(5.373 * (1 + c.omega) * (1 - c.Tc / T));
  if (!(P > 0) || !Number.isFinite(P)) P = c.Pc * 0.5;
  let g = NaN;
  let zl = NaN;
  let zv = NaN;
  // Bracket of the vapor pressure, narrowed by every evaluation: a single liquid-like root or
  // g < 0 means P is above it, a single gas-like root or g > 0 below it (g falls with P since
  // Z_L < Z_V). A step that would leave the bracket is replaced by its geometric mean, so
  // near Tc, where the three-root range is narrow, P cannot cycle over it.
  let lo = 0;
  let hi = Infinity;
  for (let it = 1; it <= maxIterations; it++) {
    const rl = eos.lnPhi(T, P, x, 'liquid', phiL);
    let next: number;
    if (rl.nRoots === 1) {
      // only one root: liquid-like means P is above the vapor spinodal, gas-like below the liquid one
      if (rl.root === 'liquid') hi = Math.min(hi, P);
      else lo = Math.max(lo, P);
      next = P * (rl.root === 'liquid' ? 0.8 : 1.25);
    } else {
      const rv = eos.lnPhi(T, P, x, 'vapor', phiV);
      zl = rl.Z;
      zv = rv.Z;
      g = phiL[i] - phiV[i];
      if (Math.abs(g) <= tol) return { status: 'converged', P, zLiquid: zl, zVapor: zv, iterations: it, residual: Math.abs(g) };
      if (g > 0) lo = Math.max(lo, P);
      else hi = Math.min(hi, P);
      let step = -g / (zl - zv);
      if (step > 0.5) step = 0.5;
      else if (step < -0.5) step = -0.5;
      next = P * Math.exp(step);
    }
    if (!(next > lo && next < hi)) next = lo > 0 && hi < Infinity ? Math.sqrt(lo * hi) : next;
    P = next;
  }
  return { status: 'not-converged', P, zLiquid: zl, zVapor: zv, iterations: maxIterations, residual: Math.abs(g), note: 'vapor-pressure iteration did not converge (close to Tc?)' };
}
