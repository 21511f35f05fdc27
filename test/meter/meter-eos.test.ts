/**
 * Meters through the meter EOS (src/thermo/meter-eos.ts): GERG-2008 for the gas meters, the
 * fallback to the file's EOS, dense and near-critical states.
 *
 * Outside sources:
 *  - GERG-2008 itself is checked against the reference implementation's published test points in
 *    test/thermo/gerg2008.test.ts; here a metered feed must give exactly Q P / (Z R T) with that Z.
 *  - Pure-fluid densities from the tables of the reference equations of state that the NIST
 *    WebBook evaluates (the same values and sources as test/thermo/gerg2008.test.ts):
 *      nitrogen: Span, Lemmon, Jacobsen, Wagner and Yokozeki, J. Phys. Chem. Ref. Data 29 (2000)
 *        1361, single-phase table, p. 1410;
 *      methane: Setzmann and Wagner, J. Phys. Chem. Ref. Data 20 (1991) 1061, Table 40;
 *      carbon dioxide: Span and Wagner, J. Phys. Chem. Ref. Data 25 (1996) 1509, Table 35;
 *    and normal densities at 0 degC and 101.325 kPa as the NIST WebBook gives them (from memory):
 *    N2 1.2504 kg/m3, CH4 0.7175 kg/m3, CO2 1.9770 kg/m3.
 *  - The SRK and PR deviations from GERG-2008 quoted in the project's issue 12 (0.56 % for a
 *    hydrogen-rich loop gas at 150 barg; 2 % for nitrogen and 4.4 % for methane at 150 barg and
 *    0 degC; up to 4.4 % for PR on hydrogen mixtures) are measured here from the two equations,
 *    each of which is checked against published values elsewhere (test/thermo/eos.test.ts,
 *    test/thermo/gerg2008.test.ts).
 *  - Carbon dioxide at 150 bar and 40 degC: about 780 kg/m3 (from memory: the value usually quoted
 *    for supercritical extraction), against a critical density of 467.6 kg/m3 (Span and Wagner 1996).
 */
import { describe, expect, it } from 'vitest';
import { computeFeed } from '../../src/blocks/feed.js';
import { validateText } from '../../src/flowsheet/validate.js';
import { InputError } from '../../src/diagnostics.js';
import { findComponent } from '../../src/thermo/components.js';
import { makeEos } from '../../src/thermo/eos.js';
import { makeGerg2008 } from '../../src/thermo/gerg2008/index.js';
import { makeMeterEos, meterEosFor, type MeterEosName } from '../../src/thermo/meter-eos.js';
import { parameter, withValues } from '../../src/study/parameters.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';

const R_GERG = 8.314472; // GERG-2008's own gas constant (Kunz and Wagner 2012)
const barg = (v: number) => v * 1e5 + 101325;

function load(yaml: string) {
  const { model } = validateText('test.yaml', yaml);
  const eos = makeEos(model.thermo.eos, model.components, model.thermo.kij);
  const meter = meterEosFor(model.thermo.meterEos, eos);
  return { model, eos, meter, feeds: model.feeds.map((f) => computeFeed(f, eos, meter)) };
}

/** One metered reading of gas `gas` at T (K), P (Pa) through `name`, file EOS SRK unless name is a cubic. */
function reading(name: MeterEosName, gas: Record<string, number>, T: number, P: number, flow = 1 / 3600) {
  const ids = Object.keys(gas);
  const eos = makeEos(name === 'GERG-2008' ? 'SRK' : name, ids.map((id) => ({ ...findComponent(id)!, id })));
  const meter = makeMeterEos(name, eos);
  const composition = Float64Array.from(ids, (id) => gas[id]);
  return computeFeed({ name: 'r', type: 'feed', inlets: [], outlets: ['r'], composition, basis: { kind: 'meter', flow, T, P }, T, P }, eos, meter);
}

function rel(a: number, b: number) {
  return Math.abs(a - b) / Math.abs(b);
}

const LOOP_GAS = { H2: 0.7, N2: 0.23, CH4: 0.04, Ar: 0.02, CO: 0.01 };

describe('thermo.meter-eos: GERG-2008 for the meters, the loop on its cubic', () => {
  const doc = `
components: { H2: {}, N2: {}, CO2: {}, H2O: {}, CH3OH: {} }
thermo: { eos: SRK, meter-eos: GERG-2008 }
feeds:
  hydrogen:
    composition: { H2: 0.985, N2: 0.015 }
    meter: { flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC }
  carbon-dioxide:
    composition: { CO2: 0.995, N2: 0.005 }
    meter: { flow: 3.2 m3/h, pressure: 30 barg, temperature: 25 degC }
`;

  it('gives n = Q P / (Z R T) with the Z of GERG-2008 itself (arithmetic, to 1e-12)', () => {
    const { model, feeds } = load(doc);
    expect(model.thermo.meterEos).toBe('GERG-2008');
    expect(model.thermo.eos).toBe('SRK');
    const g = makeGerg2008(['H2', 'N2'])!;
    const Q = 12.6 / 3600;
    const T = 308.15;
    const P = 3101325;
    const Z = g.density(T, P, [0.985, 0.015]).Z;
    const h = feeds[0];
    expect(h.model).toBe('GERG-2008');
    expect(h.fallback).toBeUndefined();
    expect(rel(h.Z, Z)).toBeLessThan(1e-12);
    expect(rel(h.molarFlow, (Q * P) / (Z * R_GERG * T))).toBeLessThan(1e-12);
    expect(rel(h.molarVolume, (Z * R_GERG * T) / P)).toBeLessThan(1e-12);
    expect(h.phase).toBe('vapor');
    expect(h.warnings).toEqual([]);
    // The second feed has a GERG-2008 model of its own components' order: CO2 and N2.
    const c = feeds[1];
    const Zc = makeGerg2008(['N2', 'CO2'])!.density(298.15, P, [0.005, 0.995]).Z;
    expect(rel(c.Z, Zc)).toBeLessThan(1e-12);
  });

  it('leaves the loop on SRK: the same file solved without meter-eos differs only in the feeds', () => {
    const srk = load(doc.replace(', meter-eos: GERG-2008', ''));
    const gerg = load(doc);
    expect(srk.meter.name).toBe('SRK');
    expect(gerg.eos.name).toBe('SRK');
    expect(srk.feeds[0].model).toBe('SRK');
    // Hydrogen at 31 bar, 35 degC: SRK's Z is below GERG-2008's by a few tenths of a per cent.
    expect(rel(srk.feeds[0].Z, gerg.feeds[0].Z)).toBeGreaterThan(1e-3);
    expect(rel(srk.feeds[0].Z, gerg.feeds[0].Z)).toBeLessThan(5e-3);
  });

  it('converts pure nitrogen, methane and carbon dioxide to the molar flows of the reference-equation tables', () => {
    const Q = 10 / 3600;
    // [gas, T K, P Pa, density kg/m3 (or mol/m3 when molar), source]
    const cases: [string, number, number, number, boolean][] = [
      ['N2', 350, 20e6, 6355.2, true], // Span et al. (2000), p. 1410: 6.3552 mol/L
      ['CH4', 150, 1e6, 15.536, false], // Setzmann and Wagner (1991), Table 40
      ['CH4', 200, 5e6, 87.764, false], // Setzmann and Wagner (1991), Table 40
      ['CO2', 280, 5e5, 9.7568, false], // Span and Wagner (1996), Table 35
      ['CO2', 290, 5e6, 148.41, false], // Span and Wagner (1996), Table 35
    ];
    for (const [id, T, P, rho, molar] of cases) {
      const f = reading('GERG-2008', { [id]: 1 }, T, P, Q);
      expect(f.model).toBe('GERG-2008');
      const expected = molar ? Q * rho : (Q * rho) / findComponent(id)!.MW;
      // GERG-2008 states 0.1 % (k = 2) in gas density; its pure-fluid equations are fits to these.
      expect(rel(f.molarFlow, expected), `${id} ${T} K ${P} Pa`).toBeLessThan(5e-4);
    }
  });

  it('converts a normal volume on the real-gas basis with GERG-2008: the normal densities of N2, CH4, CO2 (NIST WebBook, from memory)', () => {
    const normal: [string, number][] = [['N2', 1.2504], ['CH4', 0.7175], ['CO2', 1.977]];
    for (const [id, rho] of normal) {
      const { feeds } = load(`
components: { ${id}: {} }
thermo: { meter-eos: GERG-2008 }
feeds:
  f:
    composition: { ${id}: 1 }
    standard-flow: { flow: 1000 m3/h@normal, basis: real }
    T: 25 degC
    P: 10 bar
`);
      expect(feeds[0].model).toBe('GERG-2008');
      const expected = ((1000 / 3600) * rho) / findComponent(id)!.MW;
      expect(rel(feeds[0].molarFlow, expected), id).toBeLessThan(3e-4);
    }
  });
});

describe('SRK and PR against GERG-2008 at the meter (measured; issue 12)', () => {
  /** (n_cubic - n_GERG) / n_GERG for one reading. */
  const deviation = (eos: 'SRK' | 'PR', gas: Record<string, number>, T: number, P: number) =>
    reading(eos, gas, T, P).molarFlow / reading('GERG-2008', gas, T, P).molarFlow - 1;

  it('hydrogen-rich loop gas at 150 barg and 40 degC: SRK +0.56 %, PR +3.7 %', () => {
    // H2 0.70, N2 0.23, CH4 0.04, Ar 0.02, CO 0.01 (an invented loop gas).
    expect(deviation('SRK', LOOP_GAS, 313.15, barg(150))).toBeCloseTo(0.00558, 4);
    expect(deviation('PR', LOOP_GAS, 313.15, barg(150))).toBeCloseTo(0.03658, 4);
  });

  it('at 150 barg and 0 degC: SRK -1.96 % for nitrogen and -4.44 % for methane; PR +4.39 % for the loop gas', () => {
    expect(deviation('SRK', { N2: 1 }, 273.15, barg(150))).toBeCloseTo(-0.0196, 4);
    expect(deviation('SRK', { CH4: 1 }, 273.15, barg(150))).toBeCloseTo(-0.0444, 4);
    expect(deviation('PR', LOOP_GAS, 273.15, barg(150))).toBeCloseTo(0.0439, 4);
  });
});

describe('dense and near-critical states', () => {
  it('reports carbon dioxide at 150 barg and 40 degC as dense (about 780 kg/m3), with a warning, by either equation', () => {
    for (const name of ['GERG-2008', 'SRK'] as const) {
      const f = reading(name, { CO2: 1 }, 313.15, barg(150));
      expect(f.phase).toBe('dense');
      expect(f.warnings.some((w) => /dense fluid/.test(w) && /not reading a gas/.test(w))).toBe(true);
      if (name === 'GERG-2008') expect(rel(f.density, 780)).toBeLessThan(3e-3);
    }
  });

  it('does not call methane at 150 barg and 0 degC (a pipeline gas, 0.9 of its critical density) dense or sensitive', () => {
    for (const name of ['GERG-2008', 'SRK', 'PR'] as const) {
      const f = reading(name, { CH4: 1 }, 273.15, barg(150));
      expect(f.phase, name).toBe('vapor');
      expect(f.sensitivity!.nearCritical, name).toBe(false);
      expect(f.warnings, name).toEqual([]);
    }
  });

  it('keeps a natural gas at 150 barg and 0 degC (about its pseudo-critical density, as compressible as an ideal gas) and hydrogen at 1000 bar a gas', () => {
    const ng = { CH4: 0.9, C2H6: 0.06, C3H8: 0.02, N2: 0.01, CO2: 0.01 }; // an invented pipeline gas
    for (const name of ['GERG-2008', 'SRK'] as const) {
      expect(reading(name, ng, 273.15, barg(150)).phase, name).toBe('vapor');
      expect(reading(name, { H2: 1 }, 300, 1000e5).phase, name).toBe('vapor');
    }
    // Ethane just above its critical temperature at 100 bar is liquid-like (about 330 kg/m3 against a
    // critical density of 207 kg/m3, from memory).
    const e = reading('GERG-2008', { C2H6: 1 }, 320, 100e5);
    expect(e.phase).toBe('dense');
    expect(Math.abs(e.sensitivity!.pressure)).toBeLessThan(0.5);
  });

  it('says the conversion is sensitive near the critical point of carbon dioxide (310 K, 75 bar)', () => {
    const f = reading('GERG-2008', { CO2: 1 }, 310, 75e5);
    expect(f.sensitivity!.nearCritical).toBe(true);
    // 1 % of pressure moves the density by more than 3 % here.
    expect(Math.abs(f.sensitivity!.pressure)).toBeGreaterThan(3);
    expect(f.warnings.some((w) => /sensitive/.test(w))).toBe(true);
    // Far from it, an ideal-gas-like state is not flagged.
    const g = reading('GERG-2008', { CO2: 1 }, 310, 5e5);
    expect(g.sensitivity!.nearCritical).toBe(false);
    expect(g.sensitivity!.pressure).toBeCloseTo(-1, 1);
  });

  it('gives the analytic d ln v / d ln P and d ln v / d ln T of every model as finite differences do', () => {
    const gas = { H2: 0.5, CO2: 0.3, N2: 0.2 };
    const ids = Object.keys(gas);
    const x = Float64Array.from(ids, (id) => gas[id as keyof typeof gas]);
    for (const name of ['GERG-2008', 'SRK', 'PR', 'ideal'] as const) {
      const eos = makeEos(name === 'GERG-2008' ? 'SRK' : name, ids.map((id) => ({ ...findComponent(id)!, id })));
      const m = makeMeterEos(name, eos);
      const T = 300;
      const P = 80e5;
      const s = { ...m.state(T, P, x) };
      const h = 1e-5;
      const dP = (Math.log(m.molarVolume(T, P * (1 + h), x)) - Math.log(m.molarVolume(T, P * (1 - h), x))) / (Math.log(1 + h) - Math.log(1 - h));
      const dT = (Math.log(m.molarVolume(T * (1 + h), P, x)) - Math.log(m.molarVolume(T * (1 - h), P, x))) / (Math.log(1 + h) - Math.log(1 - h));
      expect(rel(s.dlnvdlnP, dP), name).toBeLessThan(1e-6);
      expect(rel(s.dlnvdlnT, dT), name).toBeLessThan(1e-6);
    }
  });
});

describe('a gas GERG-2008 does not cover falls back to the file EOS for that reading', () => {
  const doc = `
components: { H2: {}, N2: {}, NH3: {}, Ar: {} }
thermo: { eos: SRK, meter-eos: GERG-2008 }
feeds:
  makeup:
    composition: { H2: 0.74, N2: 0.25, Ar: 0.01 }
    meter: { flow: 1200 m3/h, pressure: 150 barg, temperature: 40 degC }
  return-gas:
    composition: { H2: 0.70, N2: 0.23, NH3: 0.07 }
    meter: { flow: 300 m3/h, pressure: 150 barg, temperature: 40 degC }
`;
  it('converts the ammonia-free makeup with GERG-2008 and the gas with NH3 with SRK, and says so', () => {
    const { feeds, eos } = load(doc);
    const [makeup, ret] = feeds;
    expect(makeup.model).toBe('GERG-2008');
    expect(makeup.warnings).toEqual([]);
    expect(ret.model).toBe('SRK');
    expect(ret.fallback).toMatch(/NH3 is not one of GERG-2008's 21 components/);
    expect(ret.warnings.some((w) => /NH3/.test(w) && /converted with SRK/.test(w))).toBe(true);
    // The fallback is SRK's own conversion, exactly.
    const Zsrk = eos.z(313.15, barg(150), ret.composition, 'stable').Z;
    expect(rel(ret.Z, Zsrk)).toBeLessThan(1e-14);
  });
});

describe('outside GERG-2008\'s normal range', () => {
  it('warns with the stated uncertainty above 450 K', () => {
    const f = reading('GERG-2008', { N2: 1 }, 480, 10e6);
    expect(f.model).toBe('GERG-2008');
    expect(f.warnings.some((w) => /outside GERG-2008's normal range/.test(w) && /0\.5 % \(k = 2\)/.test(w))).toBe(true);
    expect(reading('GERG-2008', { N2: 1 }, 440, 10e6).warnings).toEqual([]);
  });
});

describe('thermo.meter-eos and meter.uncertainty in the file', () => {
  const base = (thermo: string, meter: string) => `components: { H2: {}, N2: {} }
thermo: ${thermo}
feeds:
  a:
    composition: { H2: 0.985, N2: 0.015 }
    meter: ${meter}
`;
  const errorOf = (text: string) => {
    try {
      validateText('t.yaml', text);
    } catch (e) {
      if (e instanceof InputError) return e.diagnostics;
      throw e;
    }
    throw new Error('no error');
  };
  const M = '{ flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC }';

  it('reads the declared uncertainties in SI and records them as parameters', () => {
    const { model } = validateText('t.yaml', base('{ eos: SRK }', '{ flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC, uncertainty: { flow: 1.5 %, pressure: 0.1 bar, temperature: 0.5 K, stated-as: expanded } }'));
    const b = model.feeds[0].basis;
    if (b.kind !== 'meter') throw new Error('not a meter');
    expect(b.uncertainty).toEqual({ statedAs: 'expanded', flow: 0.015, pressure: 1e4, temperature: 0.5 });
    const slots = model.settings.get('feeds.a')!.slots.map((s) => s.key.join('.'));
    expect(slots).toContain('meter.uncertainty.flow');
    expect(slots).toContain('meter.uncertainty.pressure');
  });

  it('refuses a temperature uncertainty on an offset scale, a gauge pressure uncertainty, and an unknown or mismatched meter-eos, at the token', () => {
    const t = base('{ eos: SRK }', '{ flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC, uncertainty: { temperature: 0.5 degC } }');
    const d = errorOf(t)[0];
    expect(d.message).toMatch(/degC and degF are scales with an offset/);
    expect(d.help).toMatch(/0\.5 K/);
    expect(t.split('\n')[d.span!.line - 1].slice(d.span!.col - 1)).toMatch(/^0\.5 degC/);
    const p = base('{ eos: SRK }', '{ flow: 12.6 m3/h, pressure: 3 barg, temperature: 35 degC, uncertainty: { pressure: 0.1 barg } }');
    expect(errorOf(p)[0].help).toMatch(/gauge unit/);
    // At a high line pressure too: 0.2 barg read as a gauge pressure would be 1.21 bar absolute
    // (0.2 bar + 1.01325 bar, the standard atmosphere), under a tenth of 150 barg, and was taken as
    // a 1.21 bar uncertainty. An uncertainty is a difference: a gauge unit is refused at any line pressure.
    const hp = base('{ eos: SRK }', '{ flow: 12.6 m3/h, pressure: 150 barg, temperature: 35 degC, uncertainty: { pressure: 0.2 barg } }');
    const dh = errorOf(hp)[0];
    expect(dh.message).toMatch(/is a pressure difference, but `barg` reads a gauge pressure/);
    expect(dh.help).toMatch(/gauge unit/);
    expect(hp.split('\n')[dh.span!.line - 1].slice(dh.span!.col - 1)).toMatch(/^0\.2 barg/);
    expect(errorOf(base('{ eos: SRK }', '{ flow: 12.6 m3/h, pressure: 150 barg, temperature: 35 degC, uncertainty: { pressure: 3 psig } }'))[0].message).toMatch(/gauge pressure/);
    expect(errorOf(base('{ eos: SRK, meter-eos: GERG-2004 }', M))[0].message).toMatch(/unknown equation of state `GERG-2004` for the meters/);
    expect(errorOf(base('{ eos: SRK, meter-eos: PR }', M))[0].help).toMatch(/GERG-2008/);
    expect(errorOf(base('{ eos: SRK }', '{ flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC, uncertainty: { flow: 1.5 } }'))[0].message).toMatch(/at most 0\.5/);
  });

  it('keeps the declared uncertainties through the parameter layer, and a study can set them', () => {
    const { model } = validateText('t.yaml', base('{ eos: SRK, meter-eos: GERG-2008 }', '{ flow: 12.6 m3/h, pressure: 30 barg, temperature: 35 degC, uncertainty: { flow: 1 %, temperature: 0.5 K } }'));
    const m2 = withValues(model, [{ parameter: parameter(model, 'feeds.a.meter.flow'), value: 0.004 }]);
    const b2 = m2.feeds[0].basis;
    if (b2.kind !== 'meter') throw new Error('not a meter');
    expect(b2.flow).toBe(0.004);
    expect(b2.uncertainty).toEqual({ statedAs: 'standard', flow: 0.01, temperature: 0.5 });
    const m3 = withValues(model, [{ parameter: parameter(model, 'feeds.a.meter.uncertainty.flow'), value: 0.02 }]);
    const b3 = m3.feeds[0].basis;
    if (b3.kind !== 'meter') throw new Error('not a meter');
    expect(b3.uncertainty!.flow).toBe(0.02);
    // The study's model keeps the meters' equation: the solve converts with GERG-2008.
    expect(m2.thermo.meterEos).toBe('GERG-2008');
    expect(solveFlowsheet(m2).feeds[0].model).toBe('GERG-2008');
  });

  it('accepts meter-eos spelled as the file\'s own equation', () => {
    const { model } = validateText('t.yaml', base('{ eos: PR, meter-eos: Peng-Robinson }', M));
    expect(model.thermo.meterEos).toBe('PR');
  });
});
