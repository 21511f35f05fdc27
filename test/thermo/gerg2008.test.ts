/**
 * GERG-2008 (src/thermo/gerg2008) against published values.
 *
 * 1. The reference implementation's published test outputs: NIST's GERG-2008 code for AGA
 *    Report No. 8 Part 2 (public repository usnistgov/AGA8), AGA8CODE/C/GERG2008_test_01.cpp and
 *    the listing at the end of AGA8CODE/C/GERG2008.cpp: the 21-component gas at 400 K and
 *    50 MPa, every property it prints. These check the transcription of every coefficient table
 *    (all 21 components and all 210 pairs take part) and the evaluation, to 1e-9 relative.
 * 2. Pure fluids against the tables of the reference equations of state the NIST WebBook
 *    evaluates (values read from the test code of a public repository that quotes these tables
 *    with page and table numbers; not re-read from the printed papers):
 *      nitrogen: Span, Lemmon, Jacobsen, Wagner and Yokozeki, J. Phys. Chem. Ref. Data 29 (2000)
 *        1361-1433, single-phase table, p. 1410;
 *      methane: Setzmann and Wagner, J. Phys. Chem. Ref. Data 20 (1991) 1061-1155, Table 40, p. 1119;
 *      carbon dioxide: Span and Wagner, J. Phys. Chem. Ref. Data 25 (1996) 1509-1596, Table 34
 *        (saturation) and Table 35 (single phase), p. 1562;
 *      hydrogen: Lemmon, Huber and Leachman, "Revised standardized equation for hydrogen gas
 *        densities for fuel consumption applications", J. Res. NIST 113 (2008) 341-350, the
 *        equation's coefficient table (from memory); it agrees with the reference equation of
 *        Leachman et al. (2009) to 0.01 % from 220 K to 1000 K up to 70 MPa (the paper's abstract).
 *    GERG-2008's own pure-fluid equations are fits to such reference equations; the paper states
 *    0.1 % (k = 2) in gas-phase density for its normal range, so a few 1e-4 is the tolerance.
 * 3. Derivatives against finite differences of the model's own P, U, H, S and A (this checks the
 *    analytic derivatives and the ideal part, not the data).
 * 4. Hard states of the density iteration: near the critical point of carbon dioxide, a gas
 *    search at a pressure only the liquid branch reaches, a grid of states around the two-phase
 *    region; a result is converged or says it is not, never NaN.
 */
import { describe, expect, it } from 'vitest';
import {
  GERG2008_IDS,
  gergDensityUncertainty,
  gergUnsupported,
  makeGerg2008,
  type Gerg2008Model,
  type GergProperties,
} from '../../src/thermo/gerg2008/index.js';

const R = 8.314472; // GERG-2008's gas constant

/** The reference implementation's test gas, by loopclose id. */
const TEST_GAS: Record<string, number> = {
  CH4: 0.77824, N2: 0.02, CO2: 0.06, C2H6: 0.08, C3H8: 0.03, iC4H10: 0.0015, nC4H10: 0.003, iC5H12: 0.0005,
  nC5H12: 0.00165, nC6H14: 0.00215, nC7H16: 0.00088, nC8H18: 0.00024, nC9H20: 0.00015, nC10H22: 0.00009,
  H2: 0.004, O2: 0.005, CO: 0.002, H2O: 0.0001, H2S: 0.0025, He: 0.007, Ar: 0.001,
};

/** The paper's component order (normal isomers before iso), not the reference code's. */
const PAPER_ORDER = ['CH4', 'N2', 'CO2', 'C2H6', 'C3H8', 'nC4H10', 'iC4H10', 'nC5H12', 'iC5H12', 'nC6H14', 'nC7H16', 'nC8H18', 'nC9H20', 'nC10H22', 'H2', 'O2', 'CO', 'H2O', 'H2S', 'He', 'Ar'];

function model(ids: readonly string[]): Gerg2008Model {
  const m = makeGerg2008(ids);
  if (!m) throw new Error(`no GERG-2008 model for ${ids.join(', ')}`);
  return m;
}

function fractions(m: Gerg2008Model, x: Record<string, number>): Float64Array {
  return Float64Array.from(m.ids, (id) => x[id] ?? 0);
}

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

describe('GERG-2008 against the reference implementation (NIST, usnistgov/AGA8)', () => {
  const g = model(PAPER_ORDER);
  const x = fractions(g, TEST_GAS);

  // Agreement is about 1e-15; the checks use 1e-12 rather than 1e-9 so that they notice a slip in
  // nearly any coefficient. Measured by perturbing the tables one number at a time: a 1e-6
  // relative change of a reducing parameter moves D here by 4e-16 (n-decane/water, the least
  // visible pair) to about 1e-8, so a slip of 1 % in any of the 840 shows; a 0.1 % change of a
  // pure-fluid, ideal-part or departure coefficient shows, except for the last terms (exp(-delta^6),
  // tau^26 to tau^30) of methane, nitrogen, ethane and carbon dioxide and one n-decane term, which
  // are all but zero at 400 K and were checked against the source by eye.
  it('reproduces every published output at 400 K and 50 MPa to 1e-12', () => {
    // GERG2008_test_01.cpp (units there: mol/l, kPa, J/mol, K/kPa).
    const r = g.density(400, 50e6, x);
    expect(r.status).toBe('converged');
    expect(r.root).toBe('gas');
    const p = g.properties(400, r.D, x);
    const ref = {
      M: 20.5427445016e-3,
      D: 12.79828626082062e3,
      P: 50000.0e3,
      Z: 1.174690666383717,
      dPdD: 7000.694030193327,
      d2PdD2: 1129.526655214841e-3,
      dPdT: 235.9832292593096e3,
      U: -2746.492901212530,
      H: 1160.280160510973,
      S: -38.57590392409089,
      Cv: 39.02948218156372,
      Cp: 58.45522051000366,
      W: 714.4248840596024,
      G: 16590.64173014733,
      JT: 7.155629581480913e-5 * 1e-3,
      kappa: 2.683820255058032,
    };
    expect(rel(g.molarMass(x), ref.M)).toBeLessThan(1e-12);
    expect(rel(r.D, ref.D)).toBeLessThan(1e-12);
    expect(rel(r.Z, ref.Z)).toBeLessThan(1e-12);
    for (const key of ['P', 'Z', 'dPdD', 'd2PdD2', 'dPdT', 'U', 'H', 'S', 'Cv', 'Cp', 'W', 'G', 'JT', 'kappa'] as const) {
      expect(rel(p[key], ref[key]), key).toBeLessThan(1e-12);
    }
    // The listing at the end of GERG2008.cpp prints d2P/drho2 = 1130.481239114938 kPa/(mol/l)^2;
    // its test file (above) has 1129.526655214841. Ours agrees with the test file and differs from
    // the listing by 8e-4 (the second density derivative is the only output that differs).
    expect(rel(p.d2PdD2, 1130.481239114938e-3)).toBeGreaterThan(5e-4);
  });

  it('gives the same state for the reference code order and any other order of components', () => {
    const nist = model(['CH4', 'N2', 'CO2', 'C2H6', 'C3H8', 'iC4H10', 'nC4H10', 'iC5H12', 'nC5H12', 'nC6H14', 'nC7H16', 'nC8H18', 'nC9H20', 'nC10H22', 'H2', 'O2', 'CO', 'H2O', 'H2S', 'He', 'Ar']);
    const reversed = model([...PAPER_ORDER].reverse());
    const D = g.density(400, 50e6, x).D;
    for (const m of [nist, reversed]) {
      const r = m.density(400, 50e6, fractions(m, TEST_GAS));
      expect(rel(r.D, D)).toBeLessThan(1e-13);
      const p = m.properties(400, r.D, fractions(m, TEST_GAS));
      expect(rel(p.H, 1160.280160510973)).toBeLessThan(1e-9);
    }
  });

  it('reproduces the same gas at 350 K and 50 MPa', () => {
    // Values quoted in the project's issue for this model as the same implementation's output at
    // 350 K (the published file holding them was not found in the stored copies of the repository).
    const r = g.density(350, 50e6, x);
    expect(r.status).toBe('converged');
    expect(rel(r.D, 14.687295425741453e3)).toBeLessThan(1e-12);
    expect(rel(r.Z, 1.169837272320901)).toBeLessThan(1e-12);
  });

  it('puts h and s of every pure ideal gas at zero at 298.15 K and 101.325 kPa (the reference state)', () => {
    // The reference state of GERG-2008 and of the reference implementation. The constants a1, a2
    // are published to 10 significant digits, so h and s vanish to that rounding: a slip in any
    // ideal-gas coefficient of any component shows here.
    const T0 = 298.15;
    const rho0 = 101325 / (R * T0);
    for (const id of GERG2008_IDS) {
      const m = model([id]);
      const D = rho0 * 1e-9; // residual part negligible (about 1e-9 of RT)
      const p = m.properties(T0, D, [1]);
      expect(Math.abs(p.H), id).toBeLessThan(1e-4);
      expect(Math.abs(p.S + R * Math.log(D / rho0)), id).toBeLessThan(1e-7);
    }
  });
});

describe('GERG-2008 pure fluids against reference-equation tables', () => {
  type Case = { id: string; T: number; P: number; root?: 'gas' | 'liquid'; rho?: number; rhoMolar?: number; w?: number; wTol?: number; note: string };
  const cases: Case[] = [
    // Span et al. (2000), p. 1410: 350 K, 20 MPa: 6.3552 mol/l, w 449.7 m/s.
    { id: 'N2', T: 350, P: 20e6, rhoMolar: 6.3552e3, w: 449.7, note: 'nitrogen, supercritical gas' },
    // Setzmann and Wagner (1991), Table 40.
    { id: 'CH4', T: 150, P: 1e6, rho: 15.536, w: 287.76, note: 'methane gas' },
    { id: 'CH4', T: 200, P: 5e6, rho: 87.764, w: 291.29, note: 'methane, dense gas near the critical temperature' },
    { id: 'CH4', T: 115, P: 1e5, rho: 1.7341, w: 276.16, note: 'methane gas near saturation' },
    { id: 'CH4', T: 100, P: 10e6, root: 'liquid', rho: 446.02, w: 1525.7, wTol: 5e-3, note: 'compressed liquid methane' },
    // Span and Wagner (1996), Table 35.
    { id: 'CO2', T: 280, P: 5e5, rho: 9.7568, w: 257.27, note: 'carbon dioxide gas' },
    { id: 'CO2', T: 290, P: 5e6, rho: 148.41, w: 207.56, note: 'carbon dioxide gas near saturation' },
    { id: 'CO2', T: 480, P: 10e6, rho: 119.65, w: 328.74, note: 'carbon dioxide, extended range' },
    { id: 'CO2', T: 230, P: 1e6, root: 'liquid', rho: 1128.97, w: 879.82, wTol: 5e-3, note: 'liquid carbon dioxide' },
  ];
  for (const c of cases) {
    it(`${c.note}: ${c.T} K, ${c.P / 1e6} MPa`, () => {
      const m = model([c.id]);
      const r = m.density(c.T, c.P, [1], { root: c.root ?? 'gas' });
      expect(r.status).toBe('converged');
      const p = m.properties(c.T, r.D, [1]);
      if (c.rhoMolar !== undefined) expect(rel(r.D, c.rhoMolar)).toBeLessThan(5e-4);
      if (c.rho !== undefined) expect(rel(r.D * p.M, c.rho)).toBeLessThan(5e-4);
      // Speed of sound: 0.1 % stated for the gas phase; 2e-3 here leaves room for the reference
      // equations' own differences near saturation, 5e-3 for the liquid.
      if (c.w !== undefined) expect(rel(p.W, c.w)).toBeLessThan(c.wTol ?? 2e-3);
      if (c.root === 'liquid') expect(r.phase).toBe('liquid-like');
    });
  }

  it('dense carbon dioxide at 313.15 K and 15 MPa is about 780 kg/m3 and flagged dense', () => {
    // About 780 kg/m3 (from memory; the value usually quoted for supercritical extraction at
    // 40 degC and 150 bar). GERG-2008 gives 780.2.
    const m = model(['CO2']);
    const r = m.density(313.15, 15e6, [1]);
    expect(r.status).toBe('converged');
    expect(rel(r.D * 44.0095e-3, 780)).toBeLessThan(1e-3);
    expect(r.phase).toBe('dense');
  });

  it('hydrogen agrees with the standardized hydrogen density equation to 3e-4 in Z', () => {
    // Z = 1 + sum a_i (100 K/T)^b_i (P/MPa)^c_i, Lemmon, Huber and Leachman (2008), Table 1
    // (coefficients from memory).
    const a = [0.0588846, -0.06136111, -0.002650473, 0.002731125, 0.001802374, -0.001150707, 0.9588528e-4, -0.110904e-6, 0.1264403e-9];
    const b = [1.325, 1.87, 2.5, 2.8, 2.938, 3.14, 3.37, 3.75, 4.0];
    const cc = [1, 1, 2, 2, 2.42, 2.63, 3, 4, 5];
    const zRef = (T: number, pMPa: number) => 1 + a.reduce((s, ai, i) => s + ai * Math.pow(100 / T, b[i]) * Math.pow(pMPa, cc[i]), 0);
    const m = model(['H2']);
    for (const [T, pMPa] of [[300, 15], [313.15, 15], [300, 35], [273.15, 20]]) {
      const r = m.density(T, pMPa * 1e6, [1]);
      expect(r.status).toBe('converged');
      expect(r.phase).toBe('gas-like');
      expect(rel(r.Z, zRef(T, pMPa)), `${T} K ${pMPa} MPa`).toBeLessThan(3e-4);
    }
  });
});

describe('GERG-2008 analytic derivatives against finite differences of its own P, U, H, S, A', () => {
  const loopIds = ['H2', 'N2', 'CH4', 'Ar', 'CO'];
  const loop = model(loopIds);
  const xLoop = Float64Array.from([0.7, 0.23, 0.04, 0.02, 0.01]);
  const ng = model(PAPER_ORDER);
  const xNg = fractions(ng, TEST_GAS);
  const co2 = model(['CO2', 'CH4']);
  const xCo2 = Float64Array.from([0.95, 0.05]);
  const states: { label: string; m: Gerg2008Model; x: Float64Array; T: number; P: number; root?: 'liquid' }[] = [
    { label: 'synthesis loop gas, 313 K, 15 MPa', m: loop, x: xLoop, T: 313.15, P: 15e6 },
    { label: 'natural gas, 400 K, 50 MPa', m: ng, x: xNg, T: 400, P: 50e6 },
    { label: 'natural gas, 275 K, 8 MPa', m: ng, x: xNg, T: 275, P: 8e6 },
    { label: 'CO2-rich liquid, 260 K, 10 MPa', m: co2, x: xCo2, T: 260, P: 10e6, root: 'liquid' },
  ];

  const props = (m: Gerg2008Model, T: number, D: number, x: Float64Array): GergProperties => ({ ...m.properties(T, D, x) });
  const densityAt = (m: Gerg2008Model, T: number, P: number, x: Float64Array, guess: number, root?: 'liquid'): number => {
    const r = m.density(T, P, x, root ? { root } : { guess });
    expect(r.status).toBe('converged');
    return r.D;
  };

  for (const s of states) {
    it(s.label, () => {
      const { m, x, T, P } = s;
      const D = densityAt(m, T, P, x, P / (R * T), s.root);
      const p = props(m, T, D, x);
      const hD = D * 1e-5;
      const hT = T * 1e-5;
      const pDp = props(m, T, D + hD, x);
      const pDm = props(m, T, D - hD, x);
      const pTp = props(m, T + hT, D, x);
      const pTm = props(m, T - hT, D, x);
      // Pressure derivatives.
      expect(rel(p.dPdD, (pDp.P - pDm.P) / (2 * hD))).toBeLessThan(1e-7);
      expect(rel(p.dPdT, (pTp.P - pTm.P) / (2 * hT))).toBeLessThan(1e-7);
      expect(rel(p.d2PdD2, (pDp.dPdD - pDm.dPdD) / (2 * hD))).toBeLessThan(1e-5);
      expect(rel(p.d2PdTD, (pTp.dPdD - pTm.dPdD) / (2 * hT))).toBeLessThan(1e-6);
      // Cv = (dU/dT)_D; S = -(dA/dT)_D; P = D^2 (dA/dD)_T (ties the ideal and residual parts together).
      expect(rel(p.Cv, (pTp.U - pTm.U) / (2 * hT))).toBeLessThan(1e-7);
      expect(rel(p.S, -(pTp.A - pTm.A) / (2 * hT))).toBeLessThan(1e-7);
      expect(rel(p.P, (D * D * (pDp.A - pDm.A)) / (2 * hD))).toBeLessThan(1e-7);
      expect(rel(p.G, p.H - T * p.S)).toBeLessThan(1e-12);
      expect(rel(p.A, p.U - T * p.S)).toBeLessThan(1e-12);
      // Cp = (dH/dT)_P, each H at the density that holds P.
      const Dp = densityAt(m, T + hT, P, x, D, s.root);
      const Dm = densityAt(m, T - hT, P, x, D, s.root);
      expect(rel(p.Cp, (props(m, T + hT, Dp, x).H - props(m, T - hT, Dm, x).H) / (2 * hT))).toBeLessThan(1e-6);
      // JT = (dT/dP)_H: at P +- dP, the temperature that keeps H (Newton on T with Cp).
      const hP = P * 1e-5;
      const tempAtH = (Pt: number): number => {
        let Tt = T;
        for (let k = 0; k < 30; k++) {
          const Dt = densityAt(m, Tt, Pt, x, D, s.root);
          const q = props(m, Tt, Dt, x);
          const dT = (p.H - q.H) / q.Cp;
          Tt += dT;
          if (Math.abs(dT) < 1e-12 * T) break;
        }
        return Tt;
      };
      expect(rel(p.JT, (tempAtH(P + hP) - tempAtH(P - hP)) / (2 * hP))).toBeLessThan(1e-5);
      // W^2 = (dP/drho_mass)_S: at D +- dD, the temperature that keeps S (Newton on T with Cv/T).
      const pressureAtS = (Dt: number): number => {
        let Tt = T;
        let q = props(m, Tt, Dt, x);
        for (let k = 0; k < 30; k++) {
          const dT = ((p.S - q.S) * Tt) / q.Cv;
          Tt += dT;
          q = props(m, Tt, Dt, x);
          if (Math.abs(dT) < 1e-12 * T) break;
        }
        return q.P;
      };
      const w2 = (pressureAtS(D + hD) - pressureAtS(D - hD)) / (2 * hD * p.M);
      expect(rel(p.W, Math.sqrt(w2))).toBeLessThan(1e-6);
    });
  }
});

describe('GERG-2008 density iteration in hard states', () => {
  it('converges fast for the synthesis loop gas at a meter state', () => {
    const m = model(['H2', 'N2', 'CH4', 'Ar', 'CO']);
    const r = m.density(313.15, 150e5, [0.7, 0.23, 0.04, 0.02, 0.01]);
    expect(r.status).toBe('converged');
    expect(r.phase).toBe('gas-like');
    expect(r.root).toBe('gas');
    expect(r.iterations).toBeLessThanOrEqual(8);
    expect(Math.abs(r.residual)).toBeLessThan(1e-12);
  });

  it('finds both roots of carbon dioxide just below its critical point', () => {
    // Span and Wagner (1996), Table 34: at 304 K the saturation pressure is 7.3555 MPa, with
    // saturated vapor 406.42 kg/m3 and liquid 530.30 kg/m3. GERG-2008's short CO2 equation is not
    // expected to reproduce the critical region closely (1.4 % and 0.7 % here); the check is that
    // both searches converge to distinct roots of the right kind, within 3 %.
    const m = model(['CO2']);
    const M = 44.0095e-3;
    const gas = m.density(304, 7.3555e6, [1]);
    const liquid = m.density(304, 7.3555e6, [1], { root: 'liquid' });
    expect(gas.status).toBe('converged');
    expect(liquid.status).toBe('converged');
    expect(gas.root).toBe('gas');
    expect(liquid.root).toBe('liquid');
    expect(gas.D).toBeLessThan(liquid.D);
    expect(gas.phase).toBe('gas-like');
    expect(liquid.phase).toBe('liquid-like');
    expect(rel(gas.D * M, 406.42)).toBeLessThan(0.03);
    expect(rel(liquid.D * M, 530.3)).toBeLessThan(0.03);
  });

  it('converges on the critical isotherm region of carbon dioxide without NaN', () => {
    const m = model(['CO2']);
    for (const T of [304.1282, 304.2, 305, 310]) {
      for (const P of [7.2e6, 7.3773e6, 7.4e6, 7.6e6, 8e6]) {
        for (const root of ['gas', 'liquid'] as const) {
          const r = m.density(T, P, [1], { root });
          expect(Number.isFinite(r.D), `${T} K ${P} Pa ${root}`).toBe(true);
          expect(Number.isFinite(r.Z)).toBe(true);
          expect(r.status, `${T} K ${P} Pa ${root}: ${r.message}`).toBe('converged');
          expect(Math.abs(r.residual)).toBeLessThan(1e-9);
        }
      }
    }
  });

  it('returns the liquid root, and says so, when a gas is asked for above every gas-like state', () => {
    // Methane at 100 K, 10 MPa: far above its vapor pressure (about 0.03 MPa), the isotherm
    // reaches 10 MPa only on the liquid branch. Setzmann and Wagner (1991), Table 40: 446.02 kg/m3.
    const m = model(['CH4']);
    const r = m.density(100, 10e6, [1]);
    expect(r.status).toBe('converged');
    expect(r.root).toBe('liquid');
    expect(r.phase).toBe('liquid-like');
    expect(r.message).toMatch(/no gas-like root/);
    expect(rel(r.D * 16.04246e-3, 446.02)).toBeLessThan(5e-4);
  });

  it('returns the gas root, and says so, when a liquid is asked for below the dense branch', () => {
    // Carbon dioxide at 303 K (0.4 % below its critical temperature), 6 MPa: the dense branch of the
    // isotherm does not come down to 6 MPa (its lowest pressure, the liquid spinodal, lies above),
    // so the only root is the gas.
    const m = model(['CO2']);
    const liquid = m.density(303, 6e6, [1], { root: 'liquid' });
    const gas = m.density(303, 6e6, [1]);
    expect(liquid.status).toBe('converged');
    expect(liquid.root).toBe('gas');
    expect(liquid.message).toMatch(/no liquid-like root/);
    expect(rel(liquid.D, gas.D)).toBeLessThan(1e-12);
    expect(gas.phase).toBe('gas-like');
  });

  it('keeps the metastable gas root below the vapor pressure when a liquid exists too', () => {
    // CO2 at 230 K, 1 MPa: liquid is stable (Span and Wagner (1996), Table 35: 1128.97 kg/m3) and the
    // gas root is a supersaturated vapor. The two searches return the two roots; phase stability is
    // a flash's question, not the density solver's.
    const m = model(['CO2']);
    const gas = m.density(230, 1e6, [1]);
    const liquid = m.density(230, 1e6, [1], { root: 'liquid' });
    expect(gas.status).toBe('converged');
    expect(gas.phase).toBe('gas-like');
    expect(gas.D * 44.0095e-3).toBeLessThan(40);
    expect(rel(liquid.D * 44.0095e-3, 1128.97)).toBeLessThan(5e-4);
  });

  it('converges over a grid across the two-phase regions of CO2-methane, methane-decane and water', () => {
    const cases: { m: Gerg2008Model; x: number[]; Tmin: number }[] = [
      { m: model(['CO2', 'CH4']), x: [0.9, 0.1], Tmin: 200 },
      { m: model(['nC10H22', 'CH4']), x: [0.3, 0.7], Tmin: 200 },
      // Water from 280 K: below its melting temperature the water equation is far outside its
      // range and its isotherms lose the liquid branch (see the next test).
      { m: model(['H2O']), x: [1], Tmin: 280 },
    ];
    let converged = 0;
    let total = 0;
    for (const { m, x, Tmin } of cases) {
      for (let T = Tmin; T <= 660; T += 23) {
        for (const P of [1e5, 1e6, 5e6, 1e7, 3e7, 7e7]) {
          for (const root of ['gas', 'liquid'] as const) {
            const r = m.density(T, P, x, { root });
            total++;
            expect(Number.isFinite(r.D) && r.D > 0, `${m.ids} ${T} K ${P} Pa ${root}`).toBe(true);
            expect(Number.isFinite(r.Z)).toBe(true);
            expect(['converged', 'not-converged']).toContain(r.status);
            if (r.status === 'converged') {
              converged++;
              expect(Math.abs(r.residual)).toBeLessThanOrEqual(1e-9);
            } else {
              expect(r.message).not.toBe('');
            }
          }
        }
      }
    }
    expect(converged).toBe(total);
  });

  it('says it did not converge, without NaN, where the isotherm has no root at all', () => {
    // Water at 200 K, far below its melting temperature: GERG-2008's water equation, extrapolated
    // there, has no gas-like root above a few Pa and a dense branch whose lowest pressure is about
    // 140 MPa, so 10 MPa has no root on either branch.
    const m = model(['H2O']);
    for (const root of ['gas', 'liquid'] as const) {
      const r = m.density(200, 10e6, [1], { root });
      expect(r.status).toBe('not-converged');
      expect(Number.isFinite(r.D) && Number.isFinite(r.Z)).toBe(true);
      expect(r.message).toMatch(/no density found.*not a solution/);
    }
  });

  it('refuses invalid input with a message', () => {
    const m = model(['CH4', 'N2']);
    expect(m.density(300, -1, [0.5, 0.5]).status).toBe('invalid');
    expect(m.density(Number.NaN, 1e6, [0.5, 0.5]).status).toBe('invalid');
    const r = m.density(300, 1e6, [0.5, 0.4]);
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/sum to 0\.9/);
    expect(m.density(300, 1e6, [1]).message).toMatch(/2 components/);
    expect(() => m.properties(300, 0, [0.5, 0.5])).toThrow(RangeError);
  });

  it('fills a result object it is given', () => {
    const m = model(['CH4', 'N2']);
    const out = m.density(300, 1e6, [0.9, 0.1]);
    const again = m.density(280, 2e6, [0.9, 0.1], undefined, out);
    expect(again).toBe(out);
    expect(out.status).toBe('converged');
    const pOut = m.properties(280, out.D, [0.9, 0.1]);
    expect(m.properties(300, out.D, [0.9, 0.1], pOut)).toBe(pOut);
  });
});

describe('GERG-2008 model set-up', () => {
  it('covers the 21 components and names those it does not', () => {
    expect(GERG2008_IDS).toHaveLength(21);
    expect(makeGerg2008(['CH4', 'NH3'])).toBeUndefined();
    expect(gergUnsupported(['CH4', 'NH3', 'CH3OH', 'H2'])).toEqual(['NH3', 'CH3OH']);
    expect(gergUnsupported(PAPER_ORDER)).toEqual([]);
    expect(() => makeGerg2008(['CH4', 'CH4'])).toThrow(RangeError);
  });

  it('reduces a pure fluid to its critical point', () => {
    const m = model(['CO2']);
    const r = m.reducing([1]);
    expect(r.TR).toBe(304.1282);
    expect(rel(r.rhoR, 10624.978698)).toBeLessThan(1e-14);
  });
});

describe('GERG-2008 stated density uncertainty', () => {
  const natural = { CH4: 0.9, C2H6: 0.05, N2: 0.05 };
  it('is 0.1 % for a natural gas in the normal range, gas phase', () => {
    const u = gergDensityUncertainty(300, 10e6, natural);
    expect(u).toMatchObject({ relative: 0.001, region: 'gas-normal', inNormalRange: true, inExtendedRange: true, stated: true, coverage: 2 });
    expect(u.notes).toEqual([]);
  });
  it('gives the upper end of the stated band for liquid-like states and the extended range', () => {
    expect(gergDensityUncertainty(120, 5e6, natural, 'liquid-like')).toMatchObject({ relative: 0.005, region: 'liquid-normal', stated: true });
    expect(gergDensityUncertainty(500, 50e6, natural)).toMatchObject({ relative: 0.005, region: 'extended', inNormalRange: false, inExtendedRange: true });
    expect(gergDensityUncertainty(300, 50e6, natural).region).toBe('extended');
  });
  it('says when its figure is a bound of its own and when there is none', () => {
    expect(gergDensityUncertainty(200, 5e6, natural)).toMatchObject({ relative: 0.005, stated: false, region: 'gas-normal-below-250K' });
    expect(gergDensityUncertainty(800, 5e6, natural)).toMatchObject({ relative: null, region: 'outside', inExtendedRange: false });
    expect(gergDensityUncertainty(300, 80e6, natural).relative).toBeNull();
  });
  it('notes that a hydrogen-rich loop gas is not a natural gas', () => {
    const u = gergDensityUncertainty(313.15, 15e6, { H2: 0.7, N2: 0.23, CH4: 0.04, Ar: 0.02, CO: 0.01 });
    expect(u.relative).toBe(0.001);
    expect(u.notes.join(' ')).toMatch(/not|natural gases/);
    expect(u.notes.join(' ')).toMatch(/binary-specific/);
  });
});
