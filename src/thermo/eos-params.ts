/**
 * Parameters of a generic two-parameter cubic equation of state
 *   P = RT/(V - b) - a(T) / ((V + d1 b)(V + d2 b))
 * (the common form of van der Waals-type cubics, e.g. Michelsen and Mollerup, Thermodynamic
 * Models: Fundamentals and Computational Aspects, 2nd ed., chapter 3).
 */

export interface CubicParameters {
  readonly name: 'SRK' | 'PR';
  readonly delta1: number;
  readonly delta2: number;
  /** a_c = omegaA R^2 Tc^2 / Pc. */
  readonly omegaA: number;
  /** b = omegaB R Tc / Pc. */
  readonly omegaB: number;
  /** Critical compressibility factor of the model. */
  readonly zc: number;
  /** alpha(T) = [1 + m(omega)(1 - sqrt(T/Tc))]^2. */
  readonly m: (omega: number) => number;
}

/**
 * Coefficients of the cubic in Z, Z^3 + c2 Z^2 + c1 Z + c0 = 0, with A = aP/(RT)^2, B = bP/(RT):
 *   c2 = (d1 + d2 - 1) B - 1
 *   c1 = A + d1 d2 B^2 - (d1 + d2) B (B + 1)
 *   c0 = -(A B + d1 d2 B^2 (B + 1))
 */
export function cubicCoefficients(d1: number, d2: number, A: number, B: number): [number, number, number] {
  const s = d1 + d2;
  const p = d1 * d2;
  return [(s - 1) * B - 1, A + p * B * B - s * B * (B + 1), -(A * B + p * B * B * (B + 1))];
}

/**
 * Omega_a, Omega_b and Zc from the critical conditions: at Tc, Pc (alpha = 1) the cubic has a
 * triple root Zc, i.e. c2 = -3 Zc, c1 = 3 Zc^2, c0 = -Zc^3. Solved for B = Omega_b by bisection.
 */
export function criticalConstants(d1: number, d2: number): { omegaA: number; omegaB: number; zc: number } {
  const s = d1 + d2;
  const p = d1 * d2;
  const h = (B: number): number => {
    const zc = (1 - (s - 1) * B) / 3;
    const A = 3 * zc * zc - p * B * B + s * B * (B + 1);
    return zc * zc * zc - A * B - p * B * B * (B + 1);
  };
  let lo = 1e-6;
  let hi = 0.25;
  const hlo = h(lo);
  if (hlo * h(hi) > 0) throw new Error('criticalConstants: no bracket');
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (h(mid) * hlo > 0) lo = mid;
    else hi = mid;
  }
  const B = 0.5 * (lo + hi);
  const zc = (1 - (s - 1) * B) / 3;
  const A = 3 * zc * zc - p * B * B + s * B * (B + 1);
  return { omegaA: A, omegaB: B, zc };
}
