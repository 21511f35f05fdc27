/**
 * The structured steps of the engine (src/plant/structured.ts) against the whole factorisation
 * of every step (options.structured: false): the same reconciliation to rounding on the ammonia
 * demo's rows (all readings, a reading missing, a meter biased so that serial elimination takes
 * it out), with the same classification, redundancy and iterations. The whole factorisation is
 * itself checked against Narasimhan and Jordache's Example 1.1 in linear.test.ts (a problem with
 * no pattern, which always takes it).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { parseHistorian, frozenTags, rowInput } from '../../src/plant/historian.js';
import { preparePlant, prepareReconciliation, PLANT_RECONCILE_DEFAULTS } from '../../src/plant/index.js';
import type { PlantReport } from '../../src/plant/index.js';

const DEMO = 'flowsheets/ammonia-loop.yaml';

function numbers(report: PlantReport): Map<string, number> {
  const out = new Map<string, number>();
  const walk = (v: unknown, path: string) => {
    if (typeof v === 'number') out.set(path, v);
    else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, `${path}.${k}`);
  };
  walk({ instruments: report.instruments, parameters: report.parameters, unmeasured: report.unmeasured, globalTest: report.globalTest, suspects: report.suspects, closure: report.closure }, '');
  return out;
}

describe('structured steps reproduce the whole factorisation', () => {
  const { model } = loadFlowsheet(DEMO);
  const text = readFileSync('flowsheets/data/ammonia-loop-year.csv', 'utf8');
  const historian = parseHistorian(text, 'year.csv', model);
  const frozen = frozenTags(historian);
  const structured = preparePlant(model);
  const whole = preparePlant(model, { reconcile: { structured: false } });

  it('the demo has the structure: its 31 linear unit balances (five components through the mixer, preheater, cooler, circulator, and the rest) are eliminated once', () => {
    expect(structured.prepared.eliminatedRows).toBe(31);
    expect(whole.prepared.eliminatedRows).toBe(0);
  });

  it('rows with every reading, a reading missing, and a biased makeup meter: the same reports to 1e-9', () => {
    // Rows 1-12, a row with an empty cell (the generator plants a few), and days 200-201 (FI-101 6 % high).
    const empty = historian.rows.findIndex((r) => r.cells.some((c, k) => k > 0 && c.trim() === ''));
    const picks = [...Array.from({ length: 12 }, (_, k) => k), empty, ...Array.from({ length: 12 }, (_, k) => 200 * 24 + k)];
    let gross = 0;
    let missing = 0;
    let warmA: Float64Array | undefined;
    let warmB: Float64Array | undefined;
    for (const r of picks) {
      const { input } = rowInput(historian, model, r, frozen);
      const a = structured.run(input, warmA);
      const b = whole.run(input, warmB);
      warmA = a.x;
      warmB = b.x;
      expect(a.report.status).toBe(b.report.status);
      expect(a.report.redundancy).toBe(b.report.redundancy);
      expect(a.report.iterations).toBe(b.report.iterations);
      expect(a.report.suspects.map((s) => s.tag)).toEqual(b.report.suspects.map((s) => s.tag));
      for (const [tag, rep] of Object.entries(a.report.instruments)) expect(rep.classification, tag).toBe(b.report.instruments[tag].classification);
      const na = numbers(a.report);
      const nb = numbers(b.report);
      expect([...na.keys()]).toEqual([...nb.keys()]);
      for (const [k, v] of na) {
        const w = nb.get(k)!;
        expect(Math.abs(v - w), `${k}: ${v} vs ${w}`).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(w)));
      }
      if (a.report.status === 'gross-error') gross++;
      if (Object.values(a.report.instruments).some((i) => i.use === 'no-reading')) missing++;
    }
    expect(gross).toBeGreaterThan(5);
    expect(missing).toBeGreaterThan(0);
  });

  it('an engine problem without a pattern takes the whole factorisation (same answer either way)', () => {
    const net = structured.network;
    const withPattern = prepareReconciliation({ variables: net.variables, constraints: net.constraints }, PLANT_RECONCILE_DEFAULTS);
    // The same balances and Jacobian, without the pattern.
    const plain = { count: net.constraints.count, names: net.constraints.names, evaluate: (x: Float64Array, o: Float64Array) => net.constraints.evaluate(x, o), jacobian: (x: Float64Array, o: Float64Array) => net.constraints.jacobian(x, o) };
    const without = prepareReconciliation({ variables: net.variables, constraints: plain }, PLANT_RECONCILE_DEFAULTS);
    expect(withPattern.eliminatedRows).toBe(31);
    expect(without.eliminatedRows).toBe(0);
    const values = Float64Array.from(net.variables, (v) => (v.measured ? v.measured.value * 1.01 : NaN));
    const sigmas = Float64Array.from(net.variables, (v) => (v.measured ? Math.max(1e-6, 0.01 * Math.abs(v.measured.value)) : NaN));
    const a = withPattern.solve({ values, sigmas });
    const b = without.solve({ values, sigmas });
    expect(a.status).toBe('reconciled');
    expect(b.status).toBe('reconciled');
    for (let j = 0; j < a.x.length; j++) expect(Math.abs(a.x[j] - b.x[j])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(b.x[j])));
    expect(a.covariance.matrix.length).toBe(b.covariance.matrix.length);
    // Entries agree to 1e-9 of themselves, or of the largest entry for those near round-off.
    const scale = b.covariance.matrix.reduce((m: number, v: number) => Math.max(m, Math.abs(v)), 0);
    for (let k = 0; k < a.covariance.matrix.length; k++) expect(Math.abs(a.covariance.matrix[k] - b.covariance.matrix[k])).toBeLessThanOrEqual(1e-9 * Math.max(Math.abs(b.covariance.matrix[k]), 1e-6 * scale));
  });
});
