/**
 * Answers next to the tested paths that were wrong or false: each case here failed before the
 * redesign of the model, the parameter layer and the solve driver.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cli, tempFile } from '../helpers/cli.js';
import { loadFlowsheet, validateText } from '../../src/flowsheet/validate.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { methanolNumericSplit, noWayOut, sequenceOnOneKey, threeOutlets } from './fixtures.js';

const csvRows = (text: string) => text.split('\n').filter((l) => l && !l.startsWith('#')).slice(1).map((l) => l.split(','));

describe('sweeps: a row equals a single solve of the same inputs', () => {
  it('the purge sweep of the methanol demo converges at every point, as plain solves do', () => {
    const r = cli(['sweep', 'flowsheets/methanol-pilot.yaml', '--grid', 'purge-split.out.purge=0.001:0.05:15', '--report', 'loop.recycle-ratio', '--jsonl']);
    expect(r.code).toBe(0);
    const rows = r.stdout.trim().split('\n').slice(1).map((l) => JSON.parse(l));
    expect(rows).toHaveLength(15);
    for (const row of rows) expect(row.status).toBe('converged');
    // three points checked against single solves of the same input
    for (const row of [rows[1], rows[2], rows[3]]) {
      const purge = row.inputs['purge-split.out.purge'];
      const f = tempFile('m.yaml', readFileSync('flowsheets/methanol-pilot.yaml', 'utf8').replace('out: { recycle: 0.97, purge: rest }', `out: { recycle: rest, purge: ${purge} }`));
      const single = solveFlowsheet(loadFlowsheet(f).model);
      expect(single.status).toBe('converged');
      expect(row.outputs['loop.recycle-ratio']).toBeCloseTo(single.loop.recycleRatio, 7);
    }
  });

  it('recycle shares close to one converge too', () => {
    const r = cli(['sweep', 'flowsheets/methanol-pilot.yaml', '--values', 'purge-split.out.recycle=0.9,0.99,0.999', '--report', 'loop.recycle-ratio']);
    expect(r.code).toBe(0);
    const rows = csvRows(r.stdout);
    expect(rows.map((x) => x[2])).toEqual(['converged', 'converged', 'converged']);
  });
});

describe('splitter outlets as parameters', () => {
  const file = tempFile('numeric-split.yaml', methanolNumericSplit);

  it('a target by one numeric outlet of a two-outlet splitter moves the other with it', () => {
    const r = cli(['solve', file, '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.purge', '--within', '0.001:0.2', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.status).toBe('converged');
    expect(j.targets[0].met).toBe(true);
    expect(Math.abs(j.streams.recycle.fractions.N2 - 0.1)).toBeLessThanOrEqual(1e-9);
    // the purge and the recycle take the whole loop gas between them
    const gas = j.streams['loop-gas'].total;
    expect((j.streams.recycle.total + j.streams.purge.total) / gas).toBeCloseTo(1, 12);
  });

  it('a sweep of the same numeric outlet solves every point', () => {
    const r = cli(['sweep', file, '--grid', 'purge-split.out.purge=0.01:0.05:5', '--report', 'streams.purge.total']);
    expect(r.code).toBe(0);
    expect(csvRows(r.stdout).every((x) => x[2] === 'converged')).toBe(true);
  });

  it('with three outlets and no `rest` the path is refused before anything is solved, naming an outlet to write `rest`', () => {
    const f = tempFile('three.yaml', threeOutlets);
    const r = cli(['sweep', f, '--grid', 'purge-split.out.purge=0.01:0.05:5', '--report', 'streams.purge.total']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/purge-split\.out\.purge/);
    expect(r.stderr).toMatch(/`rest`/);
    expect(r.stderr).toMatch(/`recycle`|`sample`/);
  });
});

describe('reported figures follow the streams', () => {
  it('single-pass conversion of a key used by two reactions in sequence', () => {
    const r = solveFlowsheet(validateText('seq.yaml', sequenceOnOneKey).model);
    expect(r.status).toBe('converged');
    const co = r.model.index.get('CO')!;
    const inFlow = r.streams.get('f')!.flows[co];
    const outFlow = r.streams.get('r-out')!.flows[co];
    const fromStreams = (inFlow - outFlow) / inFlow;
    expect(fromStreams).toBeCloseTo(0.0984, 12);
    const c = cli(['sweep', tempFile('seq.yaml', sequenceOnOneKey), '--values', 'r.reactions.0.conversion=0.08', '--report', 'r.conversion.CO', '--jsonl']);
    expect(c.code).toBe(0);
    expect(JSON.parse(c.stdout.trim().split('\n')[1]).outputs['r.conversion.CO']).toBeCloseTo(0.0984, 12);
  });
});

describe('no steady state is called infeasible, naming the component and the loop', () => {
  it('excess hydrogen with no way out but dissolving in the crude', () => {
    const r = cli(['solve', tempFile('noway.yaml', noWayOut)]);
    expect(r.code).toBe(4);
    expect(r.stdout).toMatch(/status: infeasible/);
    expect(r.stdout).toMatch(/`H2`/);
    expect(r.stdout).toMatch(/mix/);
    expect(r.stdout).not.toMatch(/try another method/);
  });
});

describe('user mistakes in tears are located diagnostics', () => {
  const text = readFileSync('flowsheets/methanol-pilot.yaml', 'utf8');

  it('a feed named as a tear', () => {
    const r = cli(['solve', tempFile('t.yaml', `${text}tears: [hydrogen]\n`)]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/t\.yaml:\d+:\d+: error: .*`hydrogen`/);
    expect(r.stderr).not.toMatch(/internal error/);
  });

  it('a tear named twice', () => {
    const r = cli(['solve', tempFile('t.yaml', `${text}tears: [recycle, recycle]\n`)]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/t\.yaml:\d+:\d+: error: .*`recycle`.*twice/);
  });

  it('a tear outside every recycle loop', () => {
    const r = cli(['solve', tempFile('t.yaml', `${text}tears: [crude-methanol]\n`)]);
    expect(r.code).toBe(2);
  });
});

describe('options do what they say', () => {
  it('a looser --tolerance converges (the closure limit follows it)', () => {
    const r = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--tolerance', '1e-5', '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).balance.worst).toBeLessThan(1e-4);
  });

  it('--tolerance is used with targets as well', () => {
    const loose = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--tolerance', '1e-4', '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.purge', '--within', '0.001:0.2', '--json']);
    const tight = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.purge', '--within', '0.001:0.2', '--json']);
    expect(loose.code).toBe(0);
    expect(tight.code).toBe(0);
    expect(JSON.parse(loose.stdout).passes).toBeLessThan(JSON.parse(tight.stdout).passes);
  });

  it('a target is met within its own tolerance, not ten times it', () => {
    const r = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.purge', '--within', '0.001:0.2', '--json']);
    const j = JSON.parse(r.stdout);
    expect(j.targets[0].met).toBe(true);
    expect(Math.abs(j.targets[0].output - 0.1)).toBeLessThanOrEqual(j.targets[0].tolerance);
  });

  it('a start vector or a Jacobian of the wrong length is an invalid request, said', () => {
    const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');
    const a = solveFlowsheet(model, { start: new Float64Array(3) });
    expect(a.status).toBe('invalid');
    expect(a.message).toMatch(/start/);
    const b = solveFlowsheet(model, { jacobian: new Float64Array(4) });
    expect(b.status).toBe('invalid');
    expect(b.message).toMatch(/Jacobian/);
  });

  it('redundant tears still solve, by every method', () => {
    const text = readFileSync('flowsheets/methanol-pilot.yaml', 'utf8');
    const f = tempFile('t.yaml', `${text}tears: [recycle, reactor-in]\n`);
    for (const method of ['auto', 'newton', 'wegstein', 'direct']) {
      const r = cli(['solve', f, '--method', method, '--json']);
      expect(r.code, method).toBe(0);
    }
  });

  it('--max-passes is a ceiling on the passes reported', () => {
    const r = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--max-passes', '3', '--json']);
    expect(r.code).toBe(3);
    expect(JSON.parse(r.stdout).passes).toBeLessThanOrEqual(3);
  });
});

describe('report paths are checked before the first point', () => {
  for (const path of ['reactor.extent.5', 'reactor.extent.x', 'loop.conversion.H2', 'cooler.conversion.CO2', 'mix.vapor-fraction']) {
    it(path, () => {
      const r = cli(['sweep', 'flowsheets/methanol-pilot.yaml', '--values', 'reactor.reactions.0.conversion=0.2,0.3', '--report', path]);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(new RegExp(path.replace(/\./g, '\\.')));
    });
  }

  it('the refusal lists the valid paths of the unit', () => {
    const r = cli(['sweep', 'flowsheets/methanol-pilot.yaml', '--values', 'reactor.reactions.0.conversion=0.2,0.3', '--report', 'reactor.extent.5']);
    expect(r.stderr).toMatch(/reactor\.extent\.0/);
    expect(r.stderr).toMatch(/reactor\.conversion\.CO2/);
  });
});

describe('fractions that add up to 1 within the accepted 1e-9', () => {
  const pilot = readFileSync('flowsheets/methanol-pilot.yaml', 'utf8');
  it('a splitter whose numbers add up to 1 + 5e-10 solves as the exact split does (it used to leave the N2 balance open and never converge)', () => {
    const exact = solveFlowsheet(loadFlowsheet('flowsheets/methanol-pilot.yaml').model);
    for (const out of ['out: { recycle: 0.97, purge: 0.0300000005 }', 'out: { recycle: 0.9699999995, purge: 0.03 }']) {
      const text = pilot.replace('out: { recycle: 0.97, purge: rest }', out);
      expect(text).not.toBe(pilot);
      const r = solveFlowsheet(validateText('near.yaml', text).model);
      expect(r.status, `${out}: ${r.message}`).toBe('converged');
      expect(r.loop.recycleRatio).toBeCloseTo(exact.loop.recycleRatio, 6);
    }
  });
});
