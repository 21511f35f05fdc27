import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { parseTarget, solvePoint } from '../../src/study/point.js';
import { parameter } from '../../src/study/parameters.js';
import { cli } from '../helpers/cli.js';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

// A once-through reactor whose file conversion (0.5 of CO2) needs more H2 than the feed brings:
// 100 mol/s of 50 % CO2, 45 % H2, 5 % N2. Closed form (stoichiometry of CO2 + 3 H2 -> CH3OH + H2O):
// H2 out = 45 - 3 * 50 X mol/s, so a steady state exists only for X <= 0.3, and H2 out = 5 mol/s
// (18 kmol/h) at X = 40 / 150 = 0.266667; H2 out = 0 at X = 0.3 exactly.
const text = `title: short of hydrogen
components: { CO2: {}, H2: {}, CH3OH: {}, H2O: {}, N2: {} }
thermo: { eos: SRK }
feeds:
  fresh:
    composition: { CO2: 0.5, H2: 0.45, N2: 0.05 }
    molar-flow: 100 mol/s
    T: 500 K
    P: 10 bar
units:
  reactor:
    type: reactor
    in: fresh
    out: r-out
    T: 500 K
    reactions:
      - { equation: "CO2 + 3 H2 -> CH3OH + H2O", key: CO2, conversion: 0.5 }
`;

describe('a target whose adjusted input starts where no steady state exists', () => {
  const m = validateText('short.yaml', text).model;

  it('the file value alone is infeasible (the premise of the cases below)', () => {
    expect(solvePoint(m, []).status).toBe('infeasible');
  });

  it('finds the conversion that holds H2 out at 5 mol/s within 0.1:0.6 (closed form 0.266667), and a plain solve there agrees', () => {
    const t = parseTarget(m, 'streams.r-out.flows.H2 = 18 kmol/h', 'reactor.reactions.0.conversion', '0.1:0.6');
    const r = solvePoint(m, [], { targets: [t] });
    expect(r.status).toBe('converged');
    expect(r.targets![0].met).toBe(true);
    expect(r.targets![0].input).toBeCloseTo(40 / 150, 9);
    const again = solvePoint(m, [{ parameter: parameter(m, 'reactor.reactions.0.conversion'), value: r.targets![0].input }]);
    expect(again.status).toBe('converged');
    expect(again.result!.streams.get('r-out')!.flows[m.index.get('H2')!]).toBeCloseTo(5, 7);
  });

  it('H2 out held at 0 is met at the edge, X = 0.3, not reported met on the infeasible X = 0.5', () => {
    const t = parseTarget(m, 'streams.r-out.flows.H2 = 0 mol/s', 'reactor.reactions.0.conversion', '0.1:0.6');
    const r = solvePoint(m, [], { targets: [t] });
    expect(r.status).toBe('converged');
    expect(r.targets![0].input).toBeCloseTo(0.3, 9);
  });

  it('a target out of reach (CO2 out 30 mol/s needs X = 0.4, beyond the H2) is infeasible and never said to be met', () => {
    const t = parseTarget(m, 'streams.r-out.flows.CO2 = 30 mol/s', 'reactor.reactions.0.conversion', '0.1:0.6');
    const r = solvePoint(m, [], { targets: [t] });
    expect(r.status).toBe('infeasible');
    expect(r.targets![0].met).toBe(false);
  });

  it('within 0.35:0.6 no value has a steady state: the H2 out of 0 read off X = 0.5 is not said to be met', () => {
    const t = parseTarget(m, 'streams.r-out.flows.H2 = 0 mol/s', 'reactor.reactions.0.conversion', '0.35:0.6');
    const r = solvePoint(m, [], { targets: [t] });
    expect(r.status).toBe('infeasible');
    expect(r.targets![0].met).toBe(false);
  });

  it('the CLI prints the found conversion and exits 0', () => {
    const dir = mkdtempSync(join(tmpdir(), 'loopclose-target-'));
    const f = join(dir, 'short.yaml');
    writeFileSync(f, text);
    const out = cli(['solve', f, '--target', 'streams.r-out.flows.H2 = 18 kmol/h', '--by', 'reactor.reactions.0.conversion', '--within', '0.1:0.6']);
    expect(out.code).toBe(0);
    expect(out.stdout).toMatch(/reached 18 kmol\/h by reactor\.reactions\.0\.conversion = 0\.266667\n/);
    expect(out.stdout).not.toMatch(/No steady state/);
  });

  it('the CLI gives no output figure for a target whose last value tried has no steady state (CO2 out 30 mol/s needs X = 0.4)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'loopclose-target-'));
    const f = join(dir, 'short.yaml');
    writeFileSync(f, text);
    const out = cli(['solve', f, '--target', 'streams.r-out.flows.CO2 = 30 mol/s', '--by', 'reactor.reactions.0.conversion', '--within', '0.1:0.6']);
    expect(out.code).toBe(4);
    expect(out.stdout).toMatch(/streams\.r-out\.flows\.CO2 = 30 mol\/s: not met; no solution at reactor\.reactions\.0\.conversion = 0\.4, the last value tried/);
    expect(out.stdout).not.toMatch(/reached/);
    // Stopped by a bound, the state at the bound was solved: its figure is given.
    const bound = cli(['solve', f, '--target', 'streams.r-out.flows.CO2 = 1 mol/s', '--by', 'reactor.reactions.0.conversion', '--within', '0.1:0.25']);
    expect(bound.stdout).toMatch(/reached 37\.5 mol\/s by reactor\.reactions\.0\.conversion = 0\.25 \(not met: stopped by its upper bound\)/);
  });
});
