import { describe, expect, it } from 'vitest';
import type { ComponentData } from '../../src/thermo/types.js';
import { makeEos } from '../../src/thermo/eos.js';
import { stabilityTest } from '../../src/thermo/stability.js';
import { flashTP } from '../../src/thermo/flash.js';
import { wilsonK } from '../../src/thermo/wilson.js';

// Component constants: Smith, Van Ness and Abbott, Introduction to Chemical Engineering
// Thermodynamics, 7th ed., Table B.1 (Tc K, Pc bar, omega).
const comp = (id: string, Tc: number, PcBar: number, omega: number): ComponentData =>
  ({ id, name: id, formula: id, MW: 0.01, Tc, Pc: PcBar * 1e5, omega, source: 'SVA 7th ed., Table B.1' });
const H2 = comp('H2', 33.19, 13.13, -0.216);
const N2 = comp('N2', 126.2, 34.0, 0.038);
const CO2 = comp('CO2', 304.2, 73.83, 0.224);
const H2O = comp('H2O', 647.1, 220.55, 0.345);
const MeOH = comp('CH3OH', 512.6, 80.97, 0.564);
const CH4 = comp('CH4', 190.6, 45.99, 0.012);
const nC4 = comp('nC4H10', 425.1, 37.96, 0.2);
const LOOP = [H2, N2, CO2, H2O, MeOH];

/** Tangent-plane distance of trial w against feed z, computed directly (Michelsen 1982, eq. 4). */
function tpdOf(eos: ReturnType<typeof makeEos>, T: number, P: number, z: ArrayLike<number>, w: ArrayLike<number>): number {
  const n = eos.n;
  const pz = new Float64Array(n), pw = new Float64Array(n);
  eos.lnPhi(T, P, z, 'stable', pz);
  eos.lnPhi(T, P, w, 'stable', pw);
  let s = 0;
  for (let i = 0; i < n; i++) if (w[i] > 0) s += w[i] * (Math.log(w[i]) + pw[i] - Math.log(z[i]) - pz[i]);
  return s;
}

describe('Wilson K', () => {
  it('matches the formula by hand for n-butane at 350 K, 9.4573 bar', () => {
    // ln K = ln(Pc/P) + 5.373 (1 + omega)(1 - Tc/T) (Wilson 1968)
    const K = wilsonK([nC4], 350, 9.4573e5, new Float64Array(1))[0];
    expect(K).toBeCloseTo((37.96 / 9.4573) * Math.exp(5.373 * 1.2 * (1 - 425.1 / 350)), 12);
  });
});

describe('tangent-plane stability test (Michelsen 1982)', () => {
  it('finds the methanol-loop condenser feed unstable, with a usable K', () => {
    for (const name of ['SRK', 'PR'] as const) {
      const eos = makeEos(name, LOOP);
      const z = [0.7, 0.05, 0.05, 0.05, 0.15];
      const r = stabilityTest(eos, 313.15, 30e5, z);
      expect(r.stable).toBe(false);
      expect(r.tpd).toBeLessThan(-0.1);
      // hydrogen to the vapor, water to the liquid (the lowest-tpd trial here is water-rich)
      expect(r.K![0]).toBeGreaterThan(1);
      expect(r.K![3]).toBeLessThan(1);
      // the reported tpd is the tangent-plane distance of the reported trial phase
      expect(tpdOf(eos, 313.15, 30e5, z, r.trial!)).toBeCloseTo(r.tpd, 8);
    }
  });

  it('finds hydrogen + nitrogen at 300 K, 10 bar stable', () => {
    const eos = makeEos('PR', LOOP);
    const r = stabilityTest(eos, 300, 10e5, [0.75, 0.25, 0, 0, 0]);
    expect(r.stable).toBe(true);
    expect(r.tpd).toBeGreaterThanOrEqual(-1e-10);
    expect(r.K).toBeUndefined();
  });

  it('a pure component is stable', () => {
    const eos = makeEos('SRK', LOOP);
    expect(stabilityTest(eos, 300, 10e5, [0, 0, 0, 1, 0]).stable).toBe(true);
  });

  it('agrees with the flash for a binary: unstable between x and y, stable outside', () => {
    // Methane + n-butane, SRK, 310 K, 60 bar (phase rule: x, y fixed at fixed T, P).
    const eos = makeEos('SRK', [CH4, nC4]);
    const f = flashTP(eos, 310, 60e5, [0.5, 0.5]);
    expect(f.phase).toBe('two-phase');
    const xl = f.x[0], yv = f.y[0];
    for (const zc of [xl + 0.02, 0.5, yv - 0.02]) expect(stabilityTest(eos, 310, 60e5, [zc, 1 - zc]).stable).toBe(false);
    for (const zc of [xl - 0.02, 0.1, yv + 0.02, 0.99]) expect(stabilityTest(eos, 310, 60e5, [zc, 1 - zc]).stable).toBe(true);
  });

  it('each equilibrium phase touches the tangent plane of the other (tpd = 0)', () => {
    // At equilibrium the tangent plane of the liquid passes through the vapor: tpd(y; x) = 0.
    const eos = makeEos('PR', LOOP);
    const f = flashTP(eos, 313.15, 30e5, [0.7, 0.05, 0.05, 0.05, 0.15]);
    expect(Math.abs(tpdOf(eos, 313.15, 30e5, f.x, f.y))).toBeLessThan(1e-9);
    expect(Math.abs(tpdOf(eos, 313.15, 30e5, f.y, f.x))).toBeLessThan(1e-9);
  });

  it('both phases of the converged condenser split are stable: no third phase', () => {
    // Michelsen 1982: a phase split is the equilibrium when no phase of it is unstable.
    for (const name of ['SRK', 'PR'] as const) {
      const eos = makeEos(name, LOOP);
      const f = flashTP(eos, 313.15, 30e5, [0.7, 0.05, 0.05, 0.05, 0.15]);
      expect(stabilityTest(eos, 313.15, 30e5, f.x).stable).toBe(true);
      expect(stabilityTest(eos, 313.15, 30e5, f.y).stable).toBe(true);
    }
  });

  it('ignores components absent from the feed', () => {
    const eos = makeEos('SRK', LOOP);
    const r = stabilityTest(eos, 313.15, 30e5, [0.8, 0, 0, 0, 0.2]);
    expect(r.stable).toBe(false);
    expect(r.trial![1]).toBe(0);
    for (const k of r.K!) expect(Number.isFinite(k)).toBe(true);
  });

  it('rejects bad compositions', () => {
    const eos = makeEos('SRK', LOOP);
    expect(() => stabilityTest(eos, 300, 1e5, [1, 0])).toThrow(/entries/);
    expect(() => stabilityTest(eos, 300, 1e5, [-1, 1, 1, 0, 0])).toThrow(/mole fraction/);
  });
});
