import { describe, expect, it } from 'vitest';
import { closure } from '../../src/plant/index.js';
import { normalDraws } from './ammonia-loop.js';

// Law of propagation of uncertainty for uncorrelated inputs: JCGM 100:2008 (GUM), Sec. 5.1.2,
// eq. (10): u^2(f) = sum_i (df/dx_i)^2 u^2(x_i); expanded uncertainty U = k u with k = 2 (Sec. 6.3.3).

describe('raw closure (in - out) / in with its uncertainty', () => {
  it('one meter in, one out: by hand from eq. (10)', () => {
    // f = 1 - O/I; df/dI = O/I^2 = 0.0096, df/dO = -1/I = -0.01;
    // u = sqrt(0.0096^2 + 0.01^2) = 0.013862...; U = 2u.
    const r = closure({
      quantities: [
        { name: 'feed', value: 100, sigma: 1 },
        { name: 'product', value: 96, sigma: 1 },
      ],
      inflow: [{ factors: [0] }],
      outflow: [{ factors: [1] }],
    });
    expect(r.status).toBe('ok');
    expect(r.relative).toBeCloseTo(0.04, 14);
    expect(r.imbalance).toBeCloseTo(4, 12);
    expect(r.imbalanceUncertainty).toBeCloseTo(Math.SQRT2, 12);
    const u = Math.sqrt(0.0096 ** 2 + 0.01 ** 2);
    expect(r.relativeUncertainty).toBeCloseTo(u, 14);
    expect(r.coverageFactor).toBe(2);
    expect(r.relativeExpanded).toBeCloseTo(2 * u, 14);
    expect(r.contributions[0].share + r.contributions[1].share).toBeCloseTo(1, 14);
    expect(r.contributions[1].share).toBeCloseTo(0.01 ** 2 / u ** 2, 12);
  });

  it('an element balance of flow x fraction terms agrees with a seeded Monte Carlo of the same readings', () => {
    // N balance of an ammonia loop (invented readings): in = 2 F_M y_N2,M;
    // out = 2 F_G y_N2,G + F_P (product taken as pure NH3, one N atom).
    const quantities = [
      { name: 'makeup.flow', value: 100, sigma: 1 },
      { name: 'makeup.N2', value: 0.2475, sigma: 0.002 },
      { name: 'purge.flow', value: 10, sigma: 0.1 },
      { name: 'purge.N2', value: 0.2175, sigma: 0.002 },
      { name: 'product.flow', value: 44.85, sigma: 0.45 },
    ];
    const input = {
      quantities,
      inflow: [{ coefficient: 2, factors: [0, 1] }],
      outflow: [{ coefficient: 2, factors: [2, 3] }, { factors: [4] }],
    };
    const r = closure(input);
    const I = 2 * 100 * 0.2475;
    const O = 2 * 10 * 0.2175 + 44.85;
    expect(r.inflow).toBeCloseTo(I, 12);
    expect(r.outflow).toBeCloseTo(O, 12);
    expect(r.relative).toBeCloseTo((I - O) / I, 12);
    const draw = normalDraws(2024);
    const samples: number[] = [];
    for (let s = 0; s < 20000; s++) {
      const q = quantities.map((v) => v.value + v.sigma * draw());
      const i = 2 * q[0] * q[1];
      const o = 2 * q[2] * q[3] + q[4];
      samples.push((i - o) / i);
    }
    const mean = samples.reduce((a, b) => a + b, 0) / samples.length;
    const sd = Math.sqrt(samples.reduce((a, b) => a + (b - mean) ** 2, 0) / (samples.length - 1));
    // First order is good to well under 3 % here (relative sigmas of 1 %); the Monte Carlo sd
    // itself scatters by about 0.5 % for 20,000 samples.
    expect(Math.abs(r.relativeUncertainty / sd - 1)).toBeLessThan(0.03);
  });

  it('a reading on both sides counts once: a common factor cancels from (in - out) / in', () => {
    // in = q a, out = q b: f = 1 - b/a whatever q is, so q carries no uncertainty into f.
    const r = closure({
      quantities: [
        { name: 'q', value: 50, sigma: 5 },
        { name: 'a', value: 0.5, sigma: 0.005 },
        { name: 'b', value: 0.45, sigma: 0.005 },
      ],
      inflow: [{ factors: [0, 1] }],
      outflow: [{ factors: [0, 2] }],
    });
    expect(Math.abs(r.contributions[0].sensitivity)).toBeLessThan(1e-15);
    expect(r.relativeUncertainty).toBeCloseTo(Math.sqrt((0.45 / 0.25) ** 2 * 0.005 ** 2 + (1 / 0.5) ** 2 * 0.005 ** 2), 12);
  });

  it('bad input gets one message per problem and no numbers', () => {
    const r = closure({
      quantities: [
        { name: 'a', value: 1, sigma: -1 },
        { name: 'b', value: NaN, sigma: 1 },
      ],
      inflow: [{ factors: [0, 3] }],
      outflow: [{ factors: [] }],
    });
    expect(r.status).toBe('invalid');
    expect(r.issues).toHaveLength(4);
    expect(Number.isNaN(r.relative)).toBe(true);
    const zero = closure({ quantities: [{ name: 'a', value: 0, sigma: 1 }], inflow: [{ factors: [0] }], outflow: [] });
    expect(zero.status).toBe('invalid');
    expect(zero.issues[0]).toMatch(/not positive/);
  });
});
