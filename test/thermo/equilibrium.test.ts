/**
 * Chemical equilibrium of converters (src/thermo/equilibrium.ts, equilibrium-adiabatic.ts):
 * measured ammonia equilibria, handbook equilibrium constants, the equations themselves checked
 * independently, approaches, the cases that cannot proceed, and the adiabatic converter.
 * Every reference value names its source beside it; values recalled without the document in
 * front of us say "(from memory)".
 */
import { describe, expect, it } from 'vitest';
import { findComponent } from '../../src/thermo/components.js';
import { makeEos } from '../../src/thermo/eos.js';
import { phaseEnthalpy } from '../../src/thermo/enthalpy.js';
import { prepareEquilibrium, type EquilibriumOptions, type EquilibriumReaction, type EquilibriumSolver } from '../../src/thermo/equilibrium.js';
import { newAdiabaticResult, solveAdiabaticEquilibrium } from '../../src/thermo/equilibrium-adiabatic.js';
import { parseFormula } from '../../src/thermo/formula.js';
import { gIG } from '../../src/thermo/ideal-gas.js';
import type { ComponentData, Eos, EosName } from '../../src/thermo/types.js';

const R = 8.314462618; // J/(mol K), as src/thermo/constants.ts
const ATM = 101325;
const BAR = 1e5;

function comps(ids: readonly string[]): ComponentData[] {
  return ids.map((id) => {
    const c = findComponent(id);
    if (!c) throw new Error(`no component ${id}`);
    return c;
  });
}

/** Coefficients over ids from a map, e.g. { N2: -1, H2: -3, NH3: 2 }. */
function nu(ids: readonly string[], m: Record<string, number>): number[] {
  return ids.map((id) => m[id] ?? 0);
}

function prepared(eosName: EosName, ids: readonly string[], reactions: EquilibriumReaction[], options?: EquilibriumOptions): { eos: Eos; solver: EquilibriumSolver } {
  const eos = makeEos(eosName, comps(ids));
  const p = prepareEquilibrium(eos, reactions, options);
  if (p.status !== 'ok') throw new Error(p.problems.map((q) => q.message).join('; '));
  return { eos, solver: p.solver };
}

const sum = (a: ArrayLike<number>) => Array.from(a).reduce((s, v) => s + v, 0);

/** ln K from gIG, assembled here: -sum nu g / (R T). */
function lnKHere(cs: readonly ComponentData[], coef: readonly number[], T: number): number {
  return -coef.reduce((s, v, i) => s + (v === 0 ? 0 : v * gIG(cs[i], T)), 0) / (R * T);
}

/** The equilibrium condition recomputed here: sum nu ln(y phi P / 1 bar) - ln K at Teq (phi at Teq). */
function conditionResidual(eos: Eos, Teq: number, P: number, coef: readonly number[], flows: ArrayLike<number>): number {
  const N = sum(flows);
  const y = Float64Array.from(flows, (v) => v / N);
  const lnPhi = new Float64Array(eos.n);
  eos.lnPhi(Teq, P, y, 'vapor', lnPhi);
  let s = 0;
  coef.forEach((v, i) => {
    if (v !== 0) s += v * (Math.log(y[i]) + lnPhi[i] + Math.log(P / BAR));
  });
  return s - lnKHere(eos.components, coef, Teq);
}

/** Atoms of each element in flows. */
function elements(cs: readonly ComponentData[], flows: ArrayLike<number>): Record<string, number> {
  const out: Record<string, number> = {};
  cs.forEach((c, i) => {
    for (const [el, k] of Object.entries(parseFormula(c.formula))) out[el] = (out[el] ?? 0) + k * flows[i];
  });
  return out;
}

function expectElementsConserved(cs: readonly ComponentData[], inlet: ArrayLike<number>, outlet: ArrayLike<number>): void {
  const a = elements(cs, inlet);
  const b = elements(cs, outlet);
  for (const el of Object.keys(a)) expect(Math.abs(b[el] - a[el]), el).toBeLessThan(1e-12 * Math.max(1, a[el]));
}

/** Bisection for a root of an increasing f on [lo, hi]. */
function bisect(f: (x: number) => number, lo: number, hi: number, tol = 1e-15): number {
  for (let k = 0; k < 300 && hi - lo > tol * Math.max(1, Math.abs(lo)); k++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

const NH3_IDS = ['N2', 'H2', 'NH3'] as const;
const NH3_RX: EquilibriumReaction = { nu: nu(NH3_IDS, { N2: -1, H2: -3, NH3: 2 }), key: 0, label: 'N2 + 3 H2 -> 2 NH3' };

/** Mole percent of ammonia at equilibrium from a 1:3 N2:H2 feed. */
function ammoniaPercent(solver: EquilibriumSolver, T: number, P: number): number {
  const out = solver.solve({ T, P, flows: [1, 3, 0] });
  expect(out.status, out.message).toBe('converged');
  return (100 * out.flows[2]) / sum(out.flows);
}

describe('ammonia synthesis equilibrium against the measurements of Larson and Dodge', () => {
  // Larson and Dodge, J. Am. Chem. Soc. 45 (1923) 2918; Larson, J. Am. Chem. Soc. 46 (1924) 367
  // (values from memory): mole percent NH3 at equilibrium from a 3:1 H2:N2 feed.
  const MEASURED: Readonly<Record<number, readonly [number, number][]>> = {
    450: [[10, 2.04], [30, 5.8], [50, 9.17], [100, 16.43], [300, 35.82]],
    400: [[10, 3.85], [30, 10.09], [50, 15.27], [100, 25.12], [300, 47.0]],
  };
  const srk = prepared('SRK', NH3_IDS, [NH3_RX]).solver;
  const pr = prepared('PR', NH3_IDS, [NH3_RX]).solver;
  const ideal = prepared('ideal', NH3_IDS, [NH3_RX]).solver;
  const cases = Object.entries(MEASURED).flatMap(([tc, pts]) => pts.map(([atm, y]) => [Number(tc), atm, y] as const));

  // The standard of the issue: every measured point within 1.5 mole percent (absolute) with SRK.
  // Where the tolerance goes: at 10 atm, where the gas is nearly ideal, the computed values run
  // 0.2 points high (K from this project's formation data is about 15 % above what these
  // measurements imply at 450 degC, see the Gillespie-Beattie check in thermochemistry.test.ts);
  // the rest is the cubic's one-fluid mixing rule for ammonia at high pressure.
  it.each(cases)('SRK at %d degC and %d atm: %f mole percent NH3 within 1.5 points', (tc, atm, measured) => {
    const y = ammoniaPercent(srk, tc + 273.15, atm * ATM);
    expect(Math.abs(y - measured)).toBeLessThan(1.5);
  });

  it.each(cases)('Peng-Robinson at %d degC and %d atm: %f mole percent NH3 within 1.5 points', (tc, atm, measured) => {
    const y = ammoniaPercent(pr, tc + 273.15, atm * ATM);
    expect(Math.abs(y - measured)).toBeLessThan(1.5);
  });

  it('the real-gas effect: several points at 300 atm, nothing at 10 atm; the ideal gas misses the measurements at 300 atm', () => {
    for (const tc of [400, 450]) {
      const T = tc + 273.15;
      const at300 = ammoniaPercent(srk, T, 300 * ATM) - ammoniaPercent(ideal, T, 300 * ATM);
      expect(at300).toBeGreaterThan(2.5);
      expect(Math.abs(ammoniaPercent(srk, T, 10 * ATM) - ammoniaPercent(ideal, T, 10 * ATM))).toBeLessThan(0.05);
      // Larson and Dodge (above): the ideal gas is more than 1.5 points off at 300 atm.
      expect(Math.abs(ammoniaPercent(ideal, T, 300 * ATM) - MEASURED[tc][4][1])).toBeGreaterThan(1.5);
    }
  });

  it('the ideal-gas answer equals the closed form K (P/P0)^2 = 256 y^2 / (27 (1 - y)^4), solved here by bisection', () => {
    const cs = comps(NH3_IDS);
    for (const [T, P] of [[723.15, 100 * ATM], [673.15, 300 * ATM], [773.15, 10 * BAR]] as const) {
      const K = Math.exp(lnKHere(cs, NH3_RX.nu as number[], T));
      const a = K * (P / BAR) ** 2;
      const y = bisect((v) => 256 * v * v - 27 * a * (1 - v) ** 4, 0, 1);
      expect(Math.abs(ammoniaPercent(ideal, T, P) / 100 - y)).toBeLessThan(1e-10);
    }
  });

  it('converges to |ln(Q/K)| below 1e-11 in a few Newton steps, and the condition recomputed independently holds to 1e-10', () => {
    const { eos, solver } = prepared('SRK', NH3_IDS, [NH3_RX]);
    const out = solver.solve({ T: 723.15, P: 300 * ATM, flows: [1, 3, 0] });
    expect(out.status).toBe('converged');
    expect(out.residual).toBeLessThan(1e-11);
    expect(out.iterations).toBeLessThan(12);
    expect(Math.abs(conditionResidual(eos, 723.15, 300 * ATM, NH3_RX.nu as number[], out.flows))).toBeLessThan(1e-10);
    expectElementsConserved(eos.components, [1, 3, 0], out.flows);
    // The key N2's conversion: extent / inlet N2.
    expect(out.conversion[0]).toBeCloseTo(out.extents[0] / 1, 14);
  });
});

describe('equilibrium constants against handbook tables and correlations', () => {
  const WGS_IDS = ['CO', 'H2O', 'CO2', 'H2'] as const;
  it('water-gas shift CO + H2O -> CO2 + H2, 400-1000 K, against NIST-JANAF 4th ed. Delta_f G', () => {
    // NIST-JANAF Thermochemical Tables, 4th ed. (Chase, J. Phys. Chem. Ref. Data Monograph 9, 1998),
    // Delta_f G of CO(g), CO2(g), H2O(g) in kJ/mol, as tabulated (read from a digital copy of the tables);
    // the shift's Delta G = CO2 - CO - H2O, K = exp(-Delta G / (R T)): 1552 at 400 K, 137.7 at 500 K,
    // 1.438 at 1000 K. Tolerance 0.15 kJ/mol in Delta G (1-4 % in K), as in thermochemistry.test.ts: the
    // spread between the CODATA formation data used here and JANAF's, and of the heat-capacity integrals.
    const JANAF: readonly (readonly [number, number, number, number])[] = [
      // T K, CO, CO2, H2O
      [400, -146.338, -394.675, -223.901],
      [500, -155.414, -394.939, -219.051],
      [600, -164.486, -395.182, -214.007],
      [700, -173.518, -395.398, -208.812],
      [800, -182.497, -395.586, -203.496],
      [900, -191.416, -395.748, -198.083],
      [1000, -200.275, -395.886, -192.59],
    ];
    const { solver } = prepared('ideal', WGS_IDS, [{ nu: nu(WGS_IDS, { CO: -1, H2O: -1, CO2: 1, H2: 1 }) }]);
    for (const [T, co, co2, h2o] of JANAF) {
      const out = solver.solve({ T, P: BAR, flows: [1, 1, 0, 0] });
      const dG = (co2 - co - h2o) * 1000;
      expect(Math.abs(-out.lnK[0] * R * T - dG), `${T} K`).toBeLessThan(150);
      // At 1 bar, ideal gas, equimolar CO and H2O: K = (x / (1 - x))^2, so x = sqrt(K) / (1 + sqrt(K)).
      const s = Math.sqrt(Math.exp(out.lnK[0]));
      expect(Math.abs(out.extents[0] - s / (1 + s)), `${T} K`).toBeLessThan(1e-12);
    }
  });

  const MEOH_IDS = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH', 'N2'] as const;
  const SYNTH: EquilibriumReaction = { nu: nu(MEOH_IDS, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 }), key: 2, label: 'CO2 + 3 H2 -> CH3OH + H2O' };
  const SHIFT: EquilibriumReaction = { nu: nu(MEOH_IDS, { CO2: -1, H2: -1, CO: 1, H2O: 1 }), key: 2, label: 'CO2 + H2 -> CO + H2O' };

  it('methanol synthesis and reverse shift against Graaf, Sijtsema, Stamhuis and Joosten, Chem. Eng. Sci. 41 (1986) 2883', () => {
    // (from memory) log10 Kp1 = 5139/T - 12.621 (CO + 2 H2 -> CH3OH, bar^-2);
    // log10 Kp2 = -2073/T + 2.029 (CO2 + H2 -> CO + H2O). CO2 + 3 H2 -> CH3OH + H2O is their sum: Kp1 Kp2.
    // Tolerances: the reverse shift within 6 % (it comes out 4-5 % below); Kp1 from this project's data runs
    // about 20 % above Graaf's two-constant fit, which assumes a constant heat of reaction (see
    // thermochemistry.test.ts), so the product (13-16 % above) within 20 %.
    const { solver } = prepared('ideal', MEOH_IDS, [SYNTH, SHIFT]);
    for (const T of [473.15, 523.15, 573.15]) {
      const out = solver.solve({ T, P: 50 * BAR, flows: [3, 0.1, 1, 0, 0, 0.1] });
      expect(out.status).toBe('converged');
      const k1 = 10 ** (5139 / T - 12.621);
      const k2 = 10 ** (-2073 / T + 2.029);
      expect(Math.abs(Math.exp(out.lnK[1]) / k2 - 1), `shift ${T} K`).toBeLessThan(0.06);
      expect(Math.abs(Math.exp(out.lnK[0]) / (k1 * k2) - 1), `synthesis ${T} K`).toBeLessThan(0.2);
    }
  });

  it('methanol synthesis gas at 250 degC and 50 bar (SRK): both conditions recomputed here hold to 1e-10, elements conserved', () => {
    // No published equilibrium composition was found for this feed; the check is the equations themselves.
    const { eos, solver } = prepared('SRK', MEOH_IDS, [SYNTH, SHIFT]);
    const inlet = [0.66, 0.04, 0.2, 0.002, 0.005, 0.093]; // invented synthesis gas, for the check only
    const T = 523.15;
    const P = 50 * BAR;
    const out = solver.solve({ T, P, flows: inlet });
    expect(out.status, out.message).toBe('converged');
    for (const [r, rx] of [SYNTH, SHIFT].entries()) {
      expect(Math.abs(conditionResidual(eos, T, P, rx.nu as number[], out.flows)), rx.label).toBeLessThan(1e-10);
      expect(out.Teq[r]).toBe(T);
    }
    expectElementsConserved(eos.components, inlet, out.flows);
    for (const v of out.flows) expect(v).toBeGreaterThan(0);
    expect(out.flows[4]).toBeGreaterThan(inlet[4]); // methanol formed
    expect(out.conversion[0]).toBeCloseTo((out.extents[0] * 1) / inlet[2], 14);
  });

  it('low-pressure limit: SRK at 1 kPa equals the ideal-gas equilibrium, solved here by nested bisection', () => {
    const cs = comps(MEOH_IDS);
    const T = 523.15;
    const P = 1000;
    const inlet = [3, 0.2, 1, 0.01, 0.001, 0.1];
    const lnK1 = lnKHere(cs, SYNTH.nu as number[], T);
    const lnK2 = lnKHere(cs, SHIFT.nu as number[], T);
    const n = (x1: number, x2: number) => inlet.map((v, i) => v + (SYNTH.nu[i] as number) * x1 + (SHIFT.nu[i] as number) * x2);
    const F = (coef: ArrayLike<number>, lnK: number, f: number[]) => {
      const N = sum(f);
      let s = -lnK;
      for (let i = 0; i < f.length; i++) if (coef[i] !== 0) s += coef[i] * Math.log((f[i] / N) * (P / BAR));
      return s;
    };
    // Bounds keeping every species positive, for x2 given x1 and for x1.
    const x1Of = (x2: number) => {
      const lo = Math.max(-inlet[4], -(inlet[3] + x2));
      const hi = Math.min(inlet[2] - x2, (inlet[0] - x2) / 3);
      return bisect((x1) => F(SYNTH.nu, lnK1, n(x1, x2)), lo, hi);
    };
    const x2 = bisect((x2) => F(SHIFT.nu, lnK2, n(x1Of(x2), x2)), Math.max(-inlet[1], -inlet[3] + 1e-300), Math.min(inlet[2], inlet[0]) - 1e-9);
    const x1 = x1Of(x2);
    const ideal = prepared('ideal', MEOH_IDS, [SYNTH, SHIFT]).solver.solve({ T, P, flows: inlet });
    expect(Math.abs(ideal.extents[0] - x1)).toBeLessThan(1e-10);
    expect(Math.abs(ideal.extents[1] - x2)).toBeLessThan(1e-10);
    const real = prepared('SRK', MEOH_IDS, [SYNTH, SHIFT]).solver.solve({ T, P, flows: inlet });
    expect(Math.abs(real.extents[0] - x1)).toBeLessThan(1e-5 * Math.abs(x1) + 1e-12);
    expect(Math.abs(real.extents[1] - x2)).toBeLessThan(1e-5 * Math.abs(x2) + 1e-12);
  });
});

describe('approach to equilibrium', () => {
  it('an approach of 20 K holds exothermic ammonia synthesis exactly at the equilibrium of T + 20 K', () => {
    const T = 723.15;
    const P = 150 * ATM;
    const plain = prepared('SRK', NH3_IDS, [NH3_RX]).solver;
    const held = prepared('SRK', NH3_IDS, [{ ...NH3_RX, approach: 20 }]).solver;
    const a = held.solve({ T, P, flows: [1, 3, 0] });
    const b = plain.solve({ T: T + 20, P, flows: [1, 3, 0] });
    const c = plain.solve({ T, P, flows: [1, 3, 0] });
    expect(a.heat[0]).toBeLessThan(0);
    expect(a.Teq[0]).toBe(T + 20);
    expect(a.approach[0]).toBe(20);
    expect(a.lnK[0]).toBe(b.lnK[0]);
    for (let i = 0; i < 3; i++) expect(Math.abs(a.flows[i] - b.flows[i])).toBeLessThan(1e-12);
    expect(a.extents[0]).toBeLessThan(c.extents[0]); // below equilibrium at T
    expect(a.T).toBe(T);
  });

  it('an endothermic reaction (steam reforming of methane) is held at the equilibrium of T - 20 K', () => {
    const ids = ['CH4', 'H2O', 'CO', 'H2'] as const;
    const rx: EquilibriumReaction = { nu: nu(ids, { CH4: -1, H2O: -1, CO: 1, H2: 3 }), key: 0, label: 'CH4 + H2O -> CO + 3 H2' };
    const plain = prepared('SRK', ids, [rx]).solver;
    const held = prepared('SRK', ids, [{ ...rx, approach: 20 }]).solver;
    const T = 1000;
    const P = 20 * BAR;
    const inlet = [1, 3, 0, 0.1];
    const a = held.solve({ T, P, flows: inlet });
    const b = plain.solve({ T: T - 20, P, flows: inlet });
    const c = plain.solve({ T, P, flows: inlet });
    expect(a.heat[0]).toBeGreaterThan(0);
    expect(a.Teq[0]).toBe(980);
    for (let i = 0; i < 4; i++) expect(Math.abs(a.flows[i] - b.flows[i])).toBeLessThan(1e-12);
    expect(a.conversion[0]).toBeLessThan(c.conversion[0]);
    expect(a.conversion[0]).toBeGreaterThan(0);
  });

  it('methanol synthesis and the shift with 10 K each, the shift running backwards on a CO-rich gas: both held at T + 10 K, each short of the equilibrium of T', () => {
    const ids = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH'] as const;
    const synth = { nu: nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 }), approach: 10 };
    const shift = { nu: nu(ids, { CO2: -1, H2: -1, CO: 1, H2O: 1 }), approach: 10 };
    const { eos, solver } = prepared('SRK', ids, [synth, shift]);
    const T = 513.15;
    const P = 80 * BAR;
    const inlet = [0.7, 0.08, 0.1, 0.005, 0.01];
    const out = solver.solve({ T, P, flows: inlet });
    expect(out.status, out.message).toBe('converged');
    // On this CO-rich gas the shift runs backwards (CO + H2O -> CO2 + H2, exothermic that way): its
    // extent at the equilibrium of T is negative, so its approach holds it at T + 10 K as well.
    const atT = prepared('SRK', ids, [{ ...synth, approach: 0 }, { ...shift, approach: 0 }]).solver.solve({ T, P, flows: inlet });
    expect(atT.extents[0]).toBeGreaterThan(0);
    expect(atT.extents[1]).toBeLessThan(0);
    expect(out.heat[1]).toBeGreaterThan(0);
    expect(out.Teq[0]).toBe(T + 10);
    expect(out.Teq[1]).toBe(T + 10);
    expect(Math.abs(conditionResidual(eos, T + 10, P, synth.nu, out.flows))).toBeLessThan(1e-10);
    expect(Math.abs(conditionResidual(eos, T + 10, P, shift.nu, out.flows))).toBeLessThan(1e-10);
    // Each stops short of the equilibrium of T on the side it came from: ln(Q/K(T)) < 0 for the
    // synthesis (forward), > 0 for the shift (backward); and each extent is smaller in size.
    expect(conditionResidual(eos, T, P, synth.nu, out.flows)).toBeLessThan(0);
    expect(conditionResidual(eos, T, P, shift.nu, out.flows)).toBeGreaterThan(0);
    expect(out.extents[0]).toBeLessThan(atT.extents[0]);
    expect(out.extents[1]).toBeGreaterThan(atT.extents[1]);
  });

  it('a reaction running backwards (ammonia cracked, written as the synthesis) stops short of equilibrium: held at T - approach', () => {
    // NIST-JANAF Thermochemical Tables, 4th ed. (Chase 1998), Delta_f G(NH3, g) at 700 K = 27.190 kJ/mol
    // (from memory): K of N2 + 3 H2 -> 2 NH3 at 700 K (1 bar standard state) = exp(-2 x 27190 / (R 700)).
    // Ideal gas at 10 bar, 1 mol/s NH3 cracked by a fraction a: NH3 1 - a, N2 a/2, H2 3a/2, total 1 + a,
    // and K (P/1 bar)^2 = y_NH3^2 / (y_N2 y_H2^3), solved for a here by bisection.
    // The reactor is at 750 K with an approach of 50 K. Written as the synthesis, the reaction is
    // exothermic as written but runs backwards (endothermic that way), so it is held at the equilibrium of
    // 700 K, where less ammonia is cracked than at 750 K; T + 50 K would crack more than the
    // equilibrium of the reactor's own temperature allows.
    const P = 10 * BAR;
    const Kjanaf = Math.exp((-2 * 27190) / (R * 700));
    const resid = (a: number) => {
      const N = 1 + a;
      const yA = (1 - a) / N;
      const yN = a / 2 / N;
      const yH = (1.5 * a) / N;
      return Math.log(yN * yH ** 3 * Kjanaf * (P / BAR) ** 2) - 2 * Math.log(yA); // increasing in a
    };
    const a700 = bisect(resid, 1e-9, 1 - 1e-12);
    const plain = prepared('ideal', NH3_IDS, [NH3_RX]).solver;
    const held = prepared('ideal', NH3_IDS, [{ ...NH3_RX, approach: 50 }]).solver;
    const inlet = [0, 0, 1]; // N2, H2, NH3
    const out = held.solve({ T: 750, P, flows: inlet });
    const eq = plain.solve({ T: 750, P, flows: inlet });
    expect(out.status, out.message).toBe('converged');
    expect(out.heat[0]).toBeLessThan(0);
    expect(eq.extents[0]).toBeLessThan(0);
    expect(out.Teq[0]).toBe(700);
    expect(out.extents[0]).toBeLessThan(0);
    expect(out.extents[0]).toBeGreaterThan(eq.extents[0]); // less cracked than at equilibrium
    // Against JANAF: the ammonia left equals 1 - a at 700 K within 0.2 % (the formation data here and
    // JANAF's differ by about 0.01 kJ/mol in Delta_f G of NH3 at 700 K).
    expect(Math.abs(out.flows[2] / (1 - a700) - 1)).toBeLessThan(2e-3);
  });

  it('a gas fed at the equilibrium of T (the outlet of a bed at equilibrium, to a second bed at T) does not react, whatever the approach', () => {
    // At the equilibrium of T the Gibbs energy of the gas at T is at its minimum (the criterion of
    // chemical equilibrium, e.g. Smith, Van Ness and Abbott, 7th ed., Sec. 13.2): a catalyst at T moves
    // it neither way. Held at the equilibrium of T + 20 K it would crack ammonia (and, had the
    // direction come out backwards by rounding, at T - 20 K it would make more than the equilibrium).
    const T = 723.15;
    const P = 150 * ATM;
    const plain = prepared('SRK', NH3_IDS, [NH3_RX]).solver;
    const held = prepared('SRK', NH3_IDS, [{ ...NH3_RX, approach: 20 }]).solver;
    const bed1 = Float64Array.from(plain.solve({ T, P, flows: [1, 3, 0] }).flows);
    const out = held.solve({ T, P, flows: bed1 });
    expect(out.status, out.message).toBe('converged');
    expect(out.extents[0]).toBe(0);
    for (let i = 0; i < 3; i++) expect(out.flows[i]).toBe(bed1[i]);
    expect(out.message).toMatch(/within its approach of the equilibrium of 723.15 K/);
    // Slightly short of that equilibrium (1 % of the ammonia taken out), still within 20 K: no reaction.
    const near = Float64Array.from(bed1);
    near[2] *= 0.99;
    expect(held.solve({ T, P, flows: near }).extents[0]).toBe(0);
    // Far short of it (half the ammonia taken out): the reaction runs forward to the equilibrium of T + 20 K.
    const far = Float64Array.from(bed1);
    far[2] *= 0.5;
    const a = held.solve({ T, P, flows: far });
    const b = plain.solve({ T: T + 20, P, flows: far });
    expect(a.extents[0]).toBeGreaterThan(0);
    expect(Math.abs(a.extents[0] - b.extents[0])).toBeLessThan(1e-12);
  });

  it('an approach that leaves no temperature is refused at solve time; a negative approach when prepared', () => {
    const ids = ['CH4', 'H2O', 'CO', 'H2'] as const;
    const rx = { nu: nu(ids, { CH4: -1, H2O: -1, CO: 1, H2: 3 }), approach: 400, label: 'reforming' };
    const { solver } = prepared('ideal', ids, [rx]);
    const out = solver.solve({ T: 350, P: BAR, flows: [1, 1, 0, 0] });
    expect(out.status).toBe('invalid');
    expect(out.reason).toBe('no-temperature');
    expect(out.message).toMatch(/reforming is endothermic/);
    const p = prepareEquilibrium(makeEos('ideal', comps(ids)), [{ ...rx, approach: -5 }]);
    expect(p.status).toBe('invalid');
    if (p.status === 'invalid') expect(p.problems[0].message).toMatch(/approach of reforming is -5 K/);
  });
});

describe('what cannot proceed, and what is not a gas', () => {
  it('a species without formation data or heat capacity: the message names it and what it lacks', () => {
    // A file's own component (constants only): dimethyl ether written as "DME", Tc, Pc, omega from
    // Poling, Prausnitz and O'Connell, 5th ed., App. A (from memory); it has no cp, hf, gf.
    const dme: ComponentData = { id: 'DME', name: 'DME', formula: 'C2H6O', MW: 0.04607, Tc: 400.1, Pc: 53.7e5, omega: 0.2, source: 'given in the file' };
    const cs = [...comps(['CH3OH', 'H2O']), dme];
    const p = prepareEquilibrium(makeEos('SRK', cs), [
      { nu: [-2, 1, 1], label: '2 CH3OH -> DME + H2O' },
    ]);
    expect(p.status).toBe('invalid');
    if (p.status !== 'invalid') return;
    expect(p.problems).toHaveLength(1);
    expect(p.problems[0].reaction).toBe(0);
    expect(p.problems[0].components).toEqual([2]);
    expect(p.problems[0].message).toMatch(/2 CH3OH -> DME \+ H2O cannot be held at equilibrium: DME has no ideal-gas heat capacity \(cp\), no enthalpy of formation \(hf\), no Gibbs energy of formation \(gf\)/);
    expect(p.problems[0].help).toMatch(/fixed `conversion`/);
  });

  it('a reaction whose reactant and product reach the reactor from nowhere keeps a zero extent, and says so', () => {
    const { solver } = prepared('SRK', ['N2', 'H2', 'NH3', 'Ar'], [{ nu: [-1, -3, 2, 0], label: 'N2 + 3 H2 -> 2 NH3' }]);
    const out = solver.solve({ T: 700, P: 100 * BAR, flows: [0, 3, 0, 0.1] });
    expect(out.status).toBe('converged');
    expect(out.blocked[0]).toBe(1);
    expect(out.extents[0]).toBe(0);
    expect(Array.from(out.flows)).toEqual([0, 3, 0, 0.1]);
    expect(out.message).toMatch(/N2 \+ 3 H2 -> 2 NH3 cannot proceed: N2, NH3 reach the reactor from no inlet and no reaction can form them, so its extent is zero/);
    // Ammonia alone decomposes: the reaction runs backwards.
    const back = solver.solve({ T: 700, P: 100 * BAR, flows: [0, 0, 1, 0] });
    expect(back.status).toBe('converged');
    expect(back.extents[0]).toBeLessThan(0);
    expect(back.blocked[0]).toBe(0);
    expect(back.message).toBe('');
  });

  it('two reactions that can proceed only together do so: CO + H2 gives methanol through synthesis minus shift', () => {
    const ids = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH'] as const;
    const synth = { nu: nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 }), label: 'synthesis' };
    const shift = { nu: nu(ids, { CO2: -1, H2: -1, CO: 1, H2O: 1 }), label: 'shift' };
    const { solver } = prepared('SRK', ids, [synth, shift]);
    const T = 523.15;
    const P = 50 * BAR;
    const out = solver.solve({ T, P, flows: [2, 1, 0, 0, 0] });
    expect(out.status, out.message).toBe('converged');
    expect(Array.from(out.zero)).toEqual([0, 0, 1, 1, 0]);
    expect(out.flows[2]).toBe(0);
    expect(out.flows[3]).toBe(0);
    expect(out.extents[0]).toBeCloseTo(-out.extents[1], 14);
    expect(out.message).toMatch(/CO2, H2O reach the reactor from no inlet/);
    // The same as CO + 2 H2 -> CH3OH alone.
    const direct = prepared('SRK', ids, [{ nu: nu(ids, { CO: -1, H2: -2, CH3OH: 1 }) }]).solver.solve({ T, P, flows: [2, 1, 0, 0, 0] });
    expect(Math.abs(out.flows[4] - direct.flows[4])).toBeLessThan(1e-11);
  });

  it('a chain through a species absent from the inlet: CO + 2 H2 -> CH3OH, then 2 CH3OH -> CH3OCH3 + H2O', () => {
    const ids = ['H2', 'CO', 'CH3OH', 'CH3OCH3', 'H2O'] as const;
    const a = { nu: nu(ids, { CO: -1, H2: -2, CH3OH: 1 }) };
    const b = { nu: nu(ids, { CH3OH: -2, CH3OCH3: 1, H2O: 1 }) };
    const { eos, solver } = prepared('SRK', ids, [a, b]);
    const inlet = [2, 1, 0, 0, 0];
    const out = solver.solve({ T: 523.15, P: 50 * BAR, flows: inlet });
    expect(out.status, out.message).toBe('converged');
    expect(Array.from(out.zero)).toEqual([0, 0, 0, 0, 0]);
    expect(Array.from(out.blocked)).toEqual([0, 0]);
    for (const v of out.flows) expect(v).toBeGreaterThan(0);
    expect(Math.abs(conditionResidual(eos, 523.15, 50 * BAR, a.nu, out.flows))).toBeLessThan(1e-10);
    expect(Math.abs(conditionResidual(eos, 523.15, 50 * BAR, b.nu, out.flows))).toBeLessThan(1e-10);
    expectElementsConserved(eos.components, inlet, out.flows);
  });

  it('a liquid-like mixture is no gas-phase equilibrium: infeasible, said', () => {
    const ids = ['H2', 'CO2', 'H2O', 'CH3OH'] as const;
    const { solver } = prepared('SRK', ids, [{ nu: nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 }), label: 'synthesis' }]);
    const out = solver.solve({ T: 320, P: 100 * BAR, flows: [0.02, 0.01, 1, 1] });
    expect(out.status).toBe('infeasible');
    expect(out.reason).toBe('not-gas');
    expect(out.message).toMatch(/is not a gas/);
    expect(out.message).toMatch(/gas-phase/);
  });

  it('a mixture past its dew point: the stability check finds the second phase', () => {
    const ids = ['H2', 'CO', 'CO2', 'H2O'] as const;
    const rx = { nu: nu(ids, { CO2: -1, H2: -1, CO: 1, H2O: 1 }), label: 'reverse shift' };
    const flows = [0.7, 0.001, 0.1, 0.2];
    const plain = prepared('SRK', ids, [rx]).solver.solve({ T: 330, P: 50 * BAR, flows });
    expect(plain.status).toBe('converged');
    expect(plain.phase).toBe('vapor'); // the root label alone does not see it
    const checked = prepared('SRK', ids, [rx], { phaseCheck: 'stability' }).solver.solve({ T: 330, P: 50 * BAR, flows });
    expect(checked.status).toBe('infeasible');
    expect(checked.reason).toBe('two-phase');
    expect(checked.message).toMatch(/would condense/);
    const hot = prepared('SRK', ids, [rx], { phaseCheck: 'stability' }).solver.solve({ T: 600, P: 50 * BAR, flows });
    expect(hot.status).toBe('converged');
    expect(hot.phase).toBe('vapor');
    // The same check on demand, for a caller that solves with the root labels only.
    const solver = prepared('SRK', ids, [rx]).solver;
    expect(solver.phaseProblem(330, 50 * BAR, plain.flows)).toMatch(/would condense/);
    expect(solver.phaseProblem(600, 50 * BAR, hot.flows)).toBeNull();
  });

  it('a reaction that combines others is refused, naming it; bad inputs are invalid results', () => {
    const ids = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH'] as const;
    const eos = makeEos('SRK', comps(ids));
    const p = prepareEquilibrium(eos, [
      { nu: nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 }), label: 'A' },
      { nu: nu(ids, { CO2: -1, H2: -1, CO: 1, H2O: 1 }), label: 'B' },
      { nu: nu(ids, { CO: -1, H2: -2, CH3OH: 1 }), label: 'C' },
    ]);
    expect(p.status).toBe('invalid');
    if (p.status === 'invalid') {
      expect(p.problems).toHaveLength(1);
      expect(p.problems[0].reaction).toBe(2);
      expect(p.problems[0].message).toMatch(/C is a combination of A, B/);
    }
    const { solver } = prepared('SRK', NH3_IDS, [NH3_RX]);
    expect(solver.solve({ T: 700, P: -1, flows: [1, 3, 0] }).status).toBe('invalid');
    expect(solver.solve({ T: 700, P: 1e7, flows: [1, Number.NaN, 0] }).reason).toBe('bad-input');
    const short = solver.solve({ T: 700, P: 1e7, flows: [1, 3, 0], generation: [-2, 0, 0] });
    expect(short.status).toBe('infeasible');
    expect(short.reason).toBe('shortfall');
    expect(short.message).toMatch(/take 2 mol\/s of N2, but only 1 mol\/s reaches the reactor/);
    const none = solver.solve({ T: 700, P: 1e7, flows: [0, 0, 0] });
    expect(none.status).toBe('converged');
    expect(none.message).toMatch(/no flow/);
  });
});

describe('robustness', () => {
  it('2,000 random methanol-loop states (seeded): each converges or says why not; the converged ones hold', () => {
    // Random inlets (a quarter of the flows zero, the rest spread over six decades), 400-800 K,
    // 1-1000 bar, SRK: far wider than any converter, to find the states where the solver fails.
    let seed = 12345;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    const ids = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH', 'N2', 'CH4'] as const;
    const synth = nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 });
    const shift = nu(ids, { CO2: -1, H2: -1, CO: 1, H2O: 1 });
    const { eos, solver } = prepared('SRK', ids, [{ nu: synth }, { nu: shift }]);
    const out = solver.newResult();
    const count: Record<string, number> = {};
    for (let k = 0; k < 2000; k++) {
      const flows = ids.map(() => (rnd() < 0.25 ? 0 : rnd() ** 3));
      const T = 400 + 400 * rnd();
      const P = BAR * 10 ** (3 * rnd());
      solver.solve({ T, P, flows }, out);
      count[out.status] = (count[out.status] ?? 0) + 1;
      if (out.status !== 'converged') {
        expect(out.message.length, `${k}`).toBeGreaterThan(20);
        continue;
      }
      expectElementsConserved(eos.components, flows, out.flows);
      for (const v of out.flows) expect(v).toBeGreaterThanOrEqual(0);
      if (out.residual > 1e-11) {
        // Stopped at the rounding of a nearly used-up species, and said so.
        expect(out.message).toMatch(/resolved only to the rounding/);
      } else if (out.zero.every((z) => z === 0) && out.flows.every((v) => v > 1e-6 * sum(out.flows))) {
        expect(Math.abs(conditionResidual(eos, T, P, synth, out.flows)), `${k}`).toBeLessThan(1e-9);
        expect(Math.abs(conditionResidual(eos, T, P, shift, out.flows)), `${k}`).toBeLessThan(1e-9);
      }
    }
    expect(count.invalid ?? 0).toBe(0);
    expect(count.converged).toBeGreaterThan(1950);
    expect(count['not-converged'] ?? 0).toBeLessThanOrEqual(4);
  });
});

describe('use in a reactor', () => {
  it('fixed-conversion reactions as generation before the equilibrium: outlet = inlet + generation + equilibrium', () => {
    const ids = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH', 'CH4'] as const;
    const synth = nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 });
    const { eos, solver } = prepared('SRK', ids, [{ nu: synth }]);
    // A methanation side reaction at a fixed extent of 0.01 mol/s: CO + 3 H2 -> CH4 + H2O.
    const side = nu(ids, { CO: -1, H2: -3, CH4: 1, H2O: 1 });
    const generation = side.map((v) => v * 0.01);
    const inlet = [0.7, 0.05, 0.15, 0.001, 0.002, 0.01];
    const out = solver.solve({ T: 523.15, P: 60 * BAR, flows: inlet, generation });
    expect(out.status).toBe('converged');
    for (let i = 0; i < ids.length; i++) {
      expect(Math.abs(out.flows[i] - (inlet[i] + generation[i] + synth[i] * out.extents[0]))).toBeLessThan(1e-14);
    }
    expect(Math.abs(conditionResidual(eos, 523.15, 60 * BAR, synth, out.flows))).toBeLessThan(1e-10);
  });

  it('a warm start from the last extents gives the same answer in fewer evaluations, into the same result object', () => {
    const { solver } = prepared('SRK', NH3_IDS, [NH3_RX]);
    const out = solver.newResult();
    const extents = out.extents;
    solver.solve({ T: 723.15, P: 200 * ATM, flows: [1, 3, 0.05] }, out);
    const cold = out.evaluations;
    const x = out.extents[0];
    const flows = Float64Array.from(out.flows);
    solver.solve({ T: 723.15, P: 200 * ATM, flows: [1.001, 3, 0.05], start: [x] }, out);
    expect(out.warm).toBe(true);
    expect(out.extents).toBe(extents);
    expect(out.evaluations).toBeLessThan(cold);
    const fresh = solver.solve({ T: 723.15, P: 200 * ATM, flows: [1.001, 3, 0.05] });
    expect(Math.abs(fresh.extents[0] - out.extents[0])).toBeLessThan(1e-12);
    expect(flows[2]).toBeGreaterThan(0.05);
    // An infeasible start (more extent than the inlet allows) falls back to the built-in one.
    const bad = solver.solve({ T: 723.15, P: 200 * ATM, flows: [1, 3, 0.05], start: [5] });
    expect(bad.warm).toBe(false);
    expect(bad.status).toBe('converged');
  });

  it('the three Jacobians (held fugacity part, lagged, differenced every step) reach the same equilibrium', () => {
    const ids = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH', 'N2'] as const;
    const rxs = [
      { nu: nu(ids, { CO2: -1, H2: -3, CH3OH: 1, H2O: 1 }) },
      { nu: nu(ids, { CO2: -1, H2: -1, CO: 1, H2O: 1 }) },
    ];
    const inlet = [0.6, 0.1, 0.1, 0.002, 0.005, 0.1];
    const res = (['chord', 'lagged', 'full'] as const).map((jacobian) =>
      prepared('SRK', ids, rxs, { jacobian }).solver.solve({ T: 500, P: 150 * BAR, flows: inlet }));
    for (const r of res) {
      expect(r.status).toBe('converged');
      expect(Math.abs(r.extents[0] - res[0].extents[0])).toBeLessThan(1e-11);
      expect(Math.abs(r.extents[1] - res[0].extents[1])).toBeLessThan(1e-11);
    }
    expect(res[2].iterations).toBeLessThanOrEqual(res[1].iterations);
    expect(res[1].jacobians).toBe(0);
  });
});

describe('adiabatic converter: outlet temperature and equilibrium together', () => {
  const ids = ['N2', 'H2', 'NH3', 'CH4', 'Ar'] as const;
  const inlet = [0.22, 0.66, 0.03, 0.06, 0.03]; // invented ammonia converter feed, mol/s
  const P = 200 * BAR;
  const Tin = 673.15;

  function setup() {
    const { eos, solver } = prepared('SRK', ids, [{ nu: nu(ids, { N2: -1, H2: -3, NH3: 2 }), label: 'N2 + 3 H2 -> 2 NH3' }]);
    const H = (T: number, flows: ArrayLike<number>): number => {
      const N = sum(flows);
      const v = phaseEnthalpy(eos, T, P, Array.from(flows, (f) => f / N), 'vapor');
      if (v.status !== 'ok') throw new Error(v.message);
      return v.value * N;
    };
    const Hin = H(Tin, inlet);
    return { eos, solver, energy: (T: number, f: Float64Array) => H(T, f) - Hin, H };
  }

  it('closes the energy balance at an outlet that is at equilibrium', () => {
    const { eos, solver, energy } = setup();
    const res = solveAdiabaticEquilibrium(solver, { P, flows: inlet }, energy, { Tmin: Tin, Tmax: 1100, T0: Tin });
    expect(res.status, res.message).toBe('converged');
    expect(res.T).toBeGreaterThan(Tin);
    // Energy: the residual, as a temperature, below 1e-6 K (N Cp about 20 W/K here).
    expect(Math.abs(res.residual)).toBeLessThan(1e-5);
    expect(Math.abs(energy(res.T, res.equilibrium.flows))).toBeLessThan(1e-5);
    expect(Math.abs(conditionResidual(eos, res.T, P, nu(ids, { N2: -1, H2: -3, NH3: 2 }), res.equilibrium.flows))).toBeLessThan(1e-10);
    expect(res.evaluations).toBeLessThan(10);
    // The adiabatic rise per mole percent of ammonia formed: about 15 K per point near these conditions
    // (common practice, no source); within 12-18 K.
    const yIn = (100 * inlet[2]) / sum(inlet);
    const yOut = (100 * res.equilibrium.flows[2]) / sum(res.equilibrium.flows);
    const perPoint = (res.T - Tin) / (yOut - yIn);
    expect(perPoint).toBeGreaterThan(12);
    expect(perPoint).toBeLessThan(18);
  });

  it('a warm start (last T and extents) takes fewer equilibrium solves; a range with no solution says so', () => {
    const { solver, energy } = setup();
    const first = solveAdiabaticEquilibrium(solver, { P, flows: inlet }, energy, { Tmin: 500, Tmax: 1100 });
    expect(first.status).toBe('converged');
    const again = newAdiabaticResult(solver);
    solveAdiabaticEquilibrium(solver, { P, flows: inlet, start: first.equilibrium.extents }, energy, { Tmin: 500, Tmax: 1100, T0: first.T }, again);
    expect(again.status).toBe('converged');
    expect(Math.abs(again.T - first.T)).toBeLessThan(1e-5);
    expect(again.evaluations).toBeLessThan(first.evaluations);
    const capped = solveAdiabaticEquilibrium(solver, { P, flows: inlet }, energy, { Tmin: 500, Tmax: first.T - 20 });
    expect(capped.status).toBe('infeasible');
    expect(capped.message).toMatch(/no outlet temperature between 500 K and/);
  });

  it('with the last slope, a start 0.5 K off takes fewer solves to the same outlet, and a start at the answer takes one', () => {
    const { solver, energy } = setup();
    const first = solveAdiabaticEquilibrium(solver, { P, flows: inlet }, energy, { Tmin: 500, Tmax: 1100, tolT: 1e-7 });
    expect(first.status).toBe('converged');
    // The slope of g: positive (the sensible heat), about N Cp of the outlet.
    expect(first.slope).toBeGreaterThan(0);
    const start = Float64Array.from(first.equilibrium.extents);
    const plain = newAdiabaticResult(solver);
    const sloped = newAdiabaticResult(solver);
    solveAdiabaticEquilibrium(solver, { P, flows: inlet, start }, energy, { Tmin: 500, Tmax: 1100, T0: first.T - 0.5, tolT: 1e-7 }, plain);
    solveAdiabaticEquilibrium(solver, { P, flows: inlet, start }, energy, { Tmin: 500, Tmax: 1100, T0: first.T - 0.5, tolT: 1e-7, slope0: first.slope }, sloped);
    expect(plain.status).toBe('converged');
    expect(sloped.status).toBe('converged');
    expect(Math.abs(sloped.T - first.T)).toBeLessThan(1e-6);
    expect(Math.abs(plain.T - first.T)).toBeLessThan(1e-6);
    expect(sloped.evaluations).toBeLessThan(plain.evaluations);
    const at = solveAdiabaticEquilibrium(solver, { P, flows: inlet, start }, energy, { Tmin: 500, Tmax: 1100, T0: first.T, tolT: 1e-7, slope0: first.slope });
    expect(at.status).toBe('converged');
    expect(at.evaluations).toBe(1);
    expect(at.T).toBe(first.T);
    // A slope of the wrong sign or not finite is ignored (the 1 K second point).
    const ignored = solveAdiabaticEquilibrium(solver, { P, flows: inlet, start }, energy, { Tmin: 500, Tmax: 1100, T0: first.T - 0.5, tolT: 1e-7, slope0: -first.slope });
    expect(ignored.evaluations).toBe(plain.evaluations);
    expect(ignored.historyT[1] - ignored.historyT[0]).toBe(1);
  });
});
