/**
 * The model is a value: validation returns a frozen model, nothing caches answers by shape in
 * module state, and a runtime owned by the caller follows the model it is given.
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/diagnostics.js';
import { loadFlowsheet, validateText } from '../../src/flowsheet/validate.js';
import { createRuntime } from '../../src/flowsheet/runtime.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { parameter, withValues } from '../../src/study/parameters.js';
import { parallelConversions, trappedInert } from './fixtures.js';

function firstError(text: string): { line: number; col: number; message: string } | undefined {
  try {
    validateText('t.yaml', text);
    return undefined;
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const d = e.diagnostics.find((x) => x.severity === 'error')!;
    return { line: d.span?.line ?? 0, col: d.span?.col ?? 0, message: d.message };
  }
}

describe('structure checks answer each file on its own', () => {
  it('reports the error where it is after lines are added above it, in the same process', () => {
    const a = firstError(trappedInert());
    const b = firstError(trappedInert('# one\n# two\n# three\n# four\n# five\n'));
    expect(a?.message).toMatch(/`Ar` is trapped/);
    expect(b?.message).toBe(a?.message);
    expect(b!.line).toBe(a!.line + 5);
  });

  it('does not refuse a valid file after an invalid one whose numbers had the same classes', () => {
    // 0.5 + 0.5 uses up the key completely (conversions of CO add up to 1); 0.3 + 0.3 does not.
    const full = firstError(parallelConversions(0.5, 0.5));
    expect(full).toBeDefined();
    expect(firstError(parallelConversions(0.3, 0.3))).toBeUndefined();
    // and again in the other order
    expect(firstError(parallelConversions(0.3, 0.3, '# first\n'))).toBeUndefined();
  });
});

describe('a model is frozen; a change is a new model', () => {
  const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');

  it('cannot be edited in place', () => {
    expect(Object.isFrozen(model)).toBe(true);
    expect(Object.isFrozen(model.feeds)).toBe(true);
    expect(Object.isFrozen(model.feeds[0])).toBe(true);
    expect(Object.isFrozen(model.units[1])).toBe(true);
    expect(() => {
      (model.feeds[0] as { T: number }).T = 1;
    }).toThrow(TypeError);
  });

  it('a doubled meter flow doubles that feed, with one runtime used for both models', () => {
    const p = parameter(model, 'feeds.hydrogen.meter.flow');
    const doubled = withValues(model, [{ parameter: p, value: 2 * p.value }]);
    expect(doubled).not.toBe(model);
    const rt = createRuntime(model);
    const a = solveFlowsheet(model, { runtime: rt });
    const b = solveFlowsheet(doubled, { runtime: rt });
    const c = solveFlowsheet(model, { runtime: rt });
    expect(a.status).toBe('converged');
    expect(b.status).toBe('converged');
    const h = (r: typeof a) => r.feeds.find((f) => f.name === 'hydrogen')!.molarFlow;
    expect(h(b) / h(a)).toBeCloseTo(2, 12);
    // back to the first model: the same answer as the first solve
    expect(h(c)).toBe(h(a));
    expect(c.loop.recycleRatio).toBeCloseTo(a.loop.recycleRatio, 10);
    // the original model still holds the file's value
    expect(parameter(model, 'feeds.hydrogen.meter.flow').value).toBe(p.value);
  });

  it('two files interleaved on one runtime each give their own answer', () => {
    const ammonia = loadFlowsheet('flowsheets/ammonia-loop.yaml').model;
    const rt = createRuntime(model);
    const m1 = solveFlowsheet(model, { runtime: rt });
    const a1 = solveFlowsheet(ammonia, { runtime: rt });
    const m2 = solveFlowsheet(model, { runtime: rt });
    const a2 = solveFlowsheet(ammonia, { runtime: createRuntime(ammonia) });
    expect(m2.loop.recycleRatio).toBeCloseTo(m1.loop.recycleRatio, 9);
    expect(a1.loop.recycleRatio).toBeCloseTo(a2.loop.recycleRatio, 9);
    expect(a1.streams.get('recycle')!.fractions[2]).toBeCloseTo(a2.streams.get('recycle')!.fractions[2], 10);
  });
});

describe('a reused runtime reports the figures of this solve only', () => {
  // A branch that a split of 0 leaves without flow: its compressor and condenser then have no
  // head and no vapor fraction. An invented test flowsheet; the check is the same model solved
  // on a fresh runtime.
  const text = [
    'title: a branch that can be shut',
    'components: { H2: {}, N2: {}, CO2: {} }',
    'thermo: { eos: SRK }',
    'feeds:',
    '  gas: { composition: { H2: 0.7, N2: 0.05, CO2: 0.25 }, molar-flow: 10 mol/s, T: 40 degC, P: 20 bar }',
    'units:',
    '  split: { type: splitter, in: gas, out: { a: 0.5, b: rest } }',
    '  comp: { type: compressor, in: a, out: a-hp, P: 40 bar, isentropic-efficiency: 0.75 }',
    '  cond: { type: condenser, in: a-hp, T: 10 degC, dp: 0.1 bar, model: equilibrium, vapor: a-gas, liquid: a-liq }',
    '',
  ].join('\n');
  const { model } = validateText('branch.yaml', text);
  const p = parameter(model, 'split.out.a');
  const figure = (r: ReturnType<typeof solveFlowsheet>, unit: string, key: string) => r.units.get(unit)!.figures.find((f) => f.key === key)?.value;

  it('a unit left without flow has no head and no vapor fraction, after a solve where it had them', () => {
    const rt = createRuntime(model);
    const open = solveFlowsheet(withValues(model, [{ parameter: p, value: 0.5 }]), { runtime: rt });
    expect(open.status).toBe('converged');
    expect(figure(open, 'cond', 'vaporFraction')).toBeGreaterThan(0);
    expect(Number.isFinite(figure(open, 'comp', 'isentropicHead'))).toBe(true);
    const shutModel = withValues(model, [{ parameter: p, value: 0 }]);
    const reused = solveFlowsheet(shutModel, { runtime: rt });
    const fresh = solveFlowsheet(shutModel, { runtime: createRuntime(model) });
    expect(fresh.status).toBe('converged');
    expect(reused.status).toBe('converged');
    for (const [unit, key] of [['cond', 'vaporFraction'], ['comp', 'isentropicHead'], ['comp', 'isentropicT'], ['comp', 'power']] as const) {
      expect(figure(reused, unit, key), `${unit} ${key}`).toStrictEqual(figure(fresh, unit, key));
    }
    expect(figure(reused, 'cond', 'vaporFraction')).toBeNaN();
    expect(figure(reused, 'comp', 'isentropicHead')).toBeNaN();
  });
});

describe('results own their arrays', () => {
  it('writing into a result changes neither the model nor another result (the feeds shared both)', () => {
    const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');
    const p = parameter(model, 'purge-split.out.purge');
    const rt = createRuntime(model);
    const r1 = solveFlowsheet(withValues(model, [{ parameter: p, value: 0.01 }]), { runtime: rt });
    const r2 = solveFlowsheet(withValues(model, [{ parameter: p, value: 0.05 }]), { runtime: rt });
    const h2 = r2.feeds[0].flows[0];
    const z2 = r2.feeds[0].composition[0];
    expect(z2).toBe(0.985); // the file's fraction of H2 in `hydrogen`
    r1.feeds[0].flows[0] = 1e6;
    r1.feeds[0].composition[0] = 0.5;
    r1.feeds[0].warnings.push('written by the caller');
    expect(r2.feeds[0].flows[0]).toBe(h2);
    expect(r2.feeds[0].composition[0]).toBe(z2);
    expect(r2.feeds[0].warnings).not.toContain('written by the caller');
    expect(model.feeds[0].composition[0]).toBe(0.985);
    // the model still solves to the answer it gave before the writes, on a fresh runtime
    const again = solveFlowsheet(withValues(model, [{ parameter: p, value: 0.05 }]), { runtime: createRuntime(model) });
    expect(again.loop.recycleRatio).toBe(r2.loop.recycleRatio);
  });
});

describe('parameters of every kind of feed reading', () => {
  it('a standard volume flow keeps its reference: doubled, the molar flow doubles', () => {
    const { model } = loadFlowsheet('flowsheets/ammonia-loop.yaml');
    const p = parameter(model, 'feeds.makeup.standard-flow');
    expect(p.reference).toBe('normal');
    const m2 = withValues(model, [{ parameter: p, value: 2 * p.value }]);
    const a = solveFlowsheet(model);
    const b = solveFlowsheet(m2);
    expect(b.feeds[0].molarFlow / a.feeds[0].molarFlow).toBeCloseTo(2, 12);
  });
});
