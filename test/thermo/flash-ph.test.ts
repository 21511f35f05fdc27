/**
 * Pressure-enthalpy and pressure-entropy flashes.
 *
 * Results must be reviewed by a qualified engineer; they are not for relief, safety or code
 * compliance design, and local codes and licensed practice govern.
 */
import { describe, expect, it } from 'vitest';
import { makeEos } from '../../src/thermo/eos.js';
import { streamState, type MissingThermoData, type StreamState } from '../../src/thermo/enthalpy.js';
import { flashPH, flashPS, type StateFlashResult } from '../../src/thermo/flash-ph.js';
import { flashTP } from '../../src/thermo/flash.js';
import { saturationPressure } from '../../src/thermo/pure.js';
import { cpIG } from '../../src/thermo/ideal-gas.js';
import { findComponent } from '../../src/thermo/components.js';
import type { ComponentData, Eos } from '../../src/thermo/types.js';
import { C3H8, CH4, H2O, LOOP, LOOP_FEED, N2, NC4 } from './energy-data.js';

function ok(r: StateFlashResult | MissingThermoData): StateFlashResult {
  if (r.status === 'invalid') throw new Error(r.message);
  return r;
}

function state(r: StreamState | MissingThermoData): StreamState {
  if (r.status === 'invalid') throw new Error(r.message);
  return r;
}

/** No NaN anywhere in a result (numbers and arrays). */
function finite(r: StateFlashResult): void {
  for (const v of [r.T, r.beta, r.H, r.residual, ...(r.S !== undefined ? [r.S] : [])]) expect(Number.isFinite(v)).toBe(true);
  for (const a of [r.x, r.y, r.K]) for (const v of a) expect(Number.isFinite(v)).toBe(true);
}

describe('compressor: Smith, Van Ness and Abbott, 7th ed., Example 7.10', () => {
  // Methane compressed adiabatically from 293.15 K and 140 kPa to 560 kPa, isentropic
  // efficiency 0.75; methane as an ideal gas with Table C.1's Cp (A = 1.702, B = 9.081e-3,
  // C = -2.164e-6). The book's answers (from memory): isentropic work 3,966.6 J/mol, actual work
  // 5,288.8 J/mol, discharge temperature 428.65 K. The isentropic outlet comes from flashPS,
  // the actual outlet from flashPH at the inlet enthalpy plus the actual work.
  function compress(eos: Eos): { T2s: number; Ws: number; W: number; T2: number } {
    const inlet = state(streamState(eos, 293.15, 140e3, [1]));
    const isentropic = ok(flashPS(eos, 560e3, inlet.S, [1]));
    expect(isentropic.status).toBe('converged');
    const Ws = isentropic.H - inlet.H;
    const W = Ws / 0.75;
    const actual = ok(flashPH(eos, 560e3, inlet.H + W, [1]));
    expect(actual.status).toBe('converged');
    return { T2s: isentropic.T, Ws, W, T2: actual.T };
  }

  it('ideal-gas model reproduces the book', () => {
    const r = compress(makeEos('ideal', [CH4]));
    // the book rounds to 0.01 K and 0.1 J/mol; its property integrals are the same analytic ones
    expect(Math.abs(r.T2 - 428.65)).toBeLessThan(0.02);
    expect(Math.abs(r.Ws - 3966.6)).toBeLessThan(0.5);
    expect(Math.abs(r.W - 5288.8)).toBeLessThan(0.5);
  });

  it('SRK at these low pressures stays within 0.5 K of the ideal-gas answer', () => {
    // at 140-560 kPa and Tr > 1.5 methane's residual enthalpy is below 100 J/mol; the cubic's
    // discharge temperature is 428.92 K (0.27 K above the ideal gas), the work 0.2 % lower
    const r = compress(makeEos('SRK', [CH4]));
    expect(Math.abs(r.T2 - 428.65)).toBeLessThan(0.5);
    expect(r.T2).toBeGreaterThan(428.65);
    expect(Math.abs(r.W / 5288.8 - 1)).toBeLessThan(0.005);
  });
});

describe('round trips: TP flash, then H (S), then the PH (PS) flash gives back T and beta', () => {
  // The round trip checks the PH and PS flashes against the TP flash and the enthalpy of
  // enthalpy.ts: T to 1e-8 relative, beta to 1e-8.
  const bin = makeEos('PR', [C3H8, NC4]);
  const loopSrk = makeEos('SRK', LOOP);
  const loopPr = makeEos('PR', LOOP);
  const cases: Array<[string, Eos, number, number, number[], StreamState['phase']]> = [
    ['single-phase loop gas (SRK)', loopSrk, 313.15, 30e5, [0.75, 0.2, 0, 0, 0.05], 'vapor'],
    ['hot reactor gas (PR)', loopPr, 523.15, 80e5, LOOP_FEED, 'vapor'],
    ['methanol-loop separator feed, 40 degC and 30 bar (SRK)', loopSrk, 313.15, 30e5, LOOP_FEED, 'two-phase'],
    ['methanol-loop separator feed, 40 degC and 30 bar (PR)', loopPr, 313.15, 30e5, LOOP_FEED, 'two-phase'],
    ['liquid propane + n-butane at 300 K, 20 bar (PR)', bin, 300, 20e5, [0.5, 0.5], 'liquid'],
    ['liquid methanol at 40 degC, 30 bar (SRK)', loopSrk, 313.15, 30e5, [0, 0, 1, 0, 0], 'liquid'],
  ];
  for (const [label, eos, T, P, z, phase] of cases) {
    it(label, () => {
      const st = state(streamState(eos, T, P, z));
      expect(st.status).toBe('converged');
      expect(st.phase).toBe(phase);
      for (const r of [ok(flashPH(eos, P, st.H, z)), ok(flashPS(eos, P, st.S, z))]) {
        expect(r.status).toBe('converged');
        expect(Math.abs(r.T - T) / T).toBeLessThan(1e-8);
        expect(Math.abs(r.beta - st.beta)).toBeLessThan(1e-8);
        expect(r.phase).toBe(phase);
        expect(r.message === undefined || !/not converge/.test(r.message)).toBe(true);
        finite(r);
        // the state returned has the specified value
        if (r.spec === 'PH') expect(Math.abs(r.H - st.H)).toBeLessThan(1e-7 * 8.314 * T);
        else expect(Math.abs(r.S! - st.S)).toBeLessThan(1e-7 * 8.314);
      }
    });
  }

  it('a start near the answer needs one isothermal flash, single phase or two', () => {
    // the single-phase predictor and the two-phase steps run without flashes; the one flash is
    // the stability test at the start (two-phase) or at the answer (single phase)
    for (const [eos, T, P, z] of [
      [loopSrk, 313.15, 30e5, [0.75, 0.2, 0, 0, 0.05]],
      [loopSrk, 313.15, 30e5, LOOP_FEED],
      [bin, 300, 20e5, [0.5, 0.5]],
    ] as const) {
      const st = state(streamState(eos, T, P, z));
      const r = ok(flashPH(eos, P, st.H, z, { T0: T + 5 }));
      expect(r.status).toBe('converged');
      expect(r.flashes).toBe(1);
      expect(Math.abs(r.T - T) / T).toBeLessThan(1e-8);
    }
  });

  it('a start from the caller (T0) and K-values from the last solve give the same state', () => {
    const st = state(streamState(loopSrk, 313.15, 30e5, LOOP_FEED));
    const cold = ok(flashPH(loopSrk, 30e5, st.H, LOOP_FEED));
    const warm = ok(flashPH(loopSrk, 30e5, st.H, LOOP_FEED, { T0: 320, K0: st.K }));
    expect(Math.abs(warm.T - cold.T)).toBeLessThan(1e-6);
    expect(warm.flashes).toBeLessThanOrEqual(cold.flashes);
  });
});

describe('round trips over many states (deterministic pseudo-random sample)', () => {
  it('TP -> H -> PH and TP -> S -> PS recover T and beta for 200 states of three mixtures', () => {
    // A fixed linear congruential sequence (the same states every run). Methanol-loop mixtures
    // with SRK and PR (methanol and water weighted up so that about a third of the states are
    // two-phase), methane + propane + n-butane with PR; some pure and nearly pure feeds;
    // 250-550 K, 1-100 bar. Below about 250 K the loop mixtures enter a region where a
    // CO2-rich liquid, an aqueous liquid and the gas coexist: the two-phase flash does not
    // handle three phases (flash.ts), so that region is left out.
    let seed = 12345;
    const rnd = (): number => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648;
    };
    const sets = [makeEos('SRK', LOOP), makeEos('PR', LOOP), makeEos('PR', [CH4, C3H8, NC4])];
    let checked = 0;
    let twoPhase = 0;
    for (let k = 0; k < 200; k++) {
      const eos = sets[k % 3];
      const n = eos.n;
      const z: number[] = Array.from({ length: n }, (_, i): number => (rnd() < 0.2 ? 0 : rnd() * (n === 5 && (i === 2 || i === 3) ? 4 : 1)));
      if (rnd() < 0.1) {
        z.fill(0);
        z[Math.floor(rnd() * n)] = 1;
      }
      if (!z.some((v) => v > 0)) z[0] = 1;
      const T = 250 + 300 * rnd();
      const P = 1e5 * (1 + 99 * rnd());
      const st = state(streamState(eos, T, P, z));
      if (st.status !== 'converged') continue;
      if (st.phase === 'two-phase') twoPhase++;
      for (const r of [ok(flashPH(eos, P, st.H, z)), ok(flashPS(eos, P, st.S, z))]) {
        expect(r.status).toBe('converged');
        expect(Math.abs(r.T - T) / T).toBeLessThan(1e-8);
        expect(Math.abs(r.beta - st.beta)).toBeLessThan(1e-8);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(380);
    expect(twoPhase).toBeGreaterThan(40);
  });
});

describe('across phase boundaries', () => {
  it('propane + n-butane at 10 bar: T(H) continuous and increasing, beta in [0, 1] and increasing', () => {
    const eos = makeEos('PR', [C3H8, NC4]);
    const z = [0.5, 0.5];
    const P = 10e5;
    const cold = state(streamState(eos, 280, P, z));
    const hot = state(streamState(eos, 400, P, z));
    expect(cold.phase).toBe('liquid');
    expect(hot.phase).toBe('vapor');
    const N = 40;
    const dH = (hot.H - cold.H) / N;
    let prev: StateFlashResult | undefined;
    const phases = new Set<string>();
    for (let k = 0; k <= N; k++) {
      const r = ok(flashPH(eos, P, cold.H + k * dH, z));
      expect(r.status).toBe('converged');
      finite(r);
      expect(r.beta).toBeGreaterThanOrEqual(0);
      expect(r.beta).toBeLessThanOrEqual(1);
      phases.add(r.phase);
      // the TP flash at the temperature found agrees on the phase split
      const tp = flashTP(eos, r.T, P, z);
      expect(Math.abs(tp.beta - r.beta)).toBeLessThan(1e-8);
      if (prev !== undefined) {
        expect(r.T).toBeGreaterThan(prev.T);
        expect(r.beta).toBeGreaterThanOrEqual(prev.beta);
        // continuity: a step of dH moves T by at most dH over the smallest heat capacity
        // involved, which is at least the ideal-gas Cp of the feed (the liquid's and the
        // two-phase system's are larger)
        const cpMin = Math.min(...[prev.T, r.T].map((t) => 0.5 * (cpIG(C3H8, t) + cpIG(NC4, t))));
        expect(r.T - prev.T).toBeLessThan(dH / cpMin);
      }
      prev = r;
    }
    expect([...phases].sort()).toEqual(['liquid', 'two-phase', 'vapor']);
  });

  it('pure propane at 10 bar: T stays at saturation while beta goes from 0 to 1', () => {
    const eos = makeEos('PR', [C3H8]);
    const P = 10e5;
    const liq = state(streamState(eos, 250, P, [1]));
    const vap = state(streamState(eos, 350, P, [1]));
    const N = 20;
    const Tsat: number[] = [];
    let lastBeta = -1;
    let lastT = 0;
    for (let k = 0; k <= N; k++) {
      const r = ok(flashPH(eos, P, liq.H + ((vap.H - liq.H) * k) / N, [1]));
      expect(r.status).toBe('converged');
      finite(r);
      expect(r.T).toBeGreaterThanOrEqual(lastT);
      lastT = r.T;
      if (r.phase === 'two-phase') {
        Tsat.push(r.T);
        expect(r.beta).toBeGreaterThan(lastBeta);
        lastBeta = r.beta;
      }
    }
    expect(Tsat.length).toBeGreaterThan(5);
    // one temperature for the whole two-phase range
    expect(Math.max(...Tsat) - Math.min(...Tsat)).toBe(0);
    // it is the model's own saturation temperature at 10 bar (pure.ts, an independent Newton in P)
    const sat = saturationPressure(eos, 0, Tsat[0]);
    expect(Math.abs(sat.P / P - 1)).toBeLessThan(1e-9);
    // beta carries the balance: linear in H between the saturated liquid and vapor
    const hL = ok(flashPH(eos, P, liq.H, [1]));
    expect(hL.phase).toBe('liquid');
    const mid = ok(flashPH(eos, P, 0.5 * (liq.H + vap.H), [1]));
    const lo = ok(flashPH(eos, P, 0.25 * liq.H + 0.75 * vap.H, [1]));
    if (mid.phase === 'two-phase' && lo.phase === 'two-phase') {
      const slope = (lo.beta - mid.beta) / (0.25 * (vap.H - liq.H));
      const hSatL = mid.H - mid.beta / slope;
      const hSatV = hSatL + 1 / slope;
      // the heat of vaporisation of propane at 10 bar (about 300 K) from PR: of the order of 15 kJ/mol
      expect(hSatV - hSatL).toBeGreaterThan(10e3);
      expect(hSatV - hSatL).toBeLessThan(20e3);
    } else {
      throw new Error('expected two-phase states in the middle of the range');
    }
  });

  it('a nearly pure fluid (n-hexane with 1 % N2, 3.6 bar, PR): its steep two-phase H(T) is found, not called a jump', () => {
    // The mixture boils over about 0.3 K here (beta 0.60 at 388.0 K, 0.96 at 388.3 K): dH/dT reaches
    // some 1e5 J/(mol K), so over the 1e-12 T to which a bracket can close H still rises by some
    // 1e-4 J/mol, above the blocks' tolerance of 1e-10 R T (3e-7 J/mol). A round trip TP -> H -> PH at
    // that tolerance must give the state back; it was reported as an enthalpy jump from -156000.00 to
    // -156000.00 J/mol.
    const hex = findComponent('nC6H14');
    const n2 = findComponent('N2');
    if (!hex || !n2) throw new Error('components');
    const eos = makeEos('PR', [hex, n2]);
    const z = [0.99, 0.01];
    const P = 3.6e5;
    for (const T of [388.0, 388.234, 388.3]) {
      const tp = state(streamState(eos, T, P, z));
      expect(tp.phase).toBe('two-phase');
      const r = ok(flashPH(eos, P, tp.H, z, { tol: 1e-10 }));
      expect(r.status, `${T} K: ${r.message}`).toBe('converged');
      finite(r);
      expect(Math.abs(r.T - T)).toBeLessThan(1e-8);
      expect(Math.abs(r.beta - tp.beta)).toBeLessThan(1e-6);
      expect(r.residual).toBeLessThan(1e-6 * 8.314462618 * T);
    }
  });

  it('pure water at 1 atm: PS across the saturation point', () => {
    const eos = makeEos('SRK', [H2O]);
    const P = 101325;
    const liq = state(streamState(eos, 350, P, [1]));
    const vap = state(streamState(eos, 400, P, [1]));
    const mid = ok(flashPS(eos, P, 0.5 * (liq.S + vap.S), [1]));
    expect(mid.status).toBe('converged');
    expect(mid.phase).toBe('two-phase');
    expect(mid.beta).toBeGreaterThan(0);
    expect(mid.beta).toBeLessThan(1);
    expect(Math.abs(saturationPressure(eos, 0, mid.T).P / P - 1)).toBeLessThan(1e-9);
    // the model's normal boiling point of water: 375.6 K against 373.12 K (steam tables, from
    // memory): SRK's generalised alpha function misses water's vapor pressure by a few percent
    expect(Math.abs(mid.T - 373.12)).toBeLessThan(3);
  });
});

describe('states that cannot be found', () => {
  const eos = makeEos('SRK', LOOP);

  it('an enthalpy below anything reachable is not-converged with a message, never NaN', () => {
    const r = ok(flashPH(eos, 30e5, -1e7, LOOP_FEED));
    expect(r.status).toBe('not-converged');
    expect(r.message).toMatch(/below that of the stream at the lowest temperature/);
    finite(r);
    expect(r.residual).toBeGreaterThan(9e6);
  });

  it('an entropy above anything reachable is not-converged with a message', () => {
    const r = ok(flashPS(eos, 30e5, 1e4, LOOP_FEED));
    expect(r.status).toBe('not-converged');
    expect(r.message).toMatch(/above that of the stream at the highest temperature/);
    finite(r);
  });

  it('a narrow search range that excludes the answer is reported, not clamped silently', () => {
    const st = state(streamState(eos, 313.15, 30e5, LOOP_FEED));
    const r = ok(flashPH(eos, 30e5, st.H, LOOP_FEED, { Tmin: 350, Tmax: 400 }));
    expect(r.status).toBe('not-converged');
    expect(r.T).toBe(350);
  });

  it('missing heat-capacity data is an invalid result naming the component', () => {
    const noCp: ComponentData = { ...N2, id: 'Kr', cp: undefined };
    const e2 = makeEos('SRK', [N2, noCp]);
    const r = flashPH(e2, 1e5, 0, [0.5, 0.5]);
    expect(r.status).toBe('invalid');
    if (r.status === 'invalid') expect(r.missing[0].id).toBe('Kr');
  });

  it('PH without gf still solves and leaves S out', () => {
    const noGf: ComponentData = { ...N2, id: 'N2x', gf: undefined };
    const e2 = makeEos('PR', [noGf]);
    const st = state(streamState(makeEos('PR', [N2]), 300, 10e5, [1]));
    const r = ok(flashPH(e2, 10e5, st.H, [1]));
    expect(r.status).toBe('converged');
    expect(r.S).toBeUndefined();
    expect(Math.abs(r.T - 300)).toBeLessThan(1e-6);
    expect(flashPS(e2, 10e5, 0, [1]).status).toBe('invalid');
  });
});
