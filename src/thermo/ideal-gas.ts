/**
 * Ideal-gas thermochemistry of one component on the formation basis:
 *   h(T) = hf + integral from 298.15 K to T of Cp dT                       (J/mol)
 *   s(T) = (hf - gf) / 298.15 + integral from 298.15 K to T of Cp/T dT      (J/(mol K), at 1 bar)
 * so that g(T) = h(T) - T s(T) equals gf at 298.15 K and d(g/T)/dT = -h/T^2 holds exactly
 * (the van 't Hoff equation integrated with the heat-capacity correlation, not a constant heat
 * of reaction). Mixture values add the ideal entropy of mixing and -R ln(P / 1 bar).
 * The Cp form is the one of types.ts (CpCorrelation); the integrals are analytic.
 */
import { R } from './constants.js';
import type { ComponentData, CpCorrelation, CpPiece } from './types.js';

/** Reference temperature of formation data, K. */
export const T_REF = 298.15;
/** Standard pressure of the entropy and Gibbs data, Pa (1 bar). */
export const P_STD = 1e5;

function pieceAt(c: CpCorrelation, T: number): CpPiece {
  const p = c.pieces;
  for (let k = 0; k < p.length - 1; k++) if (T < p[k].Tmax) return p[k];
  return p[p.length - 1];
}

function pieceCp(c: CpPiece, T: number): number {
  const a = c.a;
  let v = 0;
  for (let k = a.length - 1; k >= 0; k--) v = v * T + a[k];
  return v + (c.d ?? 0) / (T * T);
}

function pieceIntegral(c: CpPiece, T0: number, T: number): number {
  const a = c.a;
  let v = 0;
  let p0 = T0;
  let p = T;
  for (let k = 0; k < a.length; k++) {
    v += (a[k] * (p - p0)) / (k + 1);
    p0 *= T0;
    p *= T;
  }
  if (c.d) v += -c.d * (1 / T - 1 / T0);
  return v;
}

function pieceOverTIntegral(c: CpPiece, T0: number, T: number): number {
  const a = c.a;
  let v = a.length > 0 ? a[0] * Math.log(T / T0) : 0;
  let p0 = 1;
  let p = 1;
  for (let k = 1; k < a.length; k++) {
    p0 *= T0;
    p *= T;
    v += (a[k] * (p - p0)) / k;
  }
  if (c.d) v += -0.5 * c.d * (1 / (T * T) - 1 / (T0 * T0));
  return v;
}

/**
 * Integral of Cp/R (overT false) or Cp/(R T) (overT true) over [T0, T] across the pieces (each
 * piece on its own range; the end pieces extend beyond). One function with a flag rather than a
 * callback: the call stays monomorphic, so that the compiler inlines it and the numbers stay
 * unboxed (no allocation per call).
 */
function piecewise(c: CpCorrelation, T0: number, T: number, overT: boolean): number {
  // T below T0: minus the integral from T to T0 (no recursion, so that the call can be inlined)
  const from = T < T0 ? T : T0;
  const to = T < T0 ? T0 : T;
  const p = c.pieces;
  let v = 0;
  for (let k = 0; k < p.length; k++) {
    const lo = k === 0 ? -Infinity : p[k].Tmin;
    const hi = k === p.length - 1 ? Infinity : p[k].Tmax;
    const a = Math.max(from, lo);
    const b = Math.min(to, hi);
    if (b > a) v += overT ? pieceOverTIntegral(p[k], a, b) : pieceIntegral(p[k], a, b);
  }
  return T < T0 ? -v : v;
}

/** Cp/R at T. */
export function cpOverR(c: CpCorrelation, T: number): number {
  return pieceCp(pieceAt(c, T), T);
}

/** Integral of Cp/R dT from T0 to T (K). */
export function cpIntegral(c: CpCorrelation, T0: number, T: number): number {
  return piecewise(c, T0, T, false);
}

/** Integral of Cp/(R T) dT from T0 to T (K). */
export function cpOverTIntegral(c: CpCorrelation, T0: number, T: number): number {
  return piecewise(c, T0, T, true);
}

/** Whether a component has what the energy balance needs (cp and hf). */
export function hasEnthalpyData(c: ComponentData): boolean {
  return c.cp !== undefined && c.hf !== undefined;
}

/** Ideal-gas Cp, J/(mol K). */
export function cpIG(c: ComponentData, T: number): number {
  return R * cpOverR(c.cp!, T);
}

/** Ideal-gas enthalpy on the formation basis, J/mol. */
export function hIG(c: ComponentData, T: number): number {
  return c.hf! + R * cpIntegral(c.cp!, T_REF, T);
}

/** Ideal-gas entropy of the pure component at 1 bar on the formation basis, J/(mol K). */
export function sIG(c: ComponentData, T: number): number {
  const s0 = c.gf !== undefined && c.hf !== undefined ? (c.hf - c.gf) / T_REF : 0;
  return s0 + R * cpOverTIntegral(c.cp!, T_REF, T);
}

/** Ideal-gas Gibbs energy of the pure component at 1 bar, J/mol (equals gf at 298.15 K). */
export function gIG(c: ComponentData, T: number): number {
  return hIG(c, T) - T * sIG(c, T);
}

/** Whether T lies outside the correlation's range of validity. */
export function outsideRange(c: ComponentData, T: number): boolean {
  const p = c.cp?.pieces;
  return p !== undefined && p.length > 0 && (T < p[0].Tmin || T > p[p.length - 1].Tmax);
}
