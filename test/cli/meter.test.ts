import { describe, expect, it } from 'vitest';
import { cli, tempFile } from '../helpers/cli.js';

describe('loopclose meter', () => {
  it('reports every feed of a file as JSON in SI', () => {
    const r = cli(['meter', 'flowsheets/methanol-pilot.yaml', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const h = j.feeds.hydrogen;
    expect(h.T).toBeCloseTo(308.15, 10);
    expect(h.P).toBeCloseTo(3101325, 5);
    expect(h.phase).toBe('vapor');
    expect(h.molarFlow).toBeCloseTo(0.0035 / h.molarVolume, 12);
    expect(h.idealError).toBeCloseTo((h.idealMolarFlow - h.molarFlow) / h.molarFlow, 12);
    expect(h.flows.H2 + h.flows.N2).toBeCloseTo(h.molarFlow, 12);
    expect(j.warnings).toEqual([]);
  });

  it('does one reading from the command line, with the human table showing the ideal-gas error', () => {
    const r = cli(['meter', '--gas', 'H2=0.985,N2=0.015', '--flow', '12.6 m3/h', '--pressure', '30 barg', '--temperature', '35 degC']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/ideal-gas error/);
    expect(r.stdout).toMatch(/\+1\.\d\d %/);
    expect(r.stdout).toMatch(/qualified engineer/);
  });

  it('takes --eos PR and gives a different Z from SRK', () => {
    const a = JSON.parse(cli(['meter', '--gas', 'CO2=1', '--flow', '10 m3/h', '--pressure', '20 barg', '--temperature', '30 degC', '--json']).stdout);
    const b = JSON.parse(cli(['meter', '--gas', 'CO2=1', '--flow', '10 m3/h', '--pressure', '20 barg', '--temperature', '30 degC', '--eos', 'PR', '--json']).stdout);
    expect(a.feeds.reading.Z).not.toBeCloseTo(b.feeds.reading.Z, 4);
    expect(a.eos).toBe('SRK');
    expect(b.eos).toBe('PR');
  });

  it('refuses a pressure without a unit (exit 2, no stack trace)', () => {
    const r = cli(['meter', '--gas', 'H2=1', '--flow', '12.6 m3/h', '--pressure', '30', '--temperature', '35 degC']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--pressure: `30` has no unit/);
    expect(r.stderr).not.toMatch(/at .*\.m?js:\d+/);
  });

  // [what, file text, message, line, the text the caret must point at]
  const bad: [string, string, RegExp, number, string][] = [
    ['unknown component', 'components: { H2: {}, Xx: {} }\nfeeds:\n  a: { composition: { H2: 1 }, molar-flow: 1 mol/s, T: 300 K, P: 1 bar }\n', /unknown component `Xx`/, 1, 'Xx'],
    ['fractions not summing to 1', 'components: { H2: {}, N2: {} }\nfeeds:\n  a:\n    composition: { H2: 0.72, N2: 0.24 }\n    molar-flow: 1 mol/s\n    T: 300 K\n    P: 1 bar\n', /sums to 0\.96, not 1/, 4, '{ H2: 0.72'],
    ['missing unit', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 12.6 m3/h, pressure: 30, temperature: 35 degC }\n', /has no unit/, 5, '30,'],
    ['unknown unit', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 12.6 m3/h, pressure: 30 bargs, temperature: 35 degC }\n', /unknown unit `bargs`/, 5, '30 bargs'],
    ['zero flow', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 0 m3/h, pressure: 30 barg, temperature: 35 degC }\n', /must be above zero/, 5, '0 m3/h'],
    ['negative absolute temperature', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 1 m3/h, pressure: 30 barg, temperature: -300 degC }\n', /must be above zero/, 5, '-300 degC'],
    ['vacuum below zero absolute', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 1 m3/h, pressure: -2 barg, temperature: 35 degC }\n', /absolute, after any gauge conversion/, 5, '-2 barg'],
    ['missing field', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 1 m3/h, temperature: 35 degC }\n', /`meter` of feed `a` has no `pressure`/, 5, 'meter'],
    ['wrong dimension', 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 1 kg/h, pressure: 3 barg, temperature: 35 degC }\n', /is wanted here/, 5, '1 kg/h'],
  ];
  for (const [what, text, msg, line, marker] of bad) {
    it(`bad input: ${what} -> message at file:line:column, exit 2`, () => {
      const col = text.split('\n')[line - 1].indexOf(marker) + 1;
      expect(col).toBeGreaterThan(0);
      const f = tempFile('bad.yaml', text);
      const r = cli(['meter', f]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(msg);
      expect(r.stderr).toContain(`${f}:${line}:${col}`);
      expect(r.stderr).not.toMatch(/\n\s+at /);
    });
  }

  it('reports every problem of a file in one run', () => {
    const f = tempFile('bad.yaml', 'components: { H2: {}, N2: {} }\nfeeds:\n  a: { composition: { H2: 0.5 }, molar-flow: 1 mol/s, T: 300 K, P: 1 bar }\n  b: { composition: { N2: 1 }, molar-flow: 1, T: 300 K, P: 1 bar }\n');
    const r = cli(['meter', f]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/sums to 0\.5/);
    expect(r.stderr).toMatch(/`1` has no unit/);
    expect(r.stderr).toMatch(/2 errors/);
  });

  // psi = 0.45359237 kg * 9.80665 m/s2 / (0.0254 m)^2 = 6894.757293168 Pa (NIST SP 811 (2008),
  // Appendix B.8, exact definitions): 10 psig at a local atmosphere of 14.7 psia is 24.7 psia.
  it('reads gauge pressures with --atmosphere, which must be absolute (a gauge atmosphere would add 101.325 kPa twice)', () => {
    const args = ['meter', '--gas', 'CH4=1', '--eos', 'ideal', '--flow', '100 m3/h', '--pressure', '10 psig', '--temperature', '0 degC', '--json'];
    const ok = cli([...args, '--atmosphere', '14.7 psia']);
    expect(ok.code).toBe(0);
    expect(JSON.parse(ok.stdout).feeds.reading.P).toBeCloseTo(24.7 * 6894.757293168, 6);
    const gauge = cli([...args.slice(0, -1), '--atmosphere', '14.7 psig']);
    expect(gauge.code).toBe(2);
    expect(gauge.stderr).toMatch(/--atmosphere: `14\.7 psig` is a gauge pressure/);
    expect(gauge.stdout).toBe('');
  });

  it('refuses --atmosphere with a file rather than ignoring it (the file sets thermo.atmosphere)', () => {
    const f = tempFile('atm.yaml', 'components: { CH4: {} }\nfeeds:\n  a:\n    composition: { CH4: 1 }\n    meter: { flow: 100 m3/h, pressure: 10 barg, temperature: 20 degC }\n');
    const r = cli(['meter', f, '--atmosphere', '0.8 bar']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--atmosphere is for one reading/);
    expect(r.stderr).toMatch(/thermo: \{ atmosphere/);
  });

  it('refuses a pressure above 10000 bar (a reading in Pa written in bar) instead of failing inside the equation of state', () => {
    const r = cli(['meter', '--gas', 'H2=1', '--flow', '1 m3/h', '--pressure', '3e6 barg', '--temperature', '20 degC']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--pressure is 300000000000 Pa absolute; loopclose computes pressures up to 1e9 Pa \(10000 bar\)/);
    expect(r.stderr).not.toMatch(/internal error/);
    expect(cli(['meter', '--gas', 'H2=1', '--flow', '1 m3/h', '--pressure', '1000 bar', '--temperature', '20 degC']).code).toBe(0);
  });

  it('refuses --flow, --pressure and --temperature with a file rather than ignoring them (each feed has its own reading)', () => {
    const f = tempFile('reading.yaml', 'components: { CH4: {} }\nfeeds:\n  a:\n    composition: { CH4: 1 }\n    meter: { flow: 100 m3/h, pressure: 10 barg, temperature: 20 degC }\n');
    const r = cli(['meter', f, '--flow', '50 m3/h', '--pressure', '20 barg', '--temperature', '5 degC']);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    for (const k of ['flow', 'pressure', 'temperature']) expect(r.stderr).toMatch(new RegExp(`--${k} is for one reading`));
    expect(r.stderr).toMatch(/3 errors; nothing was computed/);
  });

  it('shows a metered feed\'s Z and v beside the meter\'s T and P, not the stream\'s (a meter upstream of a compressor)', () => {
    const f = tempFile('upstream.yaml', 'components: { CH4: {} }\nthermo: { eos: SRK }\nfeeds:\n  a:\n    composition: { CH4: 1 }\n    meter: { flow: 1000 m3/h, pressure: 5 barg, temperature: 20 degC }\n    T: 80 degC\n    P: 60 barg\n');
    const j = JSON.parse(cli(['meter', f, '--json']).stdout).feeds.a;
    expect(j.T).toBeCloseTo(353.15, 9); // the stream, as before
    expect(j.conditions.T).toBeCloseTo(293.15, 9);
    expect(j.conditions.P).toBeCloseTo(601325, 3);
    expect(j.Z).toBeCloseTo((j.conditions.P * j.molarVolume) / (8.314462618 * j.conditions.T), 12);
    // Methane at 20 degC and 6 bar: Z = 1 + B P / (R T) with B about -45 cm3/mol at 293 K
    // (Dymond and Smith, The Virial Coefficients of Pure Gases and Mixtures, 1980, methane; from memory): 0.989.
    expect(j.Z).toBeCloseTo(1 - (45e-6 * 601325) / (8.314462618 * 293.15), 3);
    const r = cli(['meter', f]);
    expect(r.code).toBe(0);
    const row = r.stdout.split('\n').find((l) => /^a\s+meter/.test(l))!;
    expect(row.split(/\s+/).slice(2, 5)).toEqual(['20.000', '6.0133', '0.98913']);
    expect(r.stdout).toMatch(/a: T and P above are the meter's; the feed enters the flowsheet at 80\.000 degC, 61\.013 bar/);
  });
});
