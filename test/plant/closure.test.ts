import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/load.js';
import { closure } from '../../src/plant/index.js';
import { preparePlant, type RowReading } from '../../src/plant/plant.js';
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

// The raw closure of a flowsheet whose products are weighed (mass meters) and read by analyzers
// that see part of the stream (test/plant/flowsheets/mass-analyzer.yaml). The check value is the
// closed form of the law of propagation (JCGM 100:2008, Sec. 5.1.2, eq. (10)) with the
// sensitivities differentiated by hand:
//   stream d (`normalized: false`, reads w = x_H2): the unread components share the rest,
//     x_i = c_i (1 - w), c_i = x_i,design / sum of the unread design fractions;
//     MW = w M_H2 + (1 - w) M_R, M_R = sum c_i M_i;  F = m / MW;
//     O_H = F (2 w + (1 - w) h_R), h_R = sum c_i h_i (h: H atoms per molecule);
//     dO/dm = O / m;  dO/dw = F (2 - h_R) - O (M_H2 - M_R) / MW.
//   stream e (normalized over H2, N2, CH4; NH3 from the design, x_NH3 = 0.1, s = 1 - 0.1):
//     x_k = s w_k, MW = s sum w_k M_k + 0.1 M_NH3, F = m / MW, O_H = F (s sum w_k h_k + 0.1 h_NH3);
//     dO/dw_k = F s h_k - O s M_k / MW.
//   The total mass out is the two mass readings: no analyzer enters it.
//   f = 1 - O / I: df/dq = (O / I^2) dI/dq for an inflow reading, -(1 / I) dO/dq for an outflow one.
describe('raw closure of mass-metered products read by partial analyzers', () => {
  const { model } = loadFlowsheet(join(__dirname, 'flowsheets', 'mass-analyzer.yaml'));
  const plant = preparePlant(model);
  const ix = (id: string) => model.ids.indexOf(id);
  const M = (id: string) => model.components[ix(id)].MW; // kg/mol
  const H: Record<string, number> = { H2: 2, N2: 0, CH4: 4, NH3: 3 };
  const fa = 10.05;
  const fb = 4.97;
  const md = 0.0716;
  const me = 0.1075;
  const w = 0.49;
  const we: Record<string, number> = { H2: 0.545, N2: 0.262, CH4: 0.19 };
  const frac = (vals: Record<string, number>) => {
    const f = new Float64Array(model.ids.length).fill(NaN);
    for (const [k, v] of Object.entries(vals)) f[ix(k)] = v;
    return f;
  };
  const readings = new Map<string, RowReading>([
    ['FA', { value: fa }],
    ['FB', { value: fb }],
    ['FD', { value: md }],
    ['AD', { fractions: frac({ H2: w }) }],
    ['FE', { value: me }],
    ['AE', { fractions: frac(we) }],
  ]);
  const r = plant.run({ readings }).report;
  const ufa = 0.005 * fa;
  const ufb = 0.005 * fb;
  const umd = 0.005 * md;
  const ume = 0.005 * me;
  const uw = 0.005;

  it('the total mass: its uncertainty is the meters\' alone, whatever the analyzers read', () => {
    const Ma = 0.75 * M('H2') + 0.25 * M('N2');
    const Mb = 0.2 * M('N2') + 0.5 * M('CH4') + 0.3 * M('NH3');
    const I = fa * Ma + fb * Mb;
    const O = md + me;
    const u = Math.sqrt(((O / I ** 2) * Ma * ufa) ** 2 + ((O / I ** 2) * Mb * ufb) ** 2 + (umd / I) ** 2 + (ume / I) ** 2);
    const m = r.closure.mass!;
    expect(m.relative).toBeCloseTo(1 - O / I, 12);
    expect(m.uncertainty / (2 * u)).toBeCloseTo(1, 9);
  });

  it('hydrogen: the unread rest and the molar mass move with each analyzer reading', () => {
    // Design composition of c (and of d and e): 10 mol/s of a and 5 of b.
    const design: Record<string, number> = { H2: 7.5 / 15, N2: 3.5 / 15, CH4: 2.5 / 15, NH3: 1.5 / 15 };
    const rest = ['N2', 'CH4', 'NH3'];
    const dRest = rest.reduce((s, k) => s + design[k], 0);
    const MR = rest.reduce((s, k) => s + (design[k] / dRest) * M(k), 0);
    const hR = rest.reduce((s, k) => s + (design[k] / dRest) * H[k], 0);
    const MWd = w * M('H2') + (1 - w) * MR;
    const Fd = md / MWd;
    const Od = Fd * (2 * w + (1 - w) * hR);
    const dOd_dw = Fd * (2 - hR) - (Od * (M('H2') - MR)) / MWd;
    const s = 1 - design.NH3;
    const MWe = s * Object.entries(we).reduce((t, [k, v]) => t + v * M(k), 0) + design.NH3 * M('NH3');
    const Fe = me / MWe;
    const Oe = Fe * (s * Object.entries(we).reduce((t, [k, v]) => t + v * H[k], 0) + design.NH3 * H.NH3);
    const I = fa * 1.5 + fb * (0.5 * 4 + 0.3 * 3);
    const O = Od + Oe;
    const terms = [
      ((O / I ** 2) * 1.5 * ufa),
      ((O / I ** 2) * 2.9 * ufb),
      ((Od / md) * umd) / I,
      (dOd_dw * uw) / I,
      ((Oe / me) * ume) / I,
      ...Object.keys(we).map((k) => ((Fe * s * H[k] - (Oe * s * M(k)) / MWe) * uw) / I),
    ];
    const u = Math.sqrt(terms.reduce((t, v) => t + v * v, 0));
    const c = r.closure.elements.H;
    expect(c.relative).toBeCloseTo(1 - O / I, 12);
    expect(c.uncertainty / (2 * u)).toBeCloseTo(1, 9);
  });
});
