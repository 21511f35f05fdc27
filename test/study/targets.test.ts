import { describe, expect, it } from 'vitest';
import { loadFlowsheet, validateText } from '../../src/flowsheet/validate.js';
import { assertVariable, parameter, withValues } from '../../src/study/parameters.js';
import { parseTarget, solvePoint } from '../../src/study/point.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { cli } from '../helpers/cli.js';
import { InputError as InputErrorClass, type InputError } from '../../src/diagnostics.js';

describe('targets held by Newton together with the tear equations', () => {
  const p = loadFlowsheet('flowsheets/methanol-pilot.yaml').model;

  it('meets a recycle-composition target to its tolerance, and a plain solve at the found input agrees', () => {
    const t = parseTarget(p, 'streams.recycle.fractions.N2 = 0.10', 'purge-split.out.recycle', '0.8:0.999');
    const r = solvePoint(p, [], { targets: [t] });
    expect(r.status).toBe('converged');
    const rep = r.targets![0];
    expect(Math.abs(rep.output - 0.1)).toBeLessThanOrEqual(rep.tolerance);
    // Independent check: set the input the target found and solve without targets.
    const again = solvePoint(p, [{ parameter: parameter(p, 'purge-split.out.recycle'), value: rep.input }]);
    expect(again.status).toBe('converged');
    const y = again.result!.streams.get('recycle')!.fractions[p.index.get('N2')!];
    expect(Math.abs(y - 0.1)).toBeLessThan(1e-8);
  });

  it('a target with a unit: the purge total held at 2 kmol/h by the hydrogen meter flow', () => {
    const t = parseTarget(p, 'streams.purge.total = 2 kmol/h', 'feeds.hydrogen.meter.flow', '8:20 m3/h');
    const r = solvePoint(p, [], { targets: [t] });
    expect(r.status).toBe('converged');
    expect(r.result!.streams.get('purge')!.total).toBeCloseTo(2 / 3.6, 8);
  });

  it('an impossible target is infeasible, with the closest value and the bound that stopped it', () => {
    const t = parseTarget(p, 'streams.recycle.fractions.N2 = 0.5', 'purge-split.out.recycle', '0.8:0.999');
    const r = solvePoint(p, [], { targets: [t] });
    expect(r.status).toBe('infeasible');
    expect(r.targets![0].bound).toBe('upper');
    expect(r.message).toMatch(/closest is 0\.34\d+ at its upper bound 0\.999/);
    const t2 = parseTarget(p, 'streams.recycle.fractions.N2 = 0.02', 'purge-split.out.recycle', '0.8:0.999');
    const r2 = solvePoint(p, [], { targets: [t2] });
    expect(r2.status).toBe('infeasible');
    expect(r2.targets![0].bound).toBe('lower');
  });

  it('refuses a target on an unknown output with a suggestion', () => {
    let help = '';
    try {
      parseTarget(p, 'streams.recycel.fractions.N2 = 0.1', 'purge-split.out.recycle', '0.8:0.999');
    } catch (e) {
      help = (e as InputError).diagnostics[0].help ?? '';
    }
    expect(help).toMatch(/did you mean `recycle`/);
  });

  it('the CLI holds a target and exits 0; an impossible one exits 4 without a stream table', () => {
    const ok = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.recycle', '--within', '0.8:0.999', '--json']);
    expect(ok.code).toBe(0);
    const j = JSON.parse(ok.stdout);
    expect(j.targets[0].met).toBe(true);
    const bad = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--target', 'streams.recycle.fractions.N2 = 0.5', '--by', 'purge-split.out.recycle', '--within', '0.8:0.999']);
    expect(bad.code).toBe(4);
    expect(bad.stdout).not.toMatch(/^Streams/m);
    expect(bad.stdout).toMatch(/stopped by its upper bound/);
  });

  it('solving with no targets equals a plain solve', () => {
    const a = solvePoint(p, []);
    const b = solveFlowsheet(p);
    expect(a.result!.streams.get('purge')!.total).toBe(b.streams.get('purge')!.total);
  });
});

describe('an outlet written `rest` as an input', () => {
  const p = loadFlowsheet('flowsheets/methanol-pilot.yaml').model;
  it('the issue\'s own target: the purge (written `rest`) adjusted within 0.001:0.2 holds 10 % N2', () => {
    const t = parseTarget(p, 'streams.recycle.fractions.N2 = 0.10', 'purge-split.out.purge', '0.001:0.2');
    const r = solvePoint(p, [], { targets: [t] });
    expect(r.status).toBe('converged');
    // Same answer as adjusting the numeric outlet: purge = 1 - recycle.
    const t2 = parseTarget(p, 'streams.recycle.fractions.N2 = 0.10', 'purge-split.out.recycle', '0.8:0.999');
    const r2 = solvePoint(p, [], { targets: [t2] });
    expect(r.targets![0].input).toBeCloseTo(1 - r2.targets![0].input, 8);
  });
  it('setting it gives the other outlet 1 - value; a splitter of three outlets is refused', () => {
    const ref = parameter(p, 'purge-split.out.purge');
    expect(ref.value).toBeCloseTo(0.03, 14);
    const m = withValues(p, [{ parameter: ref, value: 0.05 }]);
    const split = m.units.find((u) => u.name === 'purge-split') as unknown as { fractions: number[]; outlets: string[] };
    expect(split.fractions[split.outlets.indexOf('purge')]).toBeCloseTo(0.05, 14);
    const p3 = validateText('three.yaml', `components: { N2: {} }
feeds:
  a: { composition: { N2: 1 }, molar-flow: 1 mol/s, T: 300 K, P: 1 bar }
units:
  s: { type: splitter, in: a, out: { x: 0.2, y: 0.3, z: rest } }
`).model;
    // z is what x and y leave: it cannot be set itself
    expect(() => assertVariable(p3, parameter(p3, 's.out.z'))).toThrow(InputErrorClass);
  });
});
