import { describe, expect, it } from 'vitest';
import { cli, tempFile } from '../helpers/cli.js';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { InputError } from '../../src/diagnostics.js';
import { BUTANE_LOOP } from '../helpers/butane-loop.js';
import { coupled, parameter, parameters } from '../../src/study/parameters.js';

// The recycle loop of test/flowsheet/loop.test.ts with built-in components: 100 mol/s of 95 %
// n-butane and 5 % N2, isomerised at X = 0.3 per pass, all isobutane taken out, a fraction p of
// the gas purged. Closed form: y_N2 of the recycle = R_I / (R_I + R_A) with R_I = (1-p) F z / p and
// R_A = (1-p)(1-X) F (1-z) / (1 - (1-p)(1-X)); y_N2 = 0.25 at p = 0.0803571.
const LOOP = `${BUTANE_LOOP}  tee: { type: splitter, in: product, out: { a: 0.2, b: rest, c: 0.3 } }
`;

describe('inputs that set each other cannot be swept and adjusted apart', () => {
  const file = tempFile('loop.yaml', LOOP);
  const m = loadFlowsheet(file).model;

  it('the two outlets of a two-outlet splitter, an outlet and `rest`, two fractions of one composition are one input; independent outlets are not', () => {
    const P = (path: string) => parameter(m, path);
    expect(coupled(m, P('purge-split.out.purge'), P('purge-split.out.recycle'))).toBe(true);
    expect(coupled(m, P('tee.out.a'), P('tee.out.b'))).toBe(true);
    expect(coupled(m, P('tee.out.a'), P('tee.out.c'))).toBe(false);
    expect(coupled(m, P('feeds.fresh.composition.N2'), P('feeds.fresh.composition.nC4H10'))).toBe(true);
    expect(coupled(m, P('feeds.fresh.composition.N2'), P('feeds.fresh.molar-flow'))).toBe(false);
    expect(coupled(m, P('purge-split.out.purge'), P('reactor.reactions.0.conversion'))).toBe(false);
  });

  it('a separator outlet written `rest` beside recoveries is no single number: refused as an input, not listed (it read 1)', () => {
    // `sep` sends all iC4H10 to product; `gas` takes the rest: all nC4H10 and N2 and no iC4H10.
    expect(() => parameter(m, 'sep.out.gas')).toThrow(InputError);
    expect(() => parameter(m, 'sep.out.gas')).toThrow(/differs by component/);
    const paths = parameters(m).map((p) => p.path);
    expect(paths).not.toContain('sep.out.gas');
    expect(paths).toContain('sep.out.product.iC4H10');
    // a splitter's `rest` is one number, what the other outlet leaves: 1 - 0.9
    expect(parameter(m, 'purge-split.out.purge').value).toBeCloseTo(0.1, 15);
    expect(paths).toContain('purge-split.out.purge');
    const r = cli(['sweep', file, '--values', 'sep.out.gas=0.5', '--report', 'loop.recycle-ratio']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/sep\.out\.gas.*differs by component/);
    expect(r.stdout).toBe('');
  });

  it('a sweep of the purge with a target adjusting the recycle share is refused (it wrote purge 0.1 and 0.2 for one state at p = 0.0804)', () => {
    const r = cli(['sweep', file, '--grid', 'purge-split.out.purge=0.1:0.2:2', '--target', 'streams.recycle.fractions.N2 = 0.25', '--by', 'purge-split.out.recycle', '--within', '0.5:0.99', '--report', 'loop.recycle-ratio']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/are one input/);
    expect(r.stdout).toBe('');
  });

  it('two axes on one composition are refused; a purge value with a target on the conversion runs (closed form X = 0.3)', () => {
    const r = cli(['sweep', file, '--grid', 'feeds.fresh.composition.N2=0.05:0.1:2', '--grid', 'feeds.fresh.composition.nC4H10=0.8:0.9:2', '--report', 'loop.recycle-ratio']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/are one input/);
    const ok = cli(['sweep', file, '--values', 'purge-split.out.purge=0.0803571428571429', '--target', 'streams.recycle.fractions.N2 = 0.25', '--by', 'reactor.reactions.0.conversion', '--within', '0.1:0.5', '--report', 'streams.recycle.fractions.N2']);
    expect(ok.code).toBe(0);
    const row = ok.stdout.trim().split('\n').pop()!.split(',');
    // At p = 0.0803571 the closed form gives y_N2 = 0.25 at X = 0.3.
    expect(Number(row[row.length - 2])).toBeCloseTo(0.3, 6);
  });

  it('solve: two targets adjusting the two outlets of one splitter are refused', () => {
    const r = cli(['solve', file, '--target', 'streams.recycle.fractions.N2 = 0.25', '--by', 'purge-split.out.recycle', '--within', '0.5:0.99',
      '--target', 'streams.purge.total = 20 mol/s', '--by', 'purge-split.out.purge', '--within', '0.01:0.5']);
    expect(r.code).not.toBe(0);
    expect(r.stdout + r.stderr).toMatch(/set each other/);
    expect(r.stdout).not.toMatch(/^Streams/m);
  });
});
