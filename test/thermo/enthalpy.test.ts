/**
 * Residual (departure) properties of SRK and PR, and enthalpy and entropy of phases and streams
 * on the formation basis.
 *
 * Results must be reviewed by a qualified engineer; they are not for relief, safety or code
 * compliance design, and local codes and licensed practice govern.
 */
import { describe, expect, it } from 'vitest';
import { CubicEos, makeEos } from '../../src/thermo/eos.js';
import { departure } from '../../src/thermo/departure.js';
import {
  idealGasEnthalpy, idealGasEntropy, missingThermoData, phaseEnthalpy, phaseEntropy, phaseHeatCapacity, splitProperties,
  streamState, type MissingThermoData, type StreamState,
} from '../../src/thermo/enthalpy.js';
import { flashTP } from '../../src/thermo/flash.js';
import { hIG, sIG } from '../../src/thermo/ideal-gas.js';
import type { ComponentData, Eos } from '../../src/thermo/types.js';
import { CH4, CO2, H2, H2O, LOOP, LOOP_FEED, N2, NC4 } from './energy-data.js';

const R = 8.314462618;

function state(r: StreamState | MissingThermoData): StreamState {
  if (r.status === 'invalid') throw new Error(r.message);
  return r;
}

describe('departure functions against a published worked example', () => {
  // Y. V. C. Rao, Chemical Engineering Thermodynamics (Universities Press, Hyderabad, 1997),
  // Example 8.6 (SRK) and Example 8.7 (PR), p. 281-282: enthalpy and entropy departure of
  // n-octane vapor at 427.85 K and 0.215 MPa, with a, b and Z from the book's Examples 3.15
  // and 3.16. The inputs below were read from a public transcription of the examples (not from
  // the printed book): Tc = 569.4 K; SRK: m = 1.0786, alpha = 1.3079, a = 5.0180 Pa m6/mol2,
  // b = 1.6426e-4 m3/mol, B = 9.9282e-3, Z = 0.9191; PR: m = 0.9457, alpha = 1.2677,
  // a = 5.2024, b = 1.4750e-4, B = 8.9151e-3, Z = 0.9151. The book's formulas (its Eqs. 8.42-8.47,
  // written for SRK and PR separately) are evaluated below with those printed intermediates,
  // independently of src/thermo. Pc = 24.97 bar and omega = 0.398 follow from the book's b and m
  // (b = Omega_b R Tc/Pc; m(omega) of Soave and of Peng-Robinson).
  // The transcription notes that the SRK enthalpy departure printed in the book, -890.22 J/mol,
  // does not follow from the book's own inputs (which give -884.3 J/mol); the PR value of
  // Example 8.7 is -890.1 J/mol.
  // Tolerances: the book's Z has 4 decimals (+-5e-5 moves RT(Z - 1) by 0.18 J/mol) and a, b,
  // alpha have 5 digits, so H^R is compared to 0.5 J/mol (0.06 %) and S^R to 1e-3 J/(mol K).
  const T = 427.85;
  const P = 0.215e6;
  const Rb = 8.314; // the book's R
  const octane: ComponentData = {
    id: 'nC8H18', name: 'n-octane', formula: 'C8H18', MW: 0.11423, Tc: 569.4, Pc: 24.97e5, omega: 0.398,
    source: 'Rao (1997), Examples 3.15 and 3.16 (via b and m)',
  };

  it('SRK (Example 8.6)', () => {
    const m = 1.0786, alpha = 1.3079, a = 5.018, b = 1.6426e-4, B = 9.9282e-3, Z = 0.9191, Tc = 569.4;
    const dadT = (-a * m) / Math.sqrt(alpha * T * Tc);
    const L = Math.log((Z + B) / Z);
    const hBook = Rb * T * (Z - 1) + ((T * dadT - a) / b) * L;
    const sBook = Rb * Math.log(Z - B) + (dadT / b) * L;
    const d = departure(makeEos('SRK', [octane]), T, P, [1], 'vapor');
    expect(d.Z).toBeCloseTo(Z, 4);
    expect(Math.abs(d.H - hBook)).toBeLessThan(0.5);
    expect(Math.abs(d.S - sBook)).toBeLessThan(1e-3);
    expect(hBook).toBeCloseTo(-884.3, 1);
  });

  it('PR (Example 8.7)', () => {
    const m = 0.9457, alpha = 1.2677, a = 5.2024, b = 1.475e-4, B = 8.9151e-3, Z = 0.9151, Tc = 569.4;
    const dadT = (-a * m) / Math.sqrt(alpha * T * Tc);
    const s2 = Math.SQRT2;
    const L = Math.log((Z + B * (1 + s2)) / (Z + B * (1 - s2)));
    const hBook = Rb * T * (Z - 1) + ((T * dadT - a) / (2 * s2 * b)) * L;
    const sBook = Rb * Math.log(Z - B) + (dadT / (2 * s2 * b)) * L;
    const d = departure(makeEos('PR', [octane]), T, P, [1], 'vapor');
    expect(d.Z).toBeCloseTo(Z, 4);
    expect(Math.abs(d.H - hBook)).toBeLessThan(0.5);
    expect(Math.abs(d.S - sBook)).toBeLessThan(1e-3);
  });
});

describe('departure functions of water against the IAPWS-IF97 verification values', () => {
  // Wagner et al., "The IAPWS Industrial Formulation 1997 for the Thermodynamic Properties of
  // Water and Steam", J. Eng. Gas Turbines Power 122 (2000) 150-182 (IAPWS Revised Release
  // 2007): Table 5 (region 1) and Table 15 (region 2), the computer-program verification values
  // (recalled, and checked against several public reproductions of the tables, not read from the
  // release itself). Specific values in kJ/kg and kJ/(kg K); the release's M = 18.015268 g/mol
  // and R = 0.461526 kJ/(kg K). The low-pressure state (3.5 kPa) is all but an ideal gas, and the
  // ideal-gas part cancels at equal temperature, so differences at fixed T compare with the
  // model's residual properties. Water is polar and the cubic's weakest case: the tolerances
  // are what the model is expected to reach, and the measured errors are printed in
  // src/thermo/enthalpy.ts.
  const M = 18.015268e-3; // kg/mol
  const Rw = 0.461526; // kJ/(kg K)
  const water = (name: 'SRK' | 'PR'): Eos => makeEos(name, [H2O]);

  for (const name of ['SRK', 'PR'] as const) {
    it(`${name}: dense steam at 700 K, 30 MPa against the same temperature at 3.5 kPa`, () => {
      const eos = water(name);
      const hi = departure(eos, 700, 30e6, [1]);
      const lo = departure(eos, 700, 3500, [1], 'vapor');
      const dH = (2631.49474 - 3335.68375) * M * 1e3; // J/mol, Table 15
      const SR = (5.17540298 - 10.1749996 + Rw * Math.log(30e6 / 3500)) * M * 1e3; // J/(mol K)
      // 700 K, 30 MPa is Tr = 1.08, Pr = 1.36: near-critical dense steam. Within 10 % (SRK
      // 7.4 % and 8.4 %, PR 6.0 % and 9.0 %); a dropped or doubled da/dT term is off by > 40 %.
      expect(Math.abs((hi.H - lo.H) / dH - 1)).toBeLessThan(0.1);
      expect(Math.abs((hi.S - lo.S) / SR - 1)).toBeLessThan(0.1);
      // compressibility of the same state: Z = P v/(R T) = 0.504
      expect(Math.abs(hi.Z - (30e3 * 0.00542946619) / (Rw * 700))).toBeLessThan(0.06);
    });

    it(`${name}: liquid at 300 K, 3 MPa against the vapor at 300 K, 3.5 kPa (the weak liquid)`, () => {
      const eos = water(name);
      const liq = departure(eos, 300, 3e6, [1]);
      const vap = departure(eos, 300, 3500, [1], 'vapor');
      expect(liq.root).toBe('liquid');
      const dH = (115.331273 - 2549.91145) * M * 1e3; // J/mol, Tables 5 and 15 (-43.86 kJ/mol)
      // Within 8 % (SRK 6.9 %, PR 4.0 %, both too large in magnitude): the heat of vaporisation of
      // a hydrogen-bonded liquid from a cubic with the generalised alpha function.
      const err = (liq.H - vap.H) / dH - 1;
      expect(err).toBeGreaterThan(0);
      expect(err).toBeLessThan(0.08);
    });
  }
});

describe('thermodynamic consistency of the departure functions', () => {
  // These identities hold for any equation of state; they check the analytic derivatives.
  const kij = new Float64Array(25);
  const set = (i: number, j: number, k: number): void => {
    kij[i * 5 + j] = k;
    kij[j * 5 + i] = k;
  };
  set(0, 1, 0.1); // arbitrary non-zero values: the check is of the derivatives, not of the data
  set(2, 3, -0.08);
  set(1, 3, 0.05);
  const cases: Array<[string, 'SRK' | 'PR', number, number, number[], 'vapor' | 'liquid']> = [
    ['loop gas, SRK', 'SRK', 313.15, 30e5, [0.75, 0.15, 0.03, 0.02, 0.05], 'vapor'],
    ['loop liquid, PR', 'PR', 313.15, 30e5, [0.001, 0.01, 0.7, 0.285, 0.004], 'liquid'],
    ['hot reactor gas, PR', 'PR', 523.15, 80e5, LOOP_FEED, 'vapor'],
    ['dense liquid, SRK', 'SRK', 280, 200e5, [0, 0.02, 0.6, 0.38, 0], 'liquid'],
  ];
  for (const [label, name, T, P, x, root] of cases) {
    it(label, () => {
      const eos = makeEos(name, LOOP, kij);
      const d = departure(eos, T, P, x, root);
      expect(d.root).toBe(root);
      // H^R = -R T^2 d(G^R/RT)/dT at fixed P and x (central difference: truncation error
      // ~ 1e-9 relative with h = 1e-4 T, rounding ~ 1e-11)
      const h = 1e-4 * T;
      const g = (t: number): number => departure(eos, t, P, x, root).G / (R * t);
      const hFd = -R * T * T * (g(T + h) - g(T - h)) / (2 * h);
      expect(Math.abs(d.H - hFd)).toBeLessThan(1e-7 * Math.max(1, Math.abs(d.H)));
      // Cp^R = dH^R/dT at fixed P and x
      const cpFd = (departure(eos, T + h, P, x, root).H - departure(eos, T - h, P, x, root).H) / (2 * h);
      expect(Math.abs(d.Cp - cpFd)).toBeLessThan(1e-6 * Math.max(1, Math.abs(d.Cp)));
      // S^R = (H^R - G^R)/T
      expect(Math.abs(d.S - (d.H - d.G) / T)).toBeLessThan(1e-9 * Math.max(1, Math.abs(d.S)));
      // sum_i x_i ln phi_i = G^R/RT (the fugacity coefficients of eos.lnPhi)
      const lnPhi = new Float64Array(5);
      eos.lnPhi(T, P, x, root, lnPhi);
      const sum = x.reduce((s, xi, i) => s + xi * lnPhi[i], 0) / x.reduce((s, v) => s + v, 0);
      expect(Math.abs(sum - d.G / (R * T))).toBeLessThan(1e-10 * Math.max(1, Math.abs(sum)));
      // and the model's own residual Gibbs energy (the root chooser's)
      expect((eos as CubicEos).residualGibbs(T, P, x, root)).toBeCloseTo(d.G / (R * T), 10);
    });
  }

  it('da/dT and d2a/dT2 of the mixture agree with difference quotients of a(T)', () => {
    const eos = makeEos('PR', LOOP, kij) as CubicEos;
    const x = [0.3, 0.2, 0.25, 0.15, 0.1];
    const T = 350;
    const h = 1e-3;
    const at = (t: number): Float64Array => eos.aDerivatives(t, x, new Float64Array(4));
    const d0 = at(T);
    const p = at(T + h);
    const m = at(T - h);
    expect(d0[1]).toBeCloseTo((p[0] - m[0]) / (2 * h), 10);
    expect(Math.abs(d0[2] - (p[1] - m[1]) / (2 * h))).toBeLessThan(1e-7 * Math.abs(d0[2]));
    // b of the mixture is linear in x
    expect(d0[3]).toBeCloseTo(x.reduce((s, xi, i) => s + xi * eos.b[i], 0), 15);
  });

  it('the ideal-gas model has no residual properties', () => {
    const d = departure(makeEos('ideal', LOOP), 300, 50e5, LOOP_FEED);
    expect([d.H, d.S, d.G, d.Cp, d.Z]).toEqual([0, 0, 0, 0, 1]);
  });
});

describe('enthalpy and entropy on the formation basis', () => {
  it('an ideal gas at 298.15 K has its enthalpy of formation, and G = gf at 1 bar', () => {
    // Smith, Van Ness and Abbott, 7th ed., Table C.4 (from memory): CO2 hf -393,509 J/mol, gf -394,359 J/mol
    const eos = makeEos('ideal', [CO2]);
    const h = phaseEnthalpy(eos, 298.15, 1e5, [1]);
    const s = phaseEntropy(eos, 298.15, 1e5, [1]);
    if (h.status !== 'ok' || s.status !== 'ok') throw new Error('data');
    expect(h.value).toBeCloseTo(-393509, 6);
    expect(h.value - 298.15 * s.value).toBeCloseTo(-394359, 6);
  });

  it('the cubic at low pressure tends to the ideal-gas mixture', () => {
    const eos = makeEos('SRK', LOOP);
    const z = [0.7, 0.2, 0, 0.05, 0.05];
    const h = phaseEnthalpy(eos, 400, 10, z);
    const s = phaseEntropy(eos, 400, 10, z);
    if (h.status !== 'ok' || s.status !== 'ok') throw new Error('data');
    expect(h.value).toBeCloseTo(idealGasEnthalpy(LOOP, 400, z), 3);
    expect(s.value).toBeCloseTo(idealGasEntropy(LOOP, 400, 10, z), 5);
    // the mixing and pressure terms: -R sum x ln x - R ln(P / 1 bar)
    const pure = z.reduce((acc, zi, i) => acc + (zi > 0 ? zi * sIG(LOOP[i], 400) : 0), 0);
    const mixing = -R * z.reduce((acc, zi) => acc + (zi > 0 ? zi * Math.log(zi) : 0), 0);
    expect(idealGasEntropy(LOOP, 400, 10, z)).toBeCloseTo(pure + mixing - R * Math.log(10 / 1e5), 9);
  });

  it('heat capacity is dH/dT of a phase', () => {
    const eos = makeEos('PR', LOOP);
    const x = [0.001, 0.01, 0.7, 0.285, 0.004];
    const cp = phaseHeatCapacity(eos, 320, 30e5, x, 'liquid');
    const H = (t: number): number => {
      const r = phaseEnthalpy(eos, t, 30e5, x, 'liquid');
      if (r.status !== 'ok') throw new Error(r.message);
      return r.value;
    };
    if (cp.status !== 'ok') throw new Error(cp.message);
    expect(cp.value).toBeCloseTo((H(320.01) - H(319.99)) / 0.02, 4);
  });

  it('a stream: two-phase H and S are the phase values weighted by the vapor fraction', () => {
    const eos = makeEos('SRK', LOOP);
    const st = state(streamState(eos, 313.15, 30e5, LOOP_FEED));
    expect(st.status).toBe('converged');
    expect(st.phase).toBe('two-phase');
    const hV = phaseEnthalpy(eos, 313.15, 30e5, st.y);
    const hL = phaseEnthalpy(eos, 313.15, 30e5, st.x);
    const sV = phaseEntropy(eos, 313.15, 30e5, st.y);
    const sL = phaseEntropy(eos, 313.15, 30e5, st.x);
    if (hV.status !== 'ok' || hL.status !== 'ok' || sV.status !== 'ok' || sL.status !== 'ok') throw new Error('data');
    expect(st.H).toBeCloseTo(st.beta * hV.value + (1 - st.beta) * hL.value, 6);
    expect(st.S).toBeCloseTo(st.beta * sV.value + (1 - st.beta) * sL.value, 9);
    expect(st.vapor!.H).toBeCloseTo(hV.value, 6);
    expect(st.liquid!.H).toBeCloseTo(hL.value, 6);
    // condensing lowers the enthalpy below that of the same mixture as a (metastable) vapor
    const hGas = phaseEnthalpy(eos, 313.15, 30e5, LOOP_FEED, 'vapor');
    if (hGas.status !== 'ok') throw new Error('data');
    expect(st.H).toBeLessThan(hGas.value);
    // splitProperties of the same flash gives the same numbers
    const again = splitProperties(eos, 313.15, 30e5, LOOP_FEED, flashTP(eos, 313.15, 30e5, LOOP_FEED));
    if (again.status !== 'ok') throw new Error('data');
    expect(again.H).toBeCloseTo(st.H, 8);
  });

  it('a single-phase stream takes the feed on its stable root', () => {
    const eos = makeEos('PR', [CH4, NC4]);
    for (const [T, z, phase] of [[400, [0.5, 0.5], 'vapor'], [300, [0.05, 0.95], 'liquid']] as const) {
      const st = state(streamState(eos, T, 20e5, z));
      expect(st.phase).toBe(phase);
      const h = phaseEnthalpy(eos, T, 20e5, z);
      const s1 = phaseEntropy(eos, T, 20e5, z);
      if (h.status !== 'ok' || s1.status !== 'ok') throw new Error('data');
      expect(h.root).toBe(phase);
      expect(st.H).toBeCloseTo(h.value, 8);
      expect(st.S).toBeCloseTo(s1.value, 10);
    }
  });
});

describe('missing data is an explicit result, never NaN', () => {
  const noCp: ComponentData = { ...N2, id: 'Xe', cp: undefined };
  const noGf: ComponentData = { ...H2, id: 'D2', gf: undefined };

  it('names the component and the missing fields', () => {
    const eos = makeEos('SRK', [N2, noCp, noGf]);
    const h = phaseEnthalpy(eos, 300, 1e5, [0.5, 0.3, 0.2]);
    expect(h.status).toBe('invalid');
    if (h.status !== 'invalid') return;
    expect(h.missing).toEqual([{ index: 1, id: 'Xe', fields: ['cp'] }]);
    expect(h.message).toMatch(/Xe has no ideal-gas heat capacity/);
    const s = phaseEntropy(eos, 300, 1e5, [0.5, 0.3, 0.2]);
    if (s.status !== 'invalid') throw new Error('expected invalid');
    expect(s.missing.map((m) => m.id)).toEqual(['Xe', 'D2']);
    expect(s.missing[1].fields).toEqual(['gf']);
    const st = streamState(eos, 300, 1e5, [0.5, 0.3, 0.2]);
    expect(st.status).toBe('invalid');
  });

  it('ignores components that are absent', () => {
    const eos = makeEos('SRK', [N2, noCp, noGf]);
    const h = phaseEnthalpy(eos, 300, 1e5, [1, 0, 0.5]);
    expect(h.status).toBe('ok');
    expect(missingThermoData(eos.components, 'entropy', [1, 0, 0])).toBeUndefined();
    expect(missingThermoData(eos.components, 'entropy')?.missing.length).toBe(2);
  });

  it('hIG of a component with data matches the formation-basis integral', () => {
    // 298.15 -> 400 K with Table C.1 for methane (analytic integral written out here)
    const A = 1.702, B = 9.081e-3, C = -2.164e-6;
    const t0 = 298.15, t = 400;
    const dh = R * (A * (t - t0) + (B / 2) * (t * t - t0 * t0) + (C / 3) * (t ** 3 - t0 ** 3));
    expect(hIG(CH4, t)).toBeCloseTo(-74520 + dh, 8);
  });
});
