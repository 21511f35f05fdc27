import { describe, expect, it } from 'vitest';
import type { ComponentData } from '../../src/thermo/types.js';
import { makeEos } from '../../src/thermo/eos.js';
import { R } from '../../src/thermo/constants.js';
import { purePhase, saturationPressure } from '../../src/thermo/pure.js';

// Component constants for these tests, with their source.
// Smith, Van Ness and Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
// Table B.1 (Tc, Pc, omega); molar masses from the same table.
const nButane: ComponentData = { id: 'nC4H10', name: 'n-butane', formula: 'C4H10', MW: 0.058123, Tc: 425.1, Pc: 37.96e5, omega: 0.2, source: 'SVA 7th ed., Table B.1' };
const nitrogen: ComponentData = { id: 'N2', name: 'nitrogen', formula: 'N2', MW: 0.028014, Tc: 126.2, Pc: 34.0e5, omega: 0.038, source: 'SVA 7th ed., Table B.1' };
const methane: ComponentData = { id: 'CH4', name: 'methane', formula: 'CH4', MW: 0.016043, Tc: 190.6, Pc: 45.99e5, omega: 0.012, source: 'SVA 7th ed., Table B.1' };
const carbonDioxide: ComponentData = { id: 'CO2', name: 'carbon dioxide', formula: 'CO2', MW: 0.04401, Tc: 304.2, Pc: 73.83e5, omega: 0.224, source: 'SVA 7th ed., Table B.1' };
const hydrogen: ComponentData = { id: 'H2', name: 'hydrogen', formula: 'H2', MW: 0.0020159, Tc: 33.19, Pc: 13.13e5, omega: -0.216, source: 'SVA 7th ed., Table B.1' };
const water: ComponentData = { id: 'H2O', name: 'water', formula: 'H2O', MW: 0.018015, Tc: 647.1, Pc: 220.55e5, omega: 0.345, source: 'SVA 7th ed., Table B.1' };
const methanol: ComponentData = { id: 'CH3OH', name: 'methanol', formula: 'CH3OH', MW: 0.032042, Tc: 512.6, Pc: 80.97e5, omega: 0.564, source: 'SVA 7th ed., Table B.1' };
/** A simple fluid (omega = 0) with arbitrary Tc, Pc: Z depends only on Tr, Pr. */
const simpleFluid = (omega = 0): ComponentData => ({ id: 'S', name: 'simple fluid', formula: 'X', MW: 0.01, Tc: 100, Pc: 1e6, omega, source: 'corresponding-states test fluid' });

const cm3 = (v: number): number => v * 1e6;

describe('saturated n-butane, 350 K, 9.4573 bar', () => {
  // Smith, Van Ness and Abbott, 7th ed., section 3.6, table after Example 3.9 comparing cubic
  // equations for n-butane at 350 K and its vapor pressure 9.4573 bar (from memory):
  //   SRK: V_vap 2520 cm3/mol, V_liq 127.8 cm3/mol;  PR: V_vap 2486 cm3/mol, V_liq 112.6 cm3/mol;
  //   experiment: 2482 and 115.0 cm3/mol. (The RK figures 2555 and 133.3 of Example 3.9 itself
  //   are checked in cubic.test.ts.)
  const T = 350, P = 9.4573e5;
  it('SRK', () => {
    const eos = makeEos('SRK', [nButane]);
    const r = eos.z(T, P, [1], 'vapor');
    expect(r.nRoots).toBe(3);
    expect(cm3(eos.molarVolume(T, P, [1], 'vapor'))).toBeCloseTo(2520, -0.3); // computed 2520.4
    expect(cm3(eos.molarVolume(T, P, [1], 'liquid'))).toBeCloseTo(127.8, 1); // computed 127.82
  });
  it('PR', () => {
    const eos = makeEos('PR', [nButane]);
    expect(cm3(eos.molarVolume(T, P, [1], 'vapor'))).toBeCloseTo(2486, -0.3); // computed 2486.5
    expect(cm3(eos.molarVolume(T, P, [1], 'liquid'))).toBeCloseTo(112.6, 1); // computed 112.60
  });
  it('the models reproduce the vapor pressure 9.4573 bar (SVA Example 3.9) within 1.5 %', () => {
    // SRK and PR were fitted to vapor pressures through m(omega); 1-2 % is their usual accuracy
    // for light hydrocarbons (Reid, Prausnitz and Poling, The Properties of Gases and Liquids,
    // 4th ed., chapter 3, common practice).
    for (const name of ['SRK', 'PR'] as const) {
      const s = saturationPressure(makeEos(name, [nButane]), 0, T);
      expect(s.status).toBe('converged');
      expect(Math.abs(s.P / P - 1)).toBeLessThan(0.015); // SRK 9.588 bar, PR 9.468 bar
      expect(s.residual).toBeLessThan(1e-12);
    }
  });
});

describe('acentric factor definition', () => {
  // Pitzer's definition omega = -1 - log10(Psat/Pc) at Tr = 0.7 (Pitzer et al., J. Am. Chem. Soc.
  // 77 (1955) 3433); Soave 1972 and Peng-Robinson 1976 fitted m(omega) so that the model
  // reproduces it. Tolerance 0.01 in omega (the fits are not exact).
  for (const name of ['SRK', 'PR'] as const) {
    for (const omega of [0, 0.1, 0.2, 0.3, 0.4]) {
      it(`${name}, omega = ${omega}`, () => {
        const eos = makeEos(name, [simpleFluid(omega)]);
        const s = saturationPressure(eos, 0, 70);
        expect(s.status).toBe('converged');
        expect(Math.abs(-1 - Math.log10(s.P / 1e6) - omega)).toBeLessThan(0.01);
      });
    }
  }
});

describe('densities against the NIST Chemistry WebBook', () => {
  // NIST Chemistry WebBook, Thermophysical Properties of Fluid Systems (Lemmon, McLinden and
  // Friend, NIST Standard Reference Database 69), reference equations of state (Span et al. 2000
  // for N2, Setzmann and Wagner 1991 for CH4, Span and Wagner 1996 for CO2). Densities in kg/m3,
  // all (from memory); they agree to 0.3 % with the Lee-Kesler three-parameter correlation.
  // Tolerances: away from the critical point two-parameter cubics give gas densities within
  // 1-3 % (PR somewhat dense, SRK somewhat light); near it (CO2 at Tr = 1.15, Pr = 1.35) the
  // error grows towards Zc(model)/Zc(true) - 1 (SRK 1/3 vs 0.274, PR 0.307 vs 0.274), so up
  // to 8 % is allowed there; the recalled value itself is uncertain by about 2 % at that state.
  const cases: Array<[ComponentData, number, number, number, number, number]> = [
    // comp, T K, P bar, rho kg/m3 (from memory), tol SRK, tol PR
    [nitrogen, 300, 10, 11.25, 0.01, 0.01],
    [nitrogen, 300, 100, 111.7, 0.025, 0.025],
    [methane, 300, 50, 34.9, 0.02, 0.03],
    [carbonDioxide, 300, 20, 39.5, 0.02, 0.02],
    [carbonDioxide, 350, 100, 233, 0.08, 0.05],
  ];
  for (const [c, T, Pbar, rho, tolSrk, tolPr] of cases) {
    for (const name of ['SRK', 'PR'] as const) {
      it(`${name} ${c.id} ${T} K ${Pbar} bar`, () => {
        const eos = makeEos(name, [c]);
        const v = eos.molarVolume(T, Pbar * 1e5, [1]);
        const rhoCalc = c.MW / v;
        expect(Math.abs(rhoCalc / rho - 1)).toBeLessThan(name === 'SRK' ? tolSrk : tolPr);
      });
    }
  }
});

describe('Lee-Kesler simple-fluid Z0', () => {
  // Lee and Kesler, AIChE J. 21 (1975) 510, simple-fluid compressibility Z0, tabulated in Smith,
  // Van Ness and Abbott, 7th ed., Appendix E, Tables E.1/E.3. Values (from memory) cross-checked
  // by evaluating the Lee-Kesler simple-fluid equation (constants of Lee and Kesler Table 1, also
  // from memory) to about 0.3 %. Two-parameter cubics with omega = 0 deviate from Z0 by up to a
  // few percent in this range (PR systematically low, SRK high); tolerance 4 %.
  const points: Array<[number, number, number]> = [
    // Tr, Pr, Z0
    [1.2, 1.0, 0.786],
    [1.5, 1.0, 0.910],
    [2.0, 1.0, 0.975],
    [1.5, 2.0, 0.833],
    [2.0, 2.0, 0.960],
    [3.0, 5.0, 1.064],
  ];
  for (const name of ['SRK', 'PR'] as const) {
    it(name, () => {
      const eos = makeEos(name, [simpleFluid()]);
      for (const [Tr, Pr, z0] of points) {
        const z = eos.zValue(Tr * 100, Pr * 1e6, [1]);
        expect(Math.abs(z / z0 - 1)).toBeLessThan(0.04);
      }
    });
  }
});

describe('low-pressure limit', () => {
  it('Z -> 1 and ln phi -> 0 as P -> 0; molar volume -> RT/P', () => {
    for (const name of ['SRK', 'PR', 'ideal'] as const) {
      const eos = makeEos(name, [methane, nitrogen]);
      const out = new Float64Array(2);
      for (const P of [1e3, 1, 1e-3]) {
        const r = eos.lnPhi(300, P, [0.5, 0.5], 'stable', out);
        expect(Math.abs(r.Z - 1)).toBeLessThan(P * 1e-7);
        expect(Math.abs(out[0])).toBeLessThan(P * 1e-7);
        expect(Math.abs(eos.molarVolume(300, P, [0.5, 0.5]) / ((R * 300) / P) - 1)).toBeLessThan(P * 1e-7);
      }
    }
  });

  it('second virial coefficient of the model: Z = 1 + (b - a/RT) P/RT + O(P^2)', () => {
    // Exact low-density expansion of P = RT/(V-b) - a/((V+d1 b)(V+d2 b)).
    const c = methane, T = 300;
    for (const [name, oa, ob, m] of [
      ['SRK', 0.42748023354, 0.08664034996, 0.48 + 1.574 * c.omega - 0.176 * c.omega ** 2],
      ['PR', 0.45723552892, 0.07779607390, 0.37464 + 1.54226 * c.omega - 0.26992 * c.omega ** 2],
    ] as const) {
      const alpha = (1 + m * (1 - Math.sqrt(T / c.Tc))) ** 2;
      const a = (oa * R * R * c.Tc * c.Tc) / c.Pc * alpha;
      const b = (ob * R * c.Tc) / c.Pc;
      const B2 = b - a / (R * T);
      const P = 1e3;
      const z = makeEos(name, [c]).zValue(T, P, [1]);
      expect((z - 1) / ((B2 * P) / (R * T)) - 1).toBeLessThan(1e-3);
      expect((z - 1) / ((B2 * P) / (R * T)) - 1).toBeGreaterThan(-1e-3);
    }
  });

  it('the ideal gas gives V = RT/P exactly', () => {
    const eos = makeEos('ideal', [hydrogen]);
    expect(eos.molarVolume(313.15, 30e5, [1])).toBe((R * 313.15) / 30e5);
    expect(eos.z(313.15, 30e5, [1]).Z).toBe(1);
  });
});

describe('vapor pressure of the model close to Tc and far below it', () => {
  // The model's own vapor pressure is where ln phi_L = ln phi_V (no outside value); its critical
  // point is exactly (Tc, Pc) (srk.ts, pr.ts; checked in cubic.test.ts), so P_sat -> Pc as
  // T -> Tc, with a finite limiting slope (1 - P/Pc)/(1 - T/Tc) = d ln P/d ln T at the critical
  // point. Close to Tc the three-root range is narrow; the iteration must not step over it.
  for (const name of ['SRK', 'PR'] as const) {
    for (const c of [methane, hydrogen, nitrogen]) {
      it(`${name} ${c.id}: converges up to Tr = 0.99999 and tends to Pc`, () => {
        const eos = makeEos(name, [c]);
        const slope: number[] = [];
        let last = 0;
        for (const tr of [0.99, 0.999, 0.9999, 0.99999]) {
          const s = saturationPressure(eos, 0, tr * c.Tc);
          expect(s.status, `Tr ${tr}`).toBe('converged');
          expect(s.residual).toBeLessThan(1e-12);
          expect(s.zLiquid).toBeLessThan(s.zVapor);
          expect(s.P).toBeGreaterThan(last);
          expect(s.P).toBeLessThan(c.Pc);
          last = s.P;
          slope.push((1 - s.P / c.Pc) / (1 - tr));
        }
        // the limiting slope: the last two agree to 1e-3 (about 5.6 for these fluids)
        expect(Math.abs(slope[3] / slope[2] - 1)).toBeLessThan(1e-3);
      });
    }
  }

  it('converges at Tr = 0.25, where the liquid root is of order 1e-10 in Z', () => {
    // Far below any triple point (a test of the model only): P_sat is a few mPa and the liquid
    // and middle roots of the cubic lie near B ~ 1e-10 beside the vapor root ~ 1.
    for (const name of ['SRK', 'PR'] as const) {
      for (const c of [nButane, carbonDioxide, water, methanol]) {
        const eos = makeEos(name, [c]);
        const s = saturationPressure(eos, 0, 0.25 * c.Tc);
        expect(s.status, `${name} ${c.id}`).toBe('converged');
        expect(s.residual).toBeLessThan(1e-12);
        // the liquid barely changes with pressure there: the same liquid volume at P/100
        const vL = eos.molarVolume(0.25 * c.Tc, s.P, [1], 'liquid');
        const r = eos.z(0.25 * c.Tc, s.P / 100, [1], 'liquid');
        expect(r.nRoots, `${name} ${c.id}`).toBe(3);
        expect(Math.abs(eos.molarVolume(0.25 * c.Tc, s.P / 100, [1], 'liquid') / vL - 1)).toBeLessThan(1e-6);
      }
    }
  });
});

describe('root selection by Gibbs energy', () => {
  it('n-butane at 350 K, 12 bar (above its vapor pressure): three roots, the liquid is stable', () => {
    // Vapor pressure at 350 K is 9.4573 bar (SVA 7th ed., Example 3.9); at 12 bar the vapor
    // root is metastable, so 'stable' must not return the largest root.
    for (const name of ['SRK', 'PR'] as const) {
      const eos = makeEos(name, [nButane]);
      const r = eos.z(350, 12e5, [1], 'stable');
      expect(r.nRoots).toBe(3);
      expect(r.root).toBe('liquid');
      const zv = eos.z(350, 12e5, [1], 'vapor').Z;
      expect(r.Z).toBeLessThan(zv);
      expect(eos.residualGibbs(350, 12e5, [1], 'liquid')).toBeLessThan(eos.residualGibbs(350, 12e5, [1], 'vapor'));
      // below the vapor pressure the vapor is stable
      expect(eos.z(350, 8e5, [1], 'stable').root).toBe('vapor');
      expect(purePhase(eos, 0, 350, 12e5)).toBe('liquid');
      expect(purePhase(eos, 0, 350, 8e5)).toBe('vapor');
    }
  });

  it('n-butane at 300 K, 20 bar is liquid (single root, classified liquid)', () => {
    // Vapor pressure of n-butane at 300 K is about 2.6 bar (SVA 7th ed., Table B.2 Antoine
    // constants, from memory); 20 bar is compressed liquid.
    for (const name of ['SRK', 'PR'] as const) {
      const eos = makeEos(name, [nButane]);
      const r = eos.z(300, 20e5, [1], 'stable');
      expect(r.root).toBe('liquid');
      expect(r.Z).toBeLessThan(0.1);
      expect(purePhase(eos, 0, 300, 20e5)).toBe('liquid');
      // 'vapor' cannot invent a vapor root where there is none
      expect(eos.z(300, 20e5, [1], 'vapor').Z).toBe(r.Z);
    }
  });

  it('classifies supercritical and gas states', () => {
    const eos = makeEos('PR', [hydrogen, nitrogen, water]);
    expect(purePhase(eos, 0, 313, 30e5)).toBe('supercritical');
    expect(purePhase(eos, 1, 300, 10e5)).toBe('vapor'); // above Tc, below Pc
    expect(purePhase(eos, 2, 300, 10e5)).toBe('liquid');
    expect(purePhase(eos, 2, 450, 1e5)).toBe('vapor');
  });
});

describe('fugacity coefficients', () => {
  const comps = [hydrogen, nitrogen, carbonDioxide, water, methanol];
  const kij = new Float64Array(25);
  kij[2 * 5 + 3] = kij[3 * 5 + 2] = 0.12; // an arbitrary non-zero k_ij to exercise the general path
  const x = [0.6, 0.2, 0.1, 0.05, 0.05];

  it('sum x_i ln phi_i equals G^R/RT of the mixture', () => {
    for (const name of ['SRK', 'PR'] as const) {
      for (const k of [undefined, kij]) {
        const eos = makeEos(name, comps, k);
        const out = new Float64Array(5);
        for (const which of ['vapor', 'liquid'] as const) {
          eos.lnPhi(313.15, 30e5, x, which, out);
          let s = 0;
          for (let i = 0; i < 5; i++) s += x[i] * out[i];
          expect(s).toBeCloseTo(eos.residualGibbs(313.15, 30e5, x, which), 12);
        }
      }
    }
  });

  it('ln phi_i is the mole-number derivative of n G^R/RT (central differences)', () => {
    // Thermodynamic consistency: ln phi_i = d(n g^R)/d n_i at T, P, n_j.
    for (const name of ['SRK', 'PR'] as const) {
      const eos = makeEos(name, comps, kij);
      for (const [T, P, which] of [[313.15, 30e5, 'vapor'], [313.15, 30e5, 'liquid'], [500, 100e5, 'vapor']] as const) {
        const out = new Float64Array(5);
        eos.lnPhi(T, P, x, which, out);
        for (let i = 0; i < 5; i++) {
          const h = 1e-6;
          const np = x.slice(), nm = x.slice();
          np[i] += h;
          nm[i] -= h;
          const sp = np.reduce((a, b) => a + b, 0), sm = nm.reduce((a, b) => a + b, 0);
          const gp = sp * eos.residualGibbs(T, P, np, which);
          const gm = sm * eos.residualGibbs(T, P, nm, which);
          expect((gp - gm) / (2 * h)).toBeCloseTo(out[i], 6);
        }
      }
    }
  });

  it('a pure component in a mixture model equals the pure-fluid model', () => {
    const mix = makeEos('SRK', comps);
    const pure = makeEos('SRK', [nitrogen]);
    expect(mix.zValue(300, 50e5, [0, 1, 0, 0, 0])).toBeCloseTo(pure.zValue(300, 50e5, [1]), 14);
  });

  it('hydrogen (negative omega) is finite and gas-like at loop conditions', () => {
    for (const name of ['SRK', 'PR'] as const) {
      const eos = makeEos(name, [hydrogen]);
      const out = new Float64Array(1);
      for (const T of [200, 313.15, 550, 1200]) {
        const r = eos.lnPhi(T, 100e5, [1], 'stable', out);
        expect(Number.isFinite(out[0])).toBe(true);
        expect(r.Z).toBeGreaterThan(1); // hydrogen is above its Boyle temperature here
        expect(r.root).toBe('vapor');
      }
    }
  });

  it('the cache for the last T gives the same numbers when T changes back and forth', () => {
    const eos = makeEos('PR', comps, kij);
    const a = eos.zValue(313.15, 30e5, x);
    eos.zValue(500, 30e5, x);
    expect(eos.zValue(313.15, 30e5, x)).toBe(a);
  });
});

describe('input checks', () => {
  it('rejects bad states and data with a clear message', () => {
    const eos = makeEos('SRK', [methane, nitrogen]);
    expect(() => eos.zValue(-1, 1e5, [0.5, 0.5])).toThrow(/temperature/);
    expect(() => eos.zValue(300, 0, [0.5, 0.5])).toThrow(/pressure/);
    expect(() => eos.zValue(300, NaN, [0.5, 0.5])).toThrow(/pressure/);
    expect(() => eos.zValue(300, 1e5, [1])).toThrow(/entries/);
    expect(() => eos.zValue(300, 1e5, [-0.1, 1.1])).toThrow(/mole fraction/);
    expect(() => eos.zValue(300, 1e5, [0, 0])).toThrow(/sum/);
    expect(() => makeEos('SRK', [methane, nitrogen], new Float64Array([0, 0.1, 0.2, 0]))).toThrow(/symmetric/);
    expect(() => makeEos('SRK', [methane], new Float64Array(4))).toThrow(/entries/);
    expect(() => makeEos('SRK', [])).toThrow(/component/);
    expect(() => makeEos('XX' as never, [methane])).toThrow(/unknown/);
  });

  it('normalises a composition that does not sum to one', () => {
    const eos = makeEos('PR', [methane, nitrogen]);
    expect(eos.zValue(250, 50e5, [2, 2])).toBeCloseTo(eos.zValue(250, 50e5, [0.5, 0.5]), 14);
  });
});

describe('Peng-Robinson m(omega)', () => {
  it('1976 polynomial by default; the 1978 form only on request and only above omega = 0.49', async () => {
    const { prM1976, prM1978 } = await import('../../src/thermo/pr.js');
    // Peng and Robinson 1976: m = 0.37464 + 1.54226 w - 0.26992 w^2
    expect(prM1976(0.2)).toBeCloseTo(0.37464 + 1.54226 * 0.2 - 0.26992 * 0.04, 14);
    // Robinson and Peng 1978 (GPA RR-28): m = 0.379642 + 1.48503 w - 0.164423 w^2 + 0.016666 w^3
    expect(prM1978(0.564)).toBeCloseTo(0.379642 + 1.48503 * 0.564 - 0.164423 * 0.564 ** 2 + 0.016666 * 0.564 ** 3, 14);
    expect(prM1978(0.3)).toBe(prM1976(0.3));
    const z76 = makeEos('PR', [methanol]).zValue(400, 5e5, [1]);
    const z78 = makeEos('PR', [methanol], undefined, { pr78: true }).zValue(400, 5e5, [1]);
    expect(z78).not.toBe(z76);
    expect(makeEos('PR', [nButane], undefined, { pr78: true }).zValue(350, 5e5, [1])).toBe(makeEos('PR', [nButane]).zValue(350, 5e5, [1]));
  });
});
