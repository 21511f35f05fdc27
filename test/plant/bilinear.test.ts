import { describe, expect, it } from 'vitest';
import { derivedEstimate, prepareReconciliation, reconcile, serialElimination } from '../../src/plant/index.js';
import { exactLoop, loopProblem, MEASURED, NAMES, readings, V } from './ammonia-loop.js';

// Planted-error checks on a bilinear loop (ammonia-loop.ts): the data are generated from an
// exact steady state, perturbed by seeded normal noise of the stated sigmas, and (for the
// gross-error case) one meter is biased. What is checked is that the method recovers what was
// planted; the loop itself is an invented scenario.

const exact = exactLoop();
/** Per-pass N2 conversion: extent over the N2 flow into the reactor. */
const conversion = (x: Float64Array) => x[V.xi] / x[V.n1[1]];
const SEED = 3;

describe('bilinear loop: mixer, reactor with a free extent, condenser, splitter with purge analyzer', () => {
  it('the generated steady state meets every balance', () => {
    const p = loopProblem(readings(exact, SEED));
    const c = new Float64Array(p.constraints.count);
    p.constraints.evaluate(exact, c);
    for (const v of c) expect(Math.abs(v)).toBeLessThan(1e-12 * 500);
  });

  it('exact readings reconcile to themselves, and every unmeasured variable is observable', () => {
    const perfect = new Map(MEASURED.map((j) => [j, { value: exact[j], sigma: 0.01 * exact[j] }]));
    const r = reconcile(loopProblem(perfect));
    expect(r.status).toBe('reconciled');
    expect(r.objective).toBeLessThan(1e-16);
    for (let j = 0; j < NAMES.length; j++) expect(r.x[j]).toBeCloseTo(exact[j], 8);
    // By hand: 10 balances, 7 unmeasured variables (two purge fractions, the extent, four
    // reactor-inlet flows) all determined by them, so 10 - 7 = 3 independent checks remain.
    expect(r.redundancy).toBe(3);
    expect(r.estimates.filter((e) => e.role === 'unmeasured').every((e) => e.classification === 'observable')).toBe(true);
    expect(r.estimates.filter((e) => e.role === 'measured').every((e) => e.classification === 'redundant')).toBe(true);
  });

  it(`no bias (seed ${SEED}): the global test passes at 95 % and serial elimination finds nothing`, () => {
    const prep = prepareReconciliation(loopProblem(readings(exact, SEED)));
    const s = serialElimination(prep);
    expect(s.initial.status).toBe('reconciled');
    expect(s.initial.globalTest!.status).toBe('passed');
    expect(s.status).toBe('clean');
    expect(s.suspects).toEqual([]);
    const conv = derivedEstimate(s.final, conversion);
    expect(Math.abs(conv.value! - conversion(exact))).toBeLessThan(conv.uncertainty!);
  });

  it(`makeup meter reading 6 % high (seed ${SEED}): named alone, its bias about +6 %, the conversion recovered within its sigma`, () => {
    const prep = prepareReconciliation(loopProblem(readings(exact, SEED, V.FM, 0.06)));
    const s = serialElimination(prep);
    expect(s.initial.globalTest!.status).toBe('failed');
    expect(s.status).toBe('suspects-found');
    expect(s.suspects.map((x) => x.name)).toEqual(['makeup.flow']);
    expect(s.suspects[0].indistinguishableFrom).toEqual([]);
    const suspect = s.suspects[0];
    // The planted bias is 6 % of the true flow, 6/106 = 5.7 % of the reading (plus noise).
    expect(Math.abs(suspect.relativeBias - 0.06)).toBeLessThan(0.01);
    expect(Math.abs(suspect.bias - 6)).toBeLessThan(2 * suspect.biasUncertainty);
    expect(s.final.globalTest!.status).toBe('passed');
    expect(s.final.estimates[V.FM].role).toBe('unmeasured');
    const conv = derivedEstimate(s.final, conversion);
    expect(Math.abs(conv.value! - conversion(exact))).toBeLessThan(conv.uncertainty!);
    const xi = s.final.estimates[V.xi];
    expect(Math.abs(xi.value! - exact[V.xi])).toBeLessThan(xi.uncertainty!);
    expect(s.message).toMatch(/"makeup.flow" \(bias \+\d\.\d %/);
  });

  it('finite differences and the analytic Jacobian give the same reconciliation', () => {
    const data = readings(exact, SEED, V.FM, 0.06);
    const a = reconcile(loopProblem(data));
    const f = reconcile(loopProblem(data, { analytic: false }));
    expect(f.status).toBe(a.status);
    for (let j = 0; j < NAMES.length; j++) expect(Math.abs(f.x[j] - a.x[j])).toBeLessThan(1e-6 * Math.abs(a.x[j]));
    expect(f.globalTest!.statistic).toBeCloseTo(a.globalTest!.statistic, 5);
  });

  it('an iteration budget too small ends not-converged, with no estimates and the history kept', () => {
    const r = reconcile(loopProblem(readings(exact, SEED, V.FM, 0.06)), { maxIterations: 1 });
    expect(r.status).toBe('not-converged');
    expect(r.estimates).toEqual([]);
    expect(r.history).toHaveLength(1);
    expect(r.message).toMatch(/not converged after 1 iterations/);
  });

  it('over 300 seeded snapshots: the global test passes about 95 % of the time and the conversion scatters as its sigma says', () => {
    // Statistical checks of the wiring: with correct dof and covariance, the pass rate is
    // 0.95 (binomial sd 1.3 % for 300 runs) and the sample sd of the conversion equals the
    // first-order sigma (sd of a sample sd about 4 % for 300 runs). Bounds at about 4 sd.
    const prep = prepareReconciliation(loopProblem(readings(exact, SEED)));
    let passed = 0;
    const values: number[] = [];
    let sigmaSum = 0;
    const snapshotValues = new Float64Array(NAMES.length);
    for (let seed = 1000; seed < 1300; seed++) {
      for (const [j, rd] of readings(exact, seed)) snapshotValues[j] = rd.value;
      const r = prep.solve({ values: snapshotValues });
      expect(r.status).toBe('reconciled');
      if (r.globalTest!.status === 'passed') passed++;
      const d = derivedEstimate(r, conversion);
      values.push(d.value!);
      sigmaSum += d.uncertainty!;
    }
    expect(passed / 300).toBeGreaterThan(0.9);
    expect(passed / 300).toBeLessThan(0.995);
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    const sd = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
    const ratio = sd / (sigmaSum / values.length);
    expect(ratio).toBeGreaterThan(0.85);
    expect(ratio).toBeLessThan(1.15);
    expect(Math.abs(mean - conversion(exact))).toBeLessThan((4 * sd) / Math.sqrt(values.length));
  });
});
