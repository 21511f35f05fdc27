import { describe, expect, it } from 'vitest';
import { solveCubic, polishCubicRoot } from '../../src/thermo/cubic.js';
import { cubicCoefficients, criticalConstants } from '../../src/thermo/eos-params.js';
import { R } from '../../src/thermo/constants.js';

/** Residual of the monic cubic relative to the size of its terms. */
function relResidual(c2: number, c1: number, c0: number, z: number): number {
  const f = ((z + c2) * z + c1) * z + c0;
  const scale = Math.abs(z * z * z) + Math.abs(c2 * z * z) + Math.abs(c1 * z) + Math.abs(c0);
  return Math.abs(f) / scale;
}

describe('solveCubic', () => {
  const out = new Float64Array(3);

  it('finds three known roots of (z-1)(z-2)(z-3)', () => {
    // expanded: z^3 - 6 z^2 + 11 z - 6
    expect(solveCubic(-6, 11, -6, out)).toBe(3);
    expect(out[0]).toBeCloseTo(1, 14);
    expect(out[1]).toBeCloseTo(2, 14);
    expect(out[2]).toBeCloseTo(3, 14);
  });

  it('finds the single real root of z^3 + z - 2 = (z - 1)(z^2 + z + 2)', () => {
    expect(solveCubic(0, 1, -2, out)).toBe(1);
    expect(out[0]).toBeCloseTo(1, 14);
  });

  it('handles widely separated roots typical of a liquid/vapor cubic', () => {
    // roots 1e-3, 0.05, 0.95: coefficients from Vieta's formulas
    const r1 = 1e-3, r2 = 0.05, r3 = 0.95;
    const c2 = -(r1 + r2 + r3), c1 = r1 * r2 + r1 * r3 + r2 * r3, c0 = -r1 * r2 * r3;
    expect(solveCubic(c2, c1, c0, out)).toBe(3);
    expect(Math.abs(out[0] / r1 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(out[1] / r2 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(out[2] / r3 - 1)).toBeLessThan(1e-12);
  });

  it('finds two roots far below the third, where the discriminant is lost to rounding', () => {
    // roots 2e-10, 5e-10 and 1 (coefficients from Vieta's formulas): the shape of an equation of
    // state's cubic at a few mPa below its vapor pressure (liquid and middle roots of order B).
    // D = -(product of squared root differences)/108 is about -1e-21 here, beneath the rounding
    // of its two terms (about 1e-3 each), so D alone can report one root.
    for (const [r1, r2, r3] of [[2e-10, 5e-10, 1], [1e-12, 3e-12, 0.99999], [3e-9, 4e-9, 1]]) {
      const c2 = -(r1 + r2 + r3), c1 = r1 * r2 + r1 * r3 + r2 * r3, c0 = -r1 * r2 * r3;
      expect(solveCubic(c2, c1, c0, out), `${r1} ${r2} ${r3}`).toBe(3);
      expect(Math.abs(out[0] / r1 - 1)).toBeLessThan(1e-6);
      expect(Math.abs(out[1] / r2 - 1)).toBeLessThan(1e-6);
      expect(Math.abs(out[2] / r3 - 1)).toBeLessThan(1e-12);
    }
  });

  it('returns a triple root at the critical point of SRK and PR', () => {
    for (const [d1, d2] of [[1, 0], [1 + Math.SQRT2, 1 - Math.SQRT2]]) {
      const { omegaA, omegaB, zc } = criticalConstants(d1, d2);
      const [c2, c1, c0] = cubicCoefficients(d1, d2, omegaA, omegaB);
      const k = solveCubic(c2, c1, c0, out);
      for (let i = 0; i < k; i++) expect(Math.abs(out[i] - zc)).toBeLessThan(1e-4);
    }
  });

  it('critical constants match the published values', () => {
    // Soave 1972: Omega_a = 0.42747, Omega_b = 0.08664, Zc = 1/3
    const srk = criticalConstants(1, 0);
    expect(srk.omegaB).toBeCloseTo((Math.cbrt(2) - 1) / 3, 12);
    expect(srk.omegaA).toBeCloseTo(0.42748, 5);
    expect(srk.zc).toBeCloseTo(1 / 3, 12);
    // Peng and Robinson 1976: Omega_a = 0.45724, Omega_b = 0.07780, Zc = 0.307
    const pr = criticalConstants(1 + Math.SQRT2, 1 - Math.SQRT2);
    expect(pr.omegaA).toBeCloseTo(0.45724, 5);
    expect(pr.omegaB).toBeCloseTo(0.0778, 5);
    expect(pr.zc).toBeCloseTo(0.3074, 4);
  });

  it('polished roots satisfy the cubic to rounding over random cubics', () => {
    let seed = 12345;
    const rnd = (): number => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let t = 0; t < 2000; t++) {
      const A = 2 * rnd();
      const B = 0.3 * rnd();
      const [c2, c1, c0] = cubicCoefficients(1 + Math.SQRT2, 1 - Math.SQRT2, A, B);
      const k = solveCubic(c2, c1, c0, out);
      for (let i = 0; i < k; i++) expect(relResidual(c2, c1, c0, out[i])).toBeLessThan(1e-13);
      for (let i = 1; i < k; i++) expect(out[i]).toBeGreaterThanOrEqual(out[i - 1]);
    }
  });

  it('polishCubicRoot moves a rough estimate onto the root', () => {
    expect(polishCubicRoot(-6, 11, -6, 2.9)).toBeCloseTo(3, 14);
  });

  it('reproduces the Redlich-Kwong volumes of n-butane at 350 K, 9.4573 bar', () => {
    // Smith, Van Ness and Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
    // Example 3.9 (Redlich/Kwong): saturated vapor 2555 cm3/mol (Z = 0.8305), saturated liquid
    // 133.3 cm3/mol (Z = 0.04331). Constants from SVA Table B.1: Tc = 425.1 K, Pc = 37.96 bar.
    // Redlich-Kwong is the cubic with d1 = 1, d2 = 0 and alpha = Tr^-1/2 (Redlich and Kwong,
    // Chem. Rev. 44 (1949) 233); it exercises the cubic solver independently of srk.ts.
    const T = 350, P = 9.4573e5, Tc = 425.1, Pc = 37.96e5;
    const { omegaA, omegaB } = criticalConstants(1, 0);
    const A = omegaA * Math.pow(T / Tc, -0.5) * (P / Pc) / ((T / Tc) * (T / Tc));
    const B = omegaB * (P / Pc) / (T / Tc);
    const [c2, c1, c0] = cubicCoefficients(1, 0, A, B);
    expect(solveCubic(c2, c1, c0, out)).toBe(3);
    const vL = (out[0] * R * T) / P * 1e6;
    const vV = (out[2] * R * T) / P * 1e6;
    expect(vV).toBeCloseTo(2555, -0.3); // within 1 cm3/mol (4 figures)
    expect(vL).toBeCloseTo(133.3, 1); // within 0.05 cm3/mol
    expect(out[2]).toBeCloseTo(0.8305, 4);
    expect(out[0]).toBeCloseTo(0.04331, 5);
  });
});
