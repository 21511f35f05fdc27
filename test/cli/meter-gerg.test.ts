/**
 * `loopclose meter` with the meters' own equation (GERG-2008), dense states and the uncertainty
 * budget, through the built command. The figures themselves are checked against outside sources in
 * test/meter/meter-eos.test.ts and test/meter/budget.test.ts; here: what the command prints.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cli, tempFile } from '../helpers/cli.js';

const LOOP = ['--gas', 'H2=0.7,N2=0.23,CH4=0.04,Ar=0.02,CO=0.01', '--flow', '1200 m3/h', '--pressure', '150 barg', '--temperature', '40 degC'];

describe('loopclose meter --eos GERG-2008 and the budget', () => {
  it('converts one reading with GERG-2008 and prints the budget with every contribution (JSON in SI)', () => {
    const r = cli(['meter', ...LOOP, '--eos', 'GERG-2008', '--flow-uncertainty', '0.75 %', '--pressure-uncertainty', '0.2 bar', '--temperature-uncertainty', '0.3 K', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.eos).toBe('SRK');
    expect(j.meterEos).toBe('GERG-2008');
    const f = j.feeds.reading;
    expect(f.model).toBe('GERG-2008');
    const u = f.uncertainty;
    expect(u.contributions.map((c: { input: string }) => c.input)).toEqual(['flow', 'pressure', 'temperature', 'equation-of-state']);
    const p = u.contributions[1];
    expect(p.u).toBeCloseTo(2e4, 6);
    expect(p.unit).toBe('Pa');
    expect(p.contribution).toBeCloseTo(Math.abs(p.sensitivity) * 2e4, 12);
    const sum = u.contributions.reduce((s: number, c: { contribution: number }) => s + c.contribution ** 2, 0);
    expect(u.combined).toBeCloseTo(Math.sqrt(sum), 12);
    expect(u.expanded).toBeCloseTo(2 * u.combined, 12);
    expect(u.molarFlow).toBeCloseTo(f.molarFlow, 12);
  });

  it('prints the budget table, the combined and the expanded uncertainty, and the measured SRK line by default', () => {
    const r = cli(['meter', ...LOOP, '--flow-uncertainty', '0.75 %']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Uncertainty of reading \(GUM, JCGM 100:2008/);
    expect(r.stdout).toMatch(/equation of state \(SRK\)\s+0\.32\d %\s+rectangular/);
    expect(r.stdout).toMatch(/measured: SRK differs from GERG-2008 by -0\.55\d %/);
    expect(r.stdout).toMatch(/expanded \(k = 2\)/);
    expect(r.stdout).toMatch(/not declared, so left out of the budget: the line pressure, the line temperature/);
    expect(r.stdout).toMatch(/qualified engineer/);
  });

  it('reports dense carbon dioxide as dense, with the warning, in text and JSON', () => {
    const args = ['meter', '--gas', 'CO2=1', '--flow', '10 m3/h', '--pressure', '150 barg', '--temperature', '40 degC', '--eos', 'GERG-2008'];
    const t = cli(args);
    expect(t.code).toBe(0);
    expect(t.stdout).toMatch(/reading\s+meter\s.*\sdense\s+GERG-2008/);
    expect(t.stdout).toMatch(/warning: feed `reading` is a dense fluid .*a gas meter is not reading a gas/);
    const j = JSON.parse(cli([...args, '--json']).stdout);
    expect(j.feeds.reading.phase).toBe('dense');
    expect(j.feeds.reading.density).toBeGreaterThan(770);
    expect(j.feeds.reading.density).toBeLessThan(790);
  });

  it('reads meter-eos and the declared uncertainties from a file, and says which feed fell back', () => {
    const f = tempFile('loop.yaml', `components: { H2: {}, N2: {}, NH3: {} }
thermo: { eos: SRK, meter-eos: GERG-2008 }
feeds:
  makeup:
    composition: { H2: 0.75, N2: 0.25 }
    meter: { flow: 1200 m3/h, pressure: 150 barg, temperature: 40 degC, uncertainty: { flow: 1.5 %, pressure: 0.2 bar, temperature: 1 K, stated-as: expanded } }
  return-gas:
    composition: { H2: 0.70, N2: 0.23, NH3: 0.07 }
    meter: { flow: 300 m3/h, pressure: 150 barg, temperature: 40 degC }
`);
    const j = JSON.parse(cli(['meter', f, '--json']).stdout);
    const m = j.feeds.makeup;
    expect(m.model).toBe('GERG-2008');
    // Expanded (k = 2) figures halved: 0.75 %, 0.1 bar, 0.5 K.
    expect(m.uncertainty.contributions[0].u).toBeCloseTo(0.0075, 14);
    expect(m.uncertainty.contributions[1].u).toBeCloseTo(1e4, 8);
    expect(m.uncertainty.contributions[2].u).toBeCloseTo(0.5, 14);
    const g = j.feeds['return-gas'];
    expect(g.model).toBe('SRK');
    expect(g.fallback).toMatch(/NH3/);
    expect(g.uncertainty.notes.join(' ')).toMatch(/no figure could be measured/);
    expect(j.warnings.join(' ')).toMatch(/`return-gas`: NH3 is not one of GERG-2008's 21 components, so this reading is converted with SRK/);
    const t = cli(['meter', f]);
    expect(t.stdout).toMatch(/equation of state: SRK; meters: GERG-2008/);
    expect(t.stdout).toMatch(/return-gas\s+meter.*SRK/);
  });

  it('solves a loop whose meters use GERG-2008 and whose units keep SRK', () => {
    const text = readFileSync('flowsheets/methanol-pilot.yaml', 'utf8').replace('thermo: { eos: SRK }', 'thermo: { eos: SRK, meter-eos: GERG-2008 }');
    expect(text).toMatch(/meter-eos: GERG-2008/);
    const f = tempFile('pilot.yaml', text);
    const r = cli(['solve', f, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.status).toBe('converged');
    expect(j.feeds.hydrogen.model).toBe('GERG-2008');
    expect(cli(['solve', f]).stdout).toMatch(/hydrogen: .*\(meter, GERG-2008\)/);
  });

  it('refuses an uncertainty on an offset scale, and per-reading options given with a file (exit 2)', () => {
    const a = cli(['meter', ...LOOP, '--temperature-uncertainty', '0.5 degC']);
    expect(a.code).toBe(2);
    expect(a.stderr).toMatch(/--temperature-uncertainty: `0\.5 degC` is on a scale with an offset/);
    const b = cli(['meter', ...LOOP, '--pressure-uncertainty', '0.1 barg']);
    expect(b.code).toBe(2);
    const c = cli(['meter', 'flowsheets/methanol-pilot.yaml', '--flow-uncertainty', '1 %']);
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(/--flow-uncertainty is for one reading/);
    const d = cli(['meter', ...LOOP, '--eos', 'GERG-2004']);
    expect(d.code).toBe(2);
    expect(d.stderr).toMatch(/use GERG-2008, SRK, PR or ideal/);
  });

  it('puts a file\'s offset-scale temperature uncertainty at its token', () => {
    const text = 'components: { H2: {} }\nfeeds:\n  a:\n    composition: { H2: 1 }\n    meter: { flow: 1 m3/h, pressure: 3 barg, temperature: 35 degC, uncertainty: { temperature: 0.5 degC } }\n';
    const f = tempFile('bad.yaml', text);
    const r = cli(['meter', f]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`${f}:5:${text.split('\n')[4].indexOf('0.5 degC') + 1}`);
    expect(r.stderr).toMatch(/scales with an offset/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  // GERG-2008's extended range ends at 70 MPa (Kunz and Wagner, J. Chem. Eng. Data 57 (2012) 3032,
  // abstract): at 80 MPa the authors state no uncertainty, and with no instrument figures declared
  // the budget has no line at all. That is an unknown uncertainty, not a zero one.
  it('does not print a zero combined uncertainty when no input has a figure', () => {
    const r = cli(['meter', '--gas', 'CH4=1', '--flow', '100 m3/h', '--pressure', '800 bar', '--temperature', '300 K', '--eos', 'GERG-2008']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/no input has a figure, so no uncertainty can be combined/);
    expect(r.stdout).not.toMatch(/combined standard uncertainty 0 /);
  });

  // An ideal-basis standard volume is n = P_ref V / (R T_ref), no equation of state (ISO 13443,
  // ideal-gas basis): 1 SCF/s at 60 degF and 14.696 psia is 101325.353 x 0.028316846592 /
  // (8.314462618 x 288.70556) mol/s (ft = 0.3048 m, psi from NIST SP 811 (2008), App. B.8). A mass
  // flow goes through none either. The table must not say GERG-2008 converted them.
  it('does not say an equation converted a mass flow or an ideal-basis standard volume', () => {
    const f = tempFile('forms.yaml', 'components: { CH4: {} }\nthermo: { eos: SRK, meter-eos: GERG-2008 }\nfeeds:\n  ui: { composition: { CH4: 1 }, standard-flow: { flow: 60 SCFM, basis: ideal }, T: 20 degC, P: 40 barg }\n  m: { composition: { CH4: 1 }, mass-flow: 16.043 kg/h, T: 20 degC, P: 40 barg }\n  r: { composition: { CH4: 1 }, standard-flow: 60 SCFM, T: 20 degC, P: 40 barg }\n');
    const j = JSON.parse(cli(['meter', f, '--json']).stdout);
    const psi = (0.45359237 * 9.80665) / (0.0254 * 0.0254);
    expect(j.feeds.ui.molarFlow).toBeCloseTo((14.696 * psi * 0.3048 ** 3) / (8.314462618 * ((60 + 459.67) / 1.8)), 12);
    const r = cli(['meter', f]);
    expect(r.code).toBe(0);
    const row = (name: string) => r.stdout.split('\n').find((l) => l.startsWith(`${name} `))!;
    expect(row('ui')).toMatch(/none \(Z: GERG-2008\)$/);
    expect(row('m')).toMatch(/none \(Z: GERG-2008\)$/);
    expect(row('r')).toMatch(/\sGERG-2008$/);
  });
});
