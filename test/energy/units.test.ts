/**
 * The energy side of the blocks and of the solve: closure on every demo, PH and TP flashes
 * that agree through a heater and a valve, adiabatic and duty-driven units, the compressor's
 * checks, the pressure rules, a file without thermal data, and duties, powers and enthalpies
 * as study paths (parameters, outputs, targets).
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet, validateText } from '../../src/flowsheet/validate.js';
import { solveFlowsheet, type FlowsheetResult } from '../../src/flowsheet/solve.js';
import { resultObject, solveCsv, solveText } from '../../src/report/solve.js';
import { parameter, withValues } from '../../src/study/parameters.js';
import { parseOutput, outputValue } from '../../src/study/outputs.js';
import { parseTarget, solvePoint } from '../../src/study/point.js';
import { ROOT } from '../helpers/cli.js';
import { findComponent } from '../../src/thermo/components.js';
import { makeEos } from '../../src/thermo/eos.js';
import { streamState } from '../../src/thermo/enthalpy.js';
import { flashPH } from '../../src/thermo/flash-ph.js';

function solve(text: string): FlowsheetResult {
  return solveFlowsheet(validateText('energy.yaml', text).model);
}

function figure(r: FlowsheetResult, unit: string, key: string): number {
  const f = r.units.get(unit)!.figures.find((x) => x.key === key);
  expect(f, `${unit}.${key}`).toBeDefined();
  return f!.value;
}

const DEMOS = readdirSync(join(ROOT, 'flowsheets')).filter((f) => f.endsWith('.yaml')).sort();

describe('energy closure on every demo flowsheet', () => {
  for (const f of DEMOS) {
    it(`${f}: converged, energy closed to 1e-9 overall and per unit`, () => {
      const r = solveFlowsheet(loadFlowsheet(join(ROOT, 'flowsheets', f)).model);
      expect(r.status, r.message).toBe('converged');
      const e = r.balance.energy!;
      expect(e).toBeDefined();
      expect(Math.abs(e.closure)).toBeLessThanOrEqual(1e-9);
      for (const [u, b] of Object.entries(r.balance.unitEnergy!)) expect(Math.abs(b.closure), u).toBeLessThanOrEqual(1e-9);
      // the balance adds up from what the units report
      let duty = 0;
      let power = 0;
      for (const u of r.units.values()) for (const x of u.figures) {
        if (x.key === 'duty') duty += x.value;
        if (x.key === 'power') power += x.value;
      }
      expect(Math.abs(duty - e.duty)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(e.duty)));
      expect(Math.abs(power - e.power)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(e.power)));
      for (const s of r.streams.values()) expect(Number.isFinite(s.h)).toBe(true);
    });
  }
});

const TWO_PHASE = `
components: { H2: {}, N2: {}, NH3: {} }
thermo: { eos: SRK }
feeds:
  liquid: { flows: { NH3: 10 mol/s, H2: 0.05 mol/s, N2: 0.03 mol/s }, T: -10 degC, P: 145 bar }
units:
  letdown: { type: valve, in: liquid, out: flashed, P: 2 bar }
  warm: { type: heater, in: flashed, out: warm-out, duty: 80 kW }
  check: { type: heater, in: warm-out, out: check-out, T: WARM_T K }
`;

describe('PH then TP: a valve and a heater agree with the isothermal flash', () => {
  it('a liquid let down flashes and cools; a heater given a duty finds T, and a heater held at that T takes no duty', () => {
    // first find the heater's temperature, then hold a second heater at it
    const first = solve(TWO_PHASE.replace('  check: { type: heater, in: warm-out, out: check-out, T: WARM_T K }\n', ''));
    expect(first.status, first.message).toBe('converged');
    const flashed = first.streams.get('flashed')!;
    const liquid = first.streams.get('liquid')!;
    expect(flashed.vaporFraction).toBeGreaterThan(0);
    expect(flashed.vaporFraction).toBeLessThan(1);
    expect(flashed.T).toBeLessThan(liquid.T);
    expect(Math.abs(flashed.h - liquid.h)).toBeLessThan(1e-9 * Math.abs(liquid.h));
    const warm = first.streams.get('warm-out')!;
    expect(Math.abs(warm.enthalpy - flashed.enthalpy - 80e3)).toBeLessThan(1e-6);
    const r = solve(TWO_PHASE.replace('WARM_T', String(warm.T)));
    expect(r.status, r.message).toBe('converged');
    // the TP flash at the T found by the PH flash gives back the enthalpy (to the flash tolerance)
    expect(Math.abs(figure(r, 'check', 'duty'))).toBeLessThan(1e-3);
    expect(Math.abs(r.streams.get('check-out')!.vaporFraction - warm.vaporFraction)).toBeLessThan(1e-8);
  });

  it('a duty that no state can take (beyond the heat-capacity data) is a not-converged result naming the unit, never a guess', () => {
    const r = solve(TWO_PHASE.replace('duty: 80 kW', 'duty: 5000 MW').replace(/ {2}check:.*\n/, ''));
    expect(r.status).toBe('not-converged');
    expect(r.failure?.unit).toBe('warm');
    expect(r.message).toMatch(/`warm`: no state at 2 bar has the enthalpy the energy balance asks for/);
    expect(solveText(r)).not.toMatch(/^Streams/m);
  });

  it('a valve whose outlet pressure is above its inlet is no letdown: invalid, naming the unit', () => {
    const r = solve(TWO_PHASE.replace('P: 2 bar', 'P: 160 bar').replace(/ {2}(warm|check):.*\n/g, ''));
    expect(r.status).toBe('invalid');
    expect(r.failure?.unit).toBe('letdown');
    expect(r.message).toMatch(/above the inlet's/);
  });
});

const LOOP = `
components: { H2: {}, N2: {}, Ar: {}, NH3: {} }
thermo: { eos: SRK }
feeds:
  makeup: { composition: { H2: 0.74, N2: 0.25, Ar: 0.01 }, molar-flow: 10 mol/s, T: 40 degC, P: 150 bar }
units:
  mix: { type: mixer, in: [makeup, recycle], out: c-in }
  converter: { type: reactor, in: c-in, out: c-out, REACTOR, reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.2 } ] }
  chiller: { type: condenser, in: c-out, T: -10 degC, P: 145 bar, vapor: gas, liquid: product }
  purge-split: { type: splitter, in: gas, out: { purge: 0.03, back: rest } }
  circulator: { type: compressor, in: back, out: recycle, P: 150 bar, isentropic-efficiency: 0.75 }
`;

describe('a loop with a recycle compressor and a reactor held three ways', () => {
  it('T held, duty found; the same duty given finds the same T; adiabatic has no duty and a hotter outlet', () => {
    const held = solve(LOOP.replace('REACTOR', 'T: 450 degC'));
    expect(held.status, held.message).toBe('converged');
    const duty = figure(held, 'converter', 'duty');
    const byDuty = solve(LOOP.replace('REACTOR', `duty: ${duty} W`));
    expect(byDuty.status, byDuty.message).toBe('converged');
    expect(Math.abs(byDuty.streams.get('c-out')!.T - (450 + 273.15))).toBeLessThan(1e-5);
    const adiabatic = solve(LOOP.replace('REACTOR', 'adiabatic: true'));
    expect(adiabatic.status, adiabatic.message).toBe('converged');
    expect(figure(adiabatic, 'converter', 'duty')).toBe(0);
    // an exothermic reaction from the inlet temperature heats the outlet
    expect(adiabatic.streams.get('c-out')!.T).toBeGreaterThan(adiabatic.streams.get('c-in')!.T + 50);
    for (const r of [held, byDuty, adiabatic]) {
      expect(Math.abs(r.balance.energy!.closure)).toBeLessThanOrEqual(1e-9);
      expect(figure(r, 'circulator', 'power')).toBeGreaterThan(0);
      expect(r.balance.energy!.power).toBe(figure(r, 'circulator', 'power'));
    }
  });

  it('the mixer reports the makeup let down to the lowest inlet pressure', () => {
    const r = solve(LOOP.replace('REACTOR', 'T: 450 degC').replace('P: 150 bar, isentropic', 'P: 148 bar, isentropic'));
    expect(r.status).toBe('converged');
    expect(r.units.get('mix')!.notes.join(' ')).toMatch(/`makeup` is let down to the lowest inlet pressure, 148 bar abs/);
    expect(r.streams.get('c-in')!.P).toBeCloseTo(148e5, 6);
  });

  it('a pressure that rises without a compressor is warned about', () => {
    const r = solve(LOOP.replace('REACTOR', 'T: 450 degC, P: 140 bar'));
    expect(r.status).toBe('converged');
    expect(r.warnings.join('\n')).toMatch(/the pressure rises through `chiller` \(condenser\) from 140 bar to 145 bar/);
    expect(solveText(r)).toMatch(/warning: the pressure rises through `chiller`/);
  });

  it('a compressor whose inlet holds liquid is invalid, naming the unit and its vapor fraction', () => {
    const r = solve(LOOP.replace('REACTOR', 'T: 450 degC').replace('in: back, out: recycle', 'in: product, out: pumped').replace('purge: 0.03, back: rest', 'purge: 0.03, recycle: rest'));
    expect(r.status).toBe('invalid');
    expect(r.failure?.unit).toBe('circulator');
    expect(r.message).toMatch(/the inlet of compressor `circulator` is not all vapor: vapor fraction 0 /);
  });

  it('a vapor that compresses into its two-phase region: the isentropic outlet is the equilibrium split with the inlet\'s entropy, not a supersaturated vapor', () => {
    // n-Hexane (0.1 % N2) at 80 degC and 1.2 bar, all vapor near its dew point, compressed 3:1. Its
    // saturated vapor's entropy rises with T (a "dry" fluid), so the isentropic state at 3.6 bar is
    // wet: by definition the state at P2 whose equilibrium entropy is the inlet's. Checked here with
    // the TP flash of that state (streamState), independent of the compressor's own search. (An
    // independent PR calculation made for this check gives 388.75 K, vapor fraction 0.909, and
    // dh_s 3029.9 J/mol; the supersaturated vapor root had 375.79 K and 3069.3 J/mol.)
    const text = `
components: { nC6H14: {}, N2: {} }
thermo: { eos: PR }
feeds:
  gas: { composition: { nC6H14: 0.999, N2: 0.001 }, molar-flow: 1 mol/s, T: 80 degC, P: 1.2 bar }
units:
  c: { type: compressor, in: gas, out: hp, ratio: 3, isentropic-efficiency: 0.75 }
`;
    const r = solve(text);
    expect(r.status, r.message).toBe('converged');
    const gas = r.streams.get('gas')!;
    const eos = makeEos('PR', ['nC6H14', 'N2'].map((id) => findComponent(id)!));
    const z = [0.999, 0.001];
    const inlet = streamState(eos, gas.T, gas.P, z);
    if (inlet.status === 'invalid') throw new Error(inlet.message);
    expect(inlet.phase).toBe('vapor');
    const T2s = figure(r, 'c', 'isentropicT');
    const iso = streamState(eos, T2s, 3 * gas.P, z);
    if (iso.status === 'invalid') throw new Error(iso.message);
    expect(iso.phase).toBe('two-phase');
    expect(Math.abs(iso.S - inlet.S)).toBeLessThan(1e-6);
    expect(Math.abs(figure(r, 'c', 'power') - (iso.H - inlet.H) / 0.75)).toBeLessThan(1e-6 * figure(r, 'c', 'power'));
    expect(Math.abs(T2s - 388.75)).toBeLessThan(0.01);
  });

  it('polytropic compression that ends in the two-phase region: the head from the volumes of the splits, close to the path integral', () => {
    // Pure n-hexane vapor at 80 degC and 1.2 bar compressed 3:1 with a polytropic efficiency of 0.75
    // (PR). Its isentropic and actual outlets are both wet (at the saturation temperature, 115.65 degC).
    // The polytropic head is by definition the integral of v dP along the path on which
    // dh = v dP / eta_p (ASME PTC 10-1997, section 5 (from memory)); integrated here with RK4 in P,
    // v from the PH flash of each state (the split's volume), it gives the power within Schultz's
    // approximation. (An independent PR calculation made for this check: 4114.1 W by the path
    // integral, 4129.7 W by Schultz's method with the volumes of the splits.) Taking the vapor
    // root's volume at the saturation temperature for a wet state made the polytropic head equal
    // the isentropic one (4038.6 W, the power of an isentropic efficiency of 0.75).
    const text = `
components: { nC6H14: {} }
thermo: { eos: PR }
feeds:
  gas: { composition: { nC6H14: 1 }, molar-flow: 1 mol/s, T: 80 degC, P: 1.2 bar }
units:
  c: { type: compressor, in: gas, out: hp, ratio: 3, polytropic-efficiency: 0.75 }
`;
    const r = solve(text);
    expect(r.status, r.message).toBe('converged');
    expect(r.streams.get('hp')!.vaporFraction).toBeGreaterThan(0);
    expect(r.streams.get('hp')!.vaporFraction).toBeLessThan(1);
    const eos = makeEos('PR', [findComponent('nC6H14')!]);
    const P1 = 1.2e5;
    const P2 = 3.6e5;
    const inlet = streamState(eos, 353.15, P1, [1]);
    if (inlet.status === 'invalid') throw new Error(inlet.message);
    const vAt = (P: number, h: number): number => {
      const f = flashPH(eos, P, h, [1], { tol: 1e-10 });
      if (f.status !== 'converged') throw new Error(`flashPH at ${P} Pa`);
      const vV = eos.molarVolume(f.T, P, f.y, 'vapor');
      const vL = eos.molarVolume(f.T, P, f.x, 'liquid');
      return f.phase === 'two-phase' ? f.beta * vV + (1 - f.beta) * vL : f.phase === 'vapor' ? vV : vL;
    };
    const N = 60;
    const d = (P2 - P1) / N;
    let h = inlet.H;
    for (let k = 0; k < N; k++) {
      const P = P1 + k * d;
      const k1 = vAt(P, h) / 0.75;
      const k2 = vAt(P + d / 2, h + (d / 2) * k1) / 0.75;
      const k3 = vAt(P + d / 2, h + (d / 2) * k2) / 0.75;
      const k4 = vAt(P + d, h + d * k3) / 0.75;
      h += (d / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
    }
    const exact = h - inlet.H;
    const power = figure(r, 'c', 'power');
    expect(Math.abs(power / exact - 1)).toBeLessThan(0.01);
    expect(Math.abs(power - 4129.7)).toBeLessThan(1);
    // The wet discharge is said, not left to the stream table's vapor fraction.
    expect(r.units.get('c')!.notes.join(' ')).toMatch(/the discharge is not all vapor \(vapor fraction 0\.\d+ at 115\.\d+ degC\)/);
  });

  it('a compressor given an outlet pressure below its inlet is invalid, naming the unit', () => {
    const r = solve(LOOP.replace('REACTOR', 'T: 450 degC').replace('P: 150 bar, isentropic', 'P: 100 bar, isentropic'));
    expect(r.status).toBe('invalid');
    expect(r.failure?.unit).toBe('circulator');
    expect(r.message).toMatch(/outlet pressure 100 bar abs is below the inlet's/);
  });

  it('the reports carry enthalpies, duties, powers and the energy balance', () => {
    const r = solve(LOOP.replace('REACTOR', 'T: 450 degC'));
    const obj = resultObject(r) as { streams: Record<string, { enthalpy: number; molarEnthalpy: number; total: number }>; units: Record<string, Record<string, unknown>>; balance: { energy: Record<string, number>; unitEnergy: Record<string, Record<string, number>> } };
    const g = obj.streams.gas;
    expect(Math.abs(g.enthalpy - g.total * g.molarEnthalpy)).toBeLessThan(1e-9 * Math.abs(g.enthalpy));
    expect(typeof obj.units.chiller.duty).toBe('number');
    expect(typeof obj.units.circulator.power).toBe('number');
    expect(Object.keys(obj.balance.energy).sort()).toEqual(['closure', 'duty', 'in', 'out', 'power']);
    expect(obj.balance.unitEnergy.circulator.power).toBe(obj.units.circulator.power);
    const csv = solveCsv(r).split('\n');
    expect(csv[0]).toMatch(/molar enthalpy \[J\/mol\],enthalpy flow \[W\]$/);
    const text = solveText(r);
    expect(text).toMatch(/^Energy \(kW;/m);
    expect(text).toMatch(/circulator \(compressor\): power [0-9.]+ kW/);
  });
});

describe('a reactor with several inlets and none of T, duty and adiabatic', () => {
  it('is isothermal at the temperature of its inlets mixed: where nothing reacts it takes no duty', () => {
    // The first law: inlets that are only mixed exchange no heat with the surroundings, so the
    // reactor's duty is zero when nothing reacts and its outlet is at the temperature an adiabatic
    // mixer finds (here 483.14 K by an independent SRK calculation made for this check; the
    // molar mean of the inlet temperatures, 450 K, took a duty of -2.43 kW).
    const text = (unit: string) => `
components: { CO2: {}, H2: {}, CO: {}, H2O: {} }
thermo: { eos: SRK }
feeds:
  a: { composition: { CO2: 1 }, molar-flow: 1 mol/s, T: 600 K, P: 10 bar }
  b: { composition: { H2: 1 }, molar-flow: 1 mol/s, T: 300 K, P: 10 bar }
units:
  ${unit}
`;
    const r = solve(text('r: { type: reactor, in: [a, b], out: p, reactions: [ { equation: "CO2 + H2 -> CO + H2O", key: CO2, conversion: 0 } ] }'));
    expect(r.status, r.message).toBe('converged');
    expect(Math.abs(figure(r, 'r', 'duty'))).toBeLessThan(1e-6);
    const m = solve(text('m: { type: mixer, in: [a, b], out: p }'));
    expect(Math.abs(r.streams.get('p')!.T - m.streams.get('p')!.T)).toBeLessThan(1e-6);
    expect(Math.abs(r.streams.get('p')!.T - 483.14)).toBeLessThan(0.01);
    expect(r.units.get('r')!.notes.join(' ')).toMatch(/inlets mixed adiabatically/);
    // Where it reacts, the duty is that of the reaction at that temperature (within the real-gas part).
    const q = solve(text('r: { type: reactor, in: [a, b], out: p, reactions: [ { equation: "CO2 + H2 -> CO + H2O", key: CO2, conversion: 0.1 } ] }'));
    const heat = q.units.get('r')!.reactions![0].heatOfReaction!;
    expect(Math.abs(figure(q, 'r', 'duty') - 0.1 * heat)).toBeLessThan(0.01 * 0.1 * Math.abs(heat));
  });
});

describe('a file whose components have no thermal data', () => {
  const text = `
components:
  A: { Tc: 190.6 K, Pc: 46 bar, omega: 0.011, formula: C2H4 }
  B: { Tc: 305 K, Pc: 49 bar, omega: 0.1, formula: C4H8 }
feeds:
  fresh: { flows: { A: 10 mol/s }, T: 300 K, P: 20 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: r-in, T: 300 K }
  rx: { type: reactor, in: r-in, out: r-out, reactions: [ { equation: "2 A -> B", key: A, conversion: 0.3 } ] }
  sep: { type: separator, in: r-out, out: { product: { B: 1 }, gas: rest } }
  split: { type: splitter, in: gas, out: { purge: 0.05, recycle: rest } }
`;
  it('solves the material balance and says once that the energy balance is off, naming the components and keys', () => {
    const r = solve(text);
    expect(r.status).toBe('converged');
    expect(r.balance.energy).toBeUndefined();
    const notes = r.warnings.filter((w) => /no energy balance/.test(w));
    expect(notes).toEqual(['no energy balance: `A` (`cp:`, `hf:`), `B` (`cp:`, `hf:`) have no thermal data; add the keys to those components under `components:` to get enthalpies, duties and the energy balance']);
    expect(resultObject(r).balance).not.toHaveProperty('energy');
  });

  it('with cp and hf given in the file, the same loop has an energy balance', () => {
    const withData = text.replace('formula: C2H4 }', 'formula: C2H4, cp: 43 J/(mol K), hf: 52.4 kJ/mol }').replace('formula: C4H8 }', 'formula: C4H8, cp: { over-R: [1.0, 0.03], Tmin: 200 K, Tmax: 1000 K }, hf: -0.1 kJ/mol }');
    const r = solve(withData.replace(', T: 300 K }', ' }'));
    expect(r.status, r.message).toBe('converged');
    expect(Math.abs(r.balance.energy!.closure)).toBeLessThanOrEqual(1e-9);
    // 2 A -> B releases 2 (52.4) + 0.1 kJ per mol of B at 298.15 K: the isothermal reactor removes heat
    expect(figure(r, 'rx', 'duty')).toBeLessThan(0);
  });
});

describe('duties, powers and enthalpies as study paths', () => {
  const file = LOOP.replace('REACTOR', 'T: 450 degC');
  it('a duty is a parameter; UNIT.duty, UNIT.power and streams.NAME.enthalpy are outputs', () => {
    const { model } = validateText('loop.yaml', file.replace('chiller: { type: condenser, in: c-out, T: -10 degC', 'pre: { type: cooler, in: c-out, out: c-cool, duty: -200 kW }\n  chiller: { type: condenser, in: c-cool, T: -10 degC'));
    const p = parameter(model, 'pre.duty');
    expect(p.value).toBe(-200e3);
    expect(p.dimension).toBe('power');
    const m2 = withValues(model, [{ parameter: p, value: -300e3 }]);
    const r = solveFlowsheet(m2);
    expect(r.status, r.message).toBe('converged');
    expect(outputValue(parseOutput('pre.duty[kW]', m2), r)).toBeCloseTo(-300, 9);
    expect(outputValue(parseOutput('circulator.power', m2), r)).toBe(figure(r, 'circulator', 'power'));
    const h = outputValue(parseOutput('streams.c-cool.enthalpy[kW]', m2), r);
    const hIn = outputValue(parseOutput('streams.c-out.enthalpy[kW]', m2), r);
    expect(Math.abs(h - hIn + 300)).toBeLessThan(1e-6);
  });

  it('a target holds an outlet temperature by a heater duty', () => {
    const { model } = validateText('loop.yaml', file.replace('mix: { type: mixer, in: [makeup, recycle], out: c-in }', 'mix: { type: mixer, in: [makeup, recycle], out: m-out }\n  preheat: { type: heater, in: m-out, out: c-in, duty: 500 kW }'));
    const t = parseTarget(model, 'streams.c-in.T = 250 degC', 'preheat.duty', '0:3000 kW');
    const r = solvePoint(model, [], { targets: [t] });
    expect(r.status, r.message).toBe('converged');
    expect(Math.abs(r.result!.streams.get('c-in')!.T - 523.15)).toBeLessThan(1e-6);
    expect(figure(r.result!, 'preheat', 'duty')).toBeGreaterThan(0);
  });
});

describe('thermal data of the file\'s own components', () => {
  const base = (body: string) => `
components:
  H2: {}
  X: ${body}
feeds:
  f: { flows: { H2: 1 mol/s, X: 1 mol/s }, T: 300 K, P: 5 bar }
units:
  h: { type: heater, in: f, out: g, T: 400 K }
`;
  it('a body that overrides a built-in row keeps the row\'s heat capacity and formation data', () => {
    const { model } = validateText('o.yaml', base('{ Tc: 190.6 K }').replace('  X: { Tc: 190.6 K }', '  CH4: { Tc: 190.6 K }').replace('X: 1 mol/s', 'CH4: 1 mol/s'));
    const c = model.components[1];
    expect(c.id).toBe('CH4');
    expect(c.cp).toBeDefined();
    // methane: -74.5 kJ/mol (Active Thermochemical Tables) to -74.9 kJ/mol (NIST-JANAF), from memory
    expect(Math.abs(c.hf! + 74.7e3)).toBeLessThan(500);
    expect(c.source).toMatch(/overridden in o\.yaml/);
  });

  it('a Cp/R polynomial gives the heater the duty the integral gives', () => {
    const r = solve(base('{ Tc: 305 K, Pc: 49 bar, omega: 0.1, formula: C2H6, cp: { over-R: [2.0, 0.01], Tmin: 200 K, Tmax: 1000 K }, hf: -84 kJ/mol }').replace('heater, in: f, out: g, T: 400 K', 'heater, in: f, out: g, T: 400 K').replace('P: 5 bar', 'P: 0.01 bar'));
    expect(r.status, r.message).toBe('converged');
    // at 0.01 bar the gas is ideal to about 1e-4: duty = integral of Cp over 300..400 K for both
    const R = 8.314462618;
    const x = R * (2.0 * 100 + 0.005 * (400 ** 2 - 300 ** 2));
    const h2 = r.streams.get('g')!.h * 2 - r.streams.get('f')!.h * 2 - x; // what H2 took
    expect(h2).toBeGreaterThan(2.8e3); // H2's Cp near 29 J/(mol K) over 100 K
    expect(h2).toBeLessThan(3.0e3);
  });

  it('a polynomial that turns negative inside its range is refused at its coefficients', () => {
    expect(() => validateText('n.yaml', base('{ Tc: 305 K, Pc: 49 bar, omega: 0.1, formula: C2H6, cp: { over-R: [1.0, -0.01], Tmin: 200 K, Tmax: 1000 K }, hf: -84 kJ/mol }'))).toThrow(/the polynomial gives Cp\/R = -1 at 200 K, inside its range; a heat capacity is positive/);
  });
});

describe('a split condenser whose liquid the equation of state calls a gas', () => {
  // 90 % methane, 10 % n-butane at 250 K and 29 bar. Methane's critical temperature is 190.6 K
  // (Poling, Prausnitz and O'Connell, The Properties of Gases and Liquids, 5th ed., Appendix A
  // (from memory)): half the methane and 99 % of the butane sent to the liquid make a "liquid" of
  // 82 % methane, which at 250 K has the density of a gas. With 2 % of the methane (15 % methane in
  // the liquid) it is a butane-rich liquid.
  const text = (ch4: number) => `
components: { CH4: {}, nC4H10: {} }
thermo: { eos: SRK }
feeds:
  gas: { composition: { CH4: 0.9, nC4H10: 0.1 }, molar-flow: 1 mol/s, T: 300 K, P: 30 bar }
units:
  cond: { type: condenser, in: gas, T: 250 K, P: 29 bar, model: split, split: { CH4: ${ch4}, nC4H10: 0.99 }, vapor: v, liquid: l }
`;
  it('says so in the unit\'s notes, and not for a true liquid', () => {
    const wrong = solve(text(0.5));
    expect(wrong.status).toBe('converged');
    expect(wrong.units.get('cond')!.notes.join(' ')).toMatch(/the liquid outlet `l` is not a liquid by SRK at its T and P/);
    const right = solve(text(0.02));
    expect(right.units.get('cond')!.notes.join(' ')).not.toMatch(/is not a liquid/);
  });
});
