/**
 * A planted gross error on the ammonia demo (flowsheets/ammonia-loop.yaml, an invented plant):
 * the readings are generated from a converged loopclose solve of the file, each instrument's
 * reading perturbed by seeded normal noise of its own standard uncertainty (its stated U / 2),
 * and the makeup meter FI-101 biased by +6 %. The reconciliation must name FI-101 and no other
 * instrument, estimate its bias near +6 %, and fit the per-pass conversion of the solve (0.22 in
 * the file) within its standard uncertainty. Without the bias, the global test passes.
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/load.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { meterMolarFlow } from '../../src/plant/budget.js';
import { standardUncertainty } from '../../src/plant/declarations.js';
import { preparePlant, type RowReading } from '../../src/plant/plant.js';
import { R } from '../../src/thermo/constants.js';
import { makeEos } from '../../src/thermo/eos.js';
import { normalDraws } from './ammonia-loop.js';

const { model } = loadFlowsheet(join(__dirname, '..', '..', 'flowsheets', 'ammonia-loop.yaml'));
const solve = solveFlowsheet(model);
const eos = makeEos(model.thermo.eos, model.components, model.thermo.kij);
const plant = preparePlant(model);
const decl = (tag: string) => model.instruments.find((d) => d.tag === tag)!;

/** Readings of every instrument at the solved state, with noise of seed `seed` and FI-101 biased. */
function readingsFor(seed: number, bias: number): Map<string, RowReading> {
  const draw = normalDraws(seed);
  const st = (s: string) => solve.streams.get(s)!;
  const out = new Map<string, RowReading>();
  const noisy = (tag: string, v: number) => v + standardUncertainty(decl(tag).uncertainty!, v) * draw();
  const meter = (tag: string, p: string, t: string, stream: string, P: number, T: number, b = 0) => {
    out.set(p, { value: noisy(p, P) });
    out.set(t, { value: noisy(t, T) });
    const s = st(stream);
    // The volume the meter sees at the true line state (the inverse of the feed conversion).
    const Q = s.total / meterMolarFlow(eos, 1, T, P, s.fractions);
    out.set(tag, { value: noisy(tag, Q) * (1 + b) });
  };
  meter('FI-101', 'PI-101', 'TI-101', 'makeup', 150e5, 313.15, bias);
  meter('FI-205', 'PI-205', 'TI-205', 'purge', 145e5, 263.15);
  const normal = model.thermo.standards.get('normal')!;
  for (const [tag, stream] of [['FI-120', 'converter-in'], ['FI-150', 'recycle']]) {
    const s = st(stream);
    const Q = (s.total * eos.z(normal.T, normal.P, s.fractions, 'stable').Z * R * normal.T) / normal.P;
    out.set(tag, { value: noisy(tag, Q), reference: normal });
  }
  let mass = 0;
  st('liquid-ammonia').flows.forEach((v, i) => (mass += v * model.components[i].MW));
  out.set('FI-310', { value: noisy('FI-310', mass) });
  for (const a of ['AI-120', 'AI-130', 'AI-205', 'AI-310']) {
    const d = decl(a);
    const s = st(d.stream);
    let basis = 0;
    for (const k of d.normalized === false ? model.ids.map((_, i) => i) : d.components!) basis += s.fractions[k];
    const fr = new Float64Array(model.ids.length).fill(Number.NaN);
    d.components!.forEach((k, pos) => {
      const x = s.fractions[k] / basis;
      fr[k] = x + standardUncertainty(d.componentUncertainty?.[pos] ?? d.uncertainty!, x) * draw();
    });
    out.set(a, { fractions: fr });
  }
  return out;
}

describe('planted bias: FI-101 (makeup meter) reads 6 % high on the ammonia demo, seeded noise', () => {
  const conversion = solve.units.get('converter')!.reactions![0].conversion;

  it('the solve the data come from converged, at the file\'s conversion 0.22', () => {
    expect(solve.status).toBe('converged');
    expect(conversion).toBeCloseTo(0.22, 12);
  });

  it('seed 1: gross error; serial elimination names FI-101 and no other, bias about +6 %; the fitted conversion is the solve\'s within its sigma', () => {
    const { report } = plant.run({ readings: readingsFor(1, 0.06) });
    expect(report.status).toBe('gross-error');
    expect(report.globalTest.passed).toBe(false);
    expect(report.suspects.map((s) => s.tag)).toEqual(['FI-101']);
    expect(report.suspects[0].indistinguishableFrom).toEqual([]);
    for (const [tag, r] of Object.entries(report.instruments)) expect(r.suspect, tag).toBe(tag === 'FI-101');
    const s = report.suspects[0];
    // The bias estimate: within two of its standard uncertainties of the planted +6 %.
    expect(Math.abs(s.bias - 0.06)).toBeLessThan(2 * s.biasSigma);
    expect(report.afterRemoving!.tags).toEqual(['FI-101']);
    expect(report.afterRemoving!.globalTest.passed).toBe(true);
    const p = report.parameters['converter.reactions.0.conversion'];
    expect(p.parameter).toBe(true);
    expect(p.file).toBeCloseTo(0.22, 12);
    expect(Math.abs(p.value! - conversion)).toBeLessThan(p.sigma!);
  });

  // Over many seeds the outcome is a matter of probability: a 6 % bias on a meter of 0.75 %
  // standard uncertainty is found nearly always, but now and then the noise makes a near-parallel
  // meter (the liquid product's, which closes the same nitrogen balance) look worse; and a fitted
  // value lies within one of its standard uncertainties about 68 % of the time, within two about
  // 95 % (normal distribution). Bounds: binomial, 40 seeds, about three standard deviations wide.
  it('seeds 1 to 40: FI-101 is named first in at least 85 %; the conversion lies within 1 sigma in 45 to 90 %, within 2 sigma in at least 80 %', () => {
    let first = 0;
    let within1 = 0;
    let within2 = 0;
    const N = 40;
    for (let seed = 1; seed <= N; seed++) {
      const { report } = plant.run({ readings: readingsFor(seed, 0.06) });
      expect(report.status).toBe('gross-error');
      if (report.suspects[0]?.tag === 'FI-101') first++;
      const p = report.parameters['converter.reactions.0.conversion'];
      const d = Math.abs(p.value! - conversion) / p.sigma!;
      if (d < 1) within1++;
      if (d < 2) within2++;
    }
    expect(first / N).toBeGreaterThanOrEqual(0.85);
    expect(within1 / N).toBeGreaterThanOrEqual(0.45);
    expect(within1 / N).toBeLessThanOrEqual(0.9);
    expect(within2 / N).toBeGreaterThanOrEqual(0.8);
  });

  it('without the bias (seed 1): the global test passes and nothing is named', () => {
    const { report } = plant.run({ readings: readingsFor(1, 0) });
    expect(report.status).toBe('reconciled');
    expect(report.suspects).toEqual([]);
    expect(report.redundancy).toBeGreaterThan(0);
  });
});
