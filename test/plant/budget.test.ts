/**
 * The flow budget (src/plant/budget.ts): a meter's reading converted exactly as a metered feed
 * is (src/blocks/feed.ts computeFeed), and its uncertainty combined by the law of propagation of
 * uncertainty (JCGM 100:2008, Sec. 5.1.2, eq. (10)). For an ideal gas F = Q P / (R T), so the
 * sensitivities are exactly F / Q, F / P and -F / T (the ideal-gas law).
 */
import { describe, expect, it } from 'vitest';
import { computeFeed } from '../../src/blocks/feed.js';
import type { FeedSpec } from '../../src/flowsheet/model.js';
import { meterFlowBudget, meterMolarFlow } from '../../src/plant/budget.js';
import { makeMeterEos } from '../../src/thermo/meter-eos.js';
import { findComponent } from '../../src/thermo/components.js';
import { makeEos } from '../../src/thermo/eos.js';

const comps = ['H2', 'N2', 'CH4'].map((id) => findComponent(id)!);
const x = Float64Array.from([0.7, 0.25, 0.05]);
const feed = (design?: FeedSpec['basis'] extends infer B ? (B extends { kind: 'meter'; design?: infer D } ? D : never) : never): FeedSpec => ({
  name: 'f', type: 'feed', inlets: [], outlets: ['f'], composition: x, T: 300, P: 30e5,
  basis: { kind: 'meter', flow: 0.01, T: 300, P: 30e5, design },
});

describe('meter conversion: the same as a metered feed', () => {
  const eos = makeEos('SRK', comps);
  it('plain meter, SRK: F = Q / v(T, P, x) equals computeFeed to 1e-14', () => {
    expect(meterMolarFlow(eos, 0.01, 300, 30e5, x)).toBeCloseTo(computeFeed(feed(), eos).molarFlow, 12);
    expect(Math.abs(meterMolarFlow(eos, 0.01, 300, 30e5, x) / computeFeed(feed(), eos).molarFlow - 1)).toBeLessThan(1e-14);
  });
  it('differential-pressure meter with a design state: equals computeFeed to 1e-14', () => {
    const design = { P: 25e5, T: 290, composition: Float64Array.from([0.75, 0.25, 0]) };
    const a = meterMolarFlow(eos, 0.01, 300, 30e5, x, design);
    const b = computeFeed(feed(design), eos).molarFlow;
    expect(Math.abs(a / b - 1)).toBeLessThan(1e-14);
  });
});

describe('the meters\' budget in the balances', () => {
  it('ideal gas: line sensitivities are F/P and F/T exactly; the equation of state measured against GERG-2008; terms combine in quadrature', () => {
    const eos = makeEos('ideal', comps);
    const Q = 0.01;
    const T = 300;
    const P = 30e5;
    const F = (Q * P) / (8.314462618 * T);
    const budget = meterFlowBudget(makeMeterEos('ideal', eos));
    const b = budget({
      tag: 'FI-1', kind: 'meter', reading: Q, instrument: 0.0001, composition: x, eos,
      line: { T, P, uT: 0.5, uP: 0.25e5, temperatureTag: 'TI-1', pressureTag: 'PI-1' },
    });
    expect(b.value).toBeCloseTo(F, 10);
    const [inst, p, t, ...model] = b.terms;
    expect(inst.source).toBe('instrument');
    expect(inst.sigma).toBeCloseTo((F / Q) * 0.0001, 12);
    expect(p.source).toBe('line pressure (PI-1)');
    expect(p.sigma).toBeCloseTo((F / P) * 0.25e5, 8);
    expect(t.source).toBe('line temperature (TI-1)');
    expect(t.sigma).toBeCloseTo((F / T) * 0.5, 8);
    // The ideal-gas law against GERG-2008 at 30 bar: a measured, non-zero figure.
    expect(model.length).toBeGreaterThan(0);
    expect(model[0].sigma).toBeGreaterThan(0);
    expect(model[0].note).toMatch(/GERG-2008/);
    expect(b.sigma).toBeCloseTo(Math.hypot(...b.terms.map((x) => x.sigma)), 12);
  });
  it('mass and molar readings pass through with the instrument\'s own uncertainty', () => {
    const eos = makeEos('ideal', comps);
    const b = meterFlowBudget(makeMeterEos('ideal', eos))({ tag: 'FI-2', kind: 'mass', reading: 2, instrument: 0.01, composition: x, eos });
    expect(b).toMatchObject({ value: 2, basis: 'mass', sigma: 0.01 });
  });
});
