import { describe, expect, it } from 'vitest';
import type { ComponentData } from '../../src/thermo/types.js';
import { makeEos } from '../../src/thermo/eos.js';
import { flashTP, type FlashResult } from '../../src/thermo/flash.js';
import { solveRachfordRice, rachfordRiceCompositions } from '../../src/thermo/rachford-rice.js';
import { saturationPressure } from '../../src/thermo/pure.js';
import type { Eos } from '../../src/thermo/types.js';
import { findComponent } from '../../src/thermo/components.js';

// Component constants: Smith, Van Ness and Abbott, Introduction to Chemical Engineering
// Thermodynamics, 7th ed., Table B.1 (Tc K, Pc bar, omega).
const comp = (id: string, Tc: number, PcBar: number, omega: number, MW: number): ComponentData =>
  ({ id, name: id, formula: id, MW, Tc, Pc: PcBar * 1e5, omega, source: 'SVA 7th ed., Table B.1' });
const H2 = comp('H2', 33.19, 13.13, -0.216, 0.0020159);
const N2 = comp('N2', 126.2, 34.0, 0.038, 0.028014);
const CO2 = comp('CO2', 304.2, 73.83, 0.224, 0.04401);
const H2O = comp('H2O', 647.1, 220.55, 0.345, 0.018015);
const MeOH = comp('CH3OH', 512.6, 80.97, 0.564, 0.032042);
const CH4 = comp('CH4', 190.6, 45.99, 0.012, 0.016043);
const nC4 = comp('nC4H10', 425.1, 37.96, 0.2, 0.058123);
const nC5 = comp('nC5H12', 469.7, 33.7, 0.252, 0.072150);
const nC6 = comp('nC6H14', 507.6, 30.25, 0.301, 0.086177);

const LOOP = [H2, N2, CO2, H2O, MeOH];
/** Methanol-loop condenser feed (illustrative composition for the test, not plant data). */
const LOOP_FEED = [0.7, 0.05, 0.05, 0.05, 0.15];

/** Independent check of a two-phase answer: fugacity equality, mass balance, normalisation. */
function checkSplit(eos: Eos, T: number, P: number, z: number[], r: FlashResult): void {
  const n = eos.n;
  const pl = new Float64Array(n), pv = new Float64Array(n);
  eos.lnPhi(T, P, r.x, 'stable', pl);
  eos.lnPhi(T, P, r.y, 'stable', pv);
  let sx = 0, sy = 0;
  const zs = z.reduce((a, b) => a + b, 0);
  for (let i = 0; i < n; i++) {
    sx += r.x[i];
    sy += r.y[i];
    expect(Math.abs(r.beta * r.y[i] + (1 - r.beta) * r.x[i] - z[i] / zs)).toBeLessThan(1e-12);
    if (z[i] > 0) {
      const lnfV = Math.log(r.y[i]) + pv[i];
      const lnfL = Math.log(r.x[i]) + pl[i];
      expect(Math.abs(lnfV - lnfL)).toBeLessThan(1e-9);
    } else {
      expect(r.x[i]).toBe(0);
      expect(r.y[i]).toBe(0);
    }
    expect(Number.isFinite(r.K[i])).toBe(true);
  }
  expect(Math.abs(sx - 1)).toBeLessThan(1e-12);
  expect(Math.abs(sy - 1)).toBeLessThan(1e-12);
  expect(r.residual).toBeLessThanOrEqual(1e-10);
}

describe('Rachford-Rice', () => {
  it('solves a binary with a known root', () => {
    // z = (0.5, 0.5), K = (2, 0.5): 0.5/(1 + b) = 0.25/(1 - b/2) gives b = 0.5 (hand algebra)
    const r = solveRachfordRice([0.5, 0.5], [2, 0.5]);
    expect(r.kind).toBe('root');
    expect(r.status).toBe('converged');
    expect(r.beta).toBeCloseTo(0.5, 14);
  });

  it('returns negative-flash roots outside [0, 1]', () => {
    // z = (0.2, 0.8), K = (2, 0.5): 0.2/(1 + b) = 0.4/(1 - b/2) gives b = -0.4
    const r = solveRachfordRice([0.2, 0.8], [2, 0.5]);
    expect(r.beta).toBeCloseTo(-0.4, 14);
    // z = (0.9, 0.1): 0.9/(1 + b) = 0.05/(1 - b/2) gives 0.85 = 0.5 b, b = 1.7
    expect(solveRachfordRice([0.9, 0.1], [2, 0.5]).beta).toBeCloseTo(1.7, 12);
  });

  it('reports all-liquid and all-vapor K sets', () => {
    expect(solveRachfordRice([0.5, 0.5], [0.9, 0.2]).kind).toBe('all-liquid');
    expect(solveRachfordRice([0.5, 0.5], [1.1, 3]).kind).toBe('all-vapor');
    // a component with z = 0 does not count
    expect(solveRachfordRice([0.5, 0.5, 0], [0.9, 0.2, 50]).kind).toBe('all-liquid');
  });

  it('is robust for K spanning twelve decades (random cases)', () => {
    let seed = 7;
    const rnd = (): number => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const x = new Float64Array(6), y = new Float64Array(6);
    for (let t = 0; t < 500; t++) {
      const z = Array.from({ length: 6 }, () => rnd() + 1e-6);
      const zs = z.reduce((a, b) => a + b, 0);
      for (let i = 0; i < 6; i++) z[i] /= zs;
      const K = Array.from({ length: 6 }, () => Math.pow(10, 12 * rnd() - 6));
      K[0] = 1e6; K[5] = 1e-6;
      const r = solveRachfordRice(z, K);
      expect(r.kind).toBe('root');
      expect(r.status).toBe('converged');
      rachfordRiceCompositions(z, K, r.beta, x, y);
      let sx = 0, sy = 0;
      for (let i = 0; i < 6; i++) { sx += x[i]; sy += y[i]; expect(x[i]).toBeGreaterThan(0); }
      expect(Math.abs(sx - 1)).toBeLessThan(1e-11);
      expect(Math.abs(sy - 1)).toBeLessThan(1e-11);
    }
  });

  it('rejects non-positive K', () => {
    expect(() => solveRachfordRice([0.5, 0.5], [0, 2])).toThrow(/K\[0\]/);
  });
});

describe('flash: methanol-loop condenser (H2, N2, CO2, H2O, CH3OH at 313.15 K, 30 bar)', () => {
  const T = 313.15, P = 30e5;
  for (const name of ['SRK', 'PR'] as const) {
    it(`${name}: two phases, fugacities equal to 1e-9, mass balance to 1e-12`, () => {
      const eos = makeEos(name, LOOP);
      const r = flashTP(eos, T, P, LOOP_FEED);
      expect(r.status).toBe('converged');
      expect(r.phase).toBe('two-phase');
      expect(r.liquidLiquid).toBeUndefined();
      checkSplit(eos, T, P, LOOP_FEED, r);
      // light gases go to the vapor, methanol and water to the liquid
      expect(r.K[0]).toBeGreaterThan(50);
      expect(r.K[4]).toBeLessThan(0.1);
      expect(r.K[3]).toBeLessThan(0.1);
      expect(r.beta).toBeGreaterThan(0.7);
      expect(r.beta).toBeLessThan(0.9);
    });
  }

  it('restarting from the previous K converges at once, and in few steps after a small change', () => {
    const eos = makeEos('PR', LOOP);
    const cold = flashTP(eos, T, P, LOOP_FEED);
    const warm = flashTP(eos, T, P, LOOP_FEED, { K0: cold.K });
    expect(warm.method).toBe('from-K0');
    expect(warm.iterations).toBeLessThanOrEqual(1);
    expect(warm.beta).toBeCloseTo(cold.beta, 10);
    // next pass of a recycle loop: slightly different feed, T and P
    const z2 = [0.69, 0.05, 0.06, 0.05, 0.15];
    const warm2 = flashTP(eos, T + 2, P + 0.5e5, z2, { K0: cold.K });
    const cold2 = flashTP(eos, T + 2, P + 0.5e5, z2);
    expect(warm2.method).toBe('from-K0');
    expect(warm2.iterations).toBeLessThanOrEqual(10);
    expect(warm2.iterations).toBeLessThan(cold2.iterations);
    expect(warm2.beta).toBeCloseTo(cold2.beta, 9);
    for (let i = 0; i < 5; i++) expect(warm2.x[i]).toBeCloseTo(cold2.x[i], 9);
  });

  it('a useless start (K0 = 1) falls back to the stability test and gives the same answer', () => {
    const eos = makeEos('SRK', LOOP);
    const cold = flashTP(eos, T, P, LOOP_FEED);
    const r = flashTP(eos, T, P, LOOP_FEED, { K0: new Float64Array(5).fill(1) });
    expect(r.status).toBe('converged');
    expect(r.method).toBe('stability+split');
    expect(r.beta).toBeCloseTo(cold.beta, 10);
  });

  it('components absent from the feed give no NaN', () => {
    const eos = makeEos('PR', LOOP);
    const z = [0.75, 0, 0.05, 0.05, 0.15]; // no nitrogen
    const r = flashTP(eos, T, P, z);
    expect(r.phase).toBe('two-phase');
    checkSplit(eos, T, P, z, r);
    expect(r.K[1]).toBeGreaterThan(1); // nitrogen at infinite dilution is volatile
  });
});

describe('flash: single-phase detection', () => {
  for (const name of ['SRK', 'PR'] as const) {
    it(`${name}: H2/N2 at 300 K, 10 bar is all vapor`, () => {
      const eos = makeEos(name, LOOP);
      const r = flashTP(eos, 300, 10e5, [0.75, 0.25, 0, 0, 0]);
      expect(r.status).toBe('converged');
      expect(r.phase).toBe('vapor');
      expect(r.beta).toBe(1);
      expect(Array.from(r.y)).toEqual([0.75, 0.25, 0, 0, 0]);
    });
    it(`${name}: water at 300 K, 10 bar is all liquid`, () => {
      // vapor pressure of water at 300 K is 0.0354 bar (steam tables, from memory)
      const eos = makeEos(name, LOOP);
      const r = flashTP(eos, 300, 10e5, [0, 0, 0, 1, 0]);
      expect(r.phase).toBe('liquid');
      expect(r.beta).toBe(0);
    });
    it(`${name}: pure n-butane either side of its model vapor pressure at 350 K`, () => {
      const eos = makeEos(name, [CH4, nC4]);
      const ps = saturationPressure(eos, 1, 350).P;
      expect(flashTP(eos, 350, ps * 1.05, [0, 1]).phase).toBe('liquid');
      expect(flashTP(eos, 350, ps * 0.95, [0, 1]).phase).toBe('vapor');
    });
  }
  it('the ideal-gas model never makes liquid', () => {
    const r = flashTP(makeEos('ideal', LOOP), 300, 100e5, LOOP_FEED);
    expect(r.phase).toBe('vapor');
    expect(r.note).toMatch(/ideal/);
  });
});

describe('flash: binary phase-rule and bubble/dew consistency (methane + n-butane, SRK, 310 K, 60 bar)', () => {
  // Gibbs phase rule: a binary at fixed T and P in two phases has fixed x and y whatever the
  // feed; the feed only sets beta, by the lever rule beta = (z - x)/(y - x). Feeds just inside
  // x (y) are at their bubble (dew) point; feeds outside [x, y] are single phase.
  const eos = makeEos('SRK', [CH4, nC4]);
  const T = 310, P = 60e5;
  const ref = flashTP(eos, T, P, [0.5, 0.5]);
  it('x and y do not depend on the feed; beta follows the lever rule', () => {
    expect(ref.phase).toBe('two-phase');
    checkSplit(eos, T, P, [0.5, 0.5], ref);
    for (const zc of [0.35, 0.6, 0.8]) {
      const r = flashTP(eos, T, P, [zc, 1 - zc]);
      expect(r.phase).toBe('two-phase');
      expect(r.x[0]).toBeCloseTo(ref.x[0], 9);
      expect(r.y[0]).toBeCloseTo(ref.y[0], 9);
      expect(r.beta).toBeCloseTo((zc - ref.x[0]) / (ref.y[0] - ref.x[0]), 9);
    }
  });
  it('feeds at the phase compositions sit at their bubble and dew points', () => {
    const xl = ref.x[0], yv = ref.y[0];
    const nearBubble = flashTP(eos, T, P, [xl + 1e-4, 1 - xl - 1e-4]);
    expect(nearBubble.phase).toBe('two-phase');
    expect(nearBubble.beta).toBeGreaterThan(0);
    expect(nearBubble.beta).toBeLessThan(1e-3);
    const nearDew = flashTP(eos, T, P, [yv - 1e-4, 1 - yv + 1e-4]);
    expect(nearDew.phase).toBe('two-phase');
    expect(nearDew.beta).toBeGreaterThan(1 - 1e-3);
    expect(flashTP(eos, T, P, [xl - 0.01, 1 - xl + 0.01]).phase).toBe('liquid');
    expect(flashTP(eos, T, P, [yv + 0.01, 1 - yv - 0.01]).phase).toBe('vapor');
  });
});

describe('flash: Raoult-law limit at low pressure (n-pentane + n-hexane, 330 K)', () => {
  // Raoult's law (Smith, Van Ness and Abbott, 7th ed., section 10.4): for a near-ideal liquid
  // and an ideal gas, bubble P = sum x_i Psat_i and dew P = 1/sum(y_i/Psat_i). Alkanes of
  // similar size at about 1 bar follow it closely; the cubic's own Psat is used so only the
  // mixture behaviour is compared. Tolerance 2 % (gas non-ideality at 1-2 bar is about 1 %).
  for (const name of ['SRK', 'PR'] as const) {
    it(name, () => {
      const eos = makeEos(name, [nC5, nC6]);
      const T = 330;
      const z = [0.4, 0.6];
      const p1 = saturationPressure(eos, 0, T).P, p2 = saturationPressure(eos, 1, T).P;
      const bisect = (isAbove: (P: number) => boolean): number => {
        let lo = p2, hi = p1;
        for (let k = 0; k < 50; k++) {
          const m = 0.5 * (lo + hi);
          if (isAbove(m)) hi = m; else lo = m;
        }
        return 0.5 * (lo + hi);
      };
      const bubble = bisect((P) => flashTP(eos, T, P, z).phase === 'liquid');
      const dew = bisect((P) => flashTP(eos, T, P, z).phase !== 'vapor');
      expect(Math.abs(bubble / (z[0] * p1 + z[1] * p2) - 1)).toBeLessThan(0.02);
      expect(Math.abs(dew * (z[0] / p1 + z[1] / p2) - 1)).toBeLessThan(0.02);
      expect(bubble).toBeGreaterThan(dew);
    });
  }
});

describe('flash: five-component hydrocarbon mixture over a pressure sweep', () => {
  const eos = makeEos('SRK', [CH4, comp('C3H8', 369.8, 42.48, 0.152, 0.044097), nC4, nC5, nC6]);
  const z = [0.5, 0.15, 0.15, 0.1, 0.1];
  it('every converged split satisfies equilibrium; beta falls with pressure', () => {
    let prev = 1;
    for (const Pbar of [5, 20, 50, 80, 100]) {
      const r = flashTP(eos, 300, Pbar * 1e5, z);
      expect(r.status).toBe('converged');
      expect(r.phase).toBe('two-phase');
      checkSplit(eos, 300, Pbar * 1e5, z, r);
      expect(r.beta).toBeLessThan(prev);
      prev = r.beta;
    }
    // well above the bubble point: one liquid-like phase
    const hi = flashTP(eos, 300, 150e5, z);
    expect(hi.status).toBe('converged');
    expect(hi.phase).not.toBe('two-phase');
  });
});

describe('flash: near the mixture critical point (methane + n-butane, SRK, 310 K)', () => {
  // Every answer is either a converged split satisfying equilibrium, a converged single phase,
  // or flagged not-converged with a note; never a silent bad split.
  it('sweep over feed and pressure up to the critical region', () => {
    const eos = makeEos('SRK', [CH4, nC4]);
    let twoPhase = 0;
    for (let zc = 0.55; zc <= 0.8; zc += 0.05) {
      for (let Pbar = 100; Pbar <= 140; Pbar += 2.5) {
        const z = [zc, 1 - zc];
        const r = flashTP(eos, 310, Pbar * 1e5, z);
        if (r.status === 'not-converged') {
          expect(r.note).toBeTruthy();
          continue;
        }
        if (r.phase === 'two-phase') {
          twoPhase++;
          checkSplit(eos, 310, Pbar * 1e5, z, r);
          expect(r.trivial).toBeUndefined();
        } else {
          expect(Array.from(r.x)).toEqual(Array.from(r.y));
        }
      }
    }
    expect(twoPhase).toBeGreaterThan(10);
  });
});

describe('flash: model limits are reported, not hidden', () => {
  it('water + methanol with k_ij = 0 splits into two liquids and says so', () => {
    // Known weakness of van der Waals one-fluid mixing with k_ij = 0 for polar pairs.
    const eos = makeEos('PR', [H2O, MeOH]);
    const r = flashTP(eos, 300, 10e5, [0.6, 0.4]);
    expect(r.phase).toBe('two-phase');
    expect(r.liquidLiquid).toBe(true);
    expect(r.note).toMatch(/liquid-liquid/);
  });

  it('an iteration budget too small gives not-converged with a note', () => {
    const eos = makeEos('SRK', [CH4, nC4]);
    const r = flashTP(eos, 310, 110e5, [0.6, 0.4], { maxIterations: 2 });
    expect(r.status).toBe('not-converged');
    expect(r.note).toMatch(/did not converge/);
    expect(r.residual).toBeGreaterThan(1e-10);
  });

  it('rejects bad input with a clear message', () => {
    const eos = makeEos('SRK', [CH4, nC4]);
    expect(() => flashTP(eos, 0, 1e5, [0.5, 0.5])).toThrow(/temperature/);
    expect(() => flashTP(eos, 300, -1, [0.5, 0.5])).toThrow(/pressure/);
    expect(() => flashTP(eos, 300, 1e5, [0.5])).toThrow(/entries/);
    expect(() => flashTP(eos, 300, 1e5, [0.5, NaN])).toThrow(/mole fraction/);
    expect(() => flashTP(eos, 300, 1e5, [0, 0])).toThrow(/sum/);
    expect(() => flashTP(eos, 300, 1e5, [0.5, 0.5], { K0: new Float64Array(3) })).toThrow(/K0/);
  });
});

describe('flash: a stability trial of the wrong composition', () => {
  // The first pass of the methanol pilot at a conversion of 0.1 (no recycle yet): the cooler's feed
  // at 313.15 K and 30.11 bar. The tangent-plane test finds it unstable towards almost pure water
  // (tpd -2.37), but the liquid at equilibrium holds about 43 % methanol; the split started from that
  // trial left the two-phase region and the flash failed, between 310 K and 314 K where it
  // converged. Checked here by the equilibrium conditions themselves (equal fugacities, the
  // material balance; Michelsen, Fluid Phase Equilibria 9 (1982) 21-40) and by the vapor fraction
  // lying between its neighbours'.
  const eos = makeEos('SRK', ['H2', 'N2', 'CO2', 'H2O', 'CH3OH'].map((id) => findComponent(id)!));
  const z = [0.7067066493999499, 0.01320482318886297, 0.22916334060915308, 0.025462593401017013, 0.025462593401017013];
  const P = 29e5 + 101325;
  it('converges to the two-phase split at 313.15 K', () => {
    const r = flashTP(eos, 313.15, P, z);
    expect(r.status, r.note).toBe('converged');
    expect(r.phase).toBe('two-phase');
    checkSplit(eos, 313.15, P, z, r);
    const below = flashTP(eos, 310, P, z);
    const above = flashTP(eos, 314, P, z);
    expect(below.status).toBe('converged');
    expect(above.status).toBe('converged');
    expect(r.beta).toBeGreaterThan(below.beta);
    expect(r.beta).toBeLessThan(above.beta);
    expect(r.x[4]).toBeGreaterThan(0.3);
  });
});
