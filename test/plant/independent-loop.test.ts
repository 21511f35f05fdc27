/**
 * The ammonia demo's snapshot (flowsheets/ammonia-loop.yaml) against an independent fit of the
 * same loop, written here from the flowsheet by hand with its own unknowns and solved by plain
 * Gauss-Newton (weighted least squares of the readings, Narasimhan and Jordache, "Data
 * Reconciliation and Gross Error Detection", Gulf 2000, ch. 3 and 5: nonlinear reconciliation as
 * min sum ((y - h(p)) / sigma)^2 over the free unknowns p; covariance of the estimates
 * (J' S^-1 J)^-1, of the adjustments S - J (J' S^-1 J)^-1 J', measurement test |a_i| / sqrt of
 * its variance; ch. 7).
 *
 * Unknowns (8): makeup flow M (its composition is the file's), the reaction's extent xi, the
 * separator gas's component flows v (5), the purge fraction phi. Everything else follows:
 * recycle r = (1 - phi) v, converter feed m = M z + r, converter outlet o = m + nu xi, liquid
 * l = o - v, purge phi v. Readings (15): FI-101 = M; FI-120 = sum m; AI-120 = m_NH3 / sum m;
 * AI-130 = o_NH3 / sum o; FI-150 = sum r; FI-205 = phi sum v; AI-205 = v_k / (v_H2 + v_N2 +
 * v_Ar + v_CH4) for those four; FI-310 = sum M_i l_i (kg/s); AI-310 = l_k / sum l for the
 * same four. Redundancy 15 - 8 = 7. The meters' and standard volumes' conversions to mol/s (with
 * the equation of state) are taken as reported: they are checked elsewhere (test/thermo,
 * test/plant/budget.test.ts).
 */
import { inverse, Matrix } from 'ml-matrix';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/load.js';
import { preparePlant, type RowReading } from '../../src/plant/plant.js';

const { model } = loadFlowsheet(join(__dirname, '..', '..', 'flowsheets', 'ammonia-loop.yaml'));
const ORDER = ['H2', 'N2', 'Ar', 'CH4', 'NH3'];
const ix = ORDER.map((id) => model.ids.indexOf(id));
const MW = ix.map((i) => model.components[i].MW);
const Z = [0.741, 0.247, 0.003, 0.009, 0]; // the makeup of the file
const NU = [-3, -1, 0, 0, 2]; // N2 + 3 H2 -> 2 NH3
const sum = (a: number[]) => a.reduce((s, v) => s + v, 0);

function h(p: number[]): number[] {
  const [M, xi, , , , , , phi] = p;
  const v = p.slice(2, 7);
  const r = v.map((x) => (1 - phi) * x);
  const m = Z.map((z, i) => M * z + r[i]);
  const o = m.map((x, i) => x + NU[i] * xi);
  const l = o.map((x, i) => x - v[i]);
  const vs = v[0] + v[1] + v[2] + v[3];
  const ls = sum(l);
  return [M, sum(m), m[4] / sum(m), o[4] / sum(o), sum(r), phi * sum(v),
    v[0] / vs, v[1] / vs, v[2] / vs, v[3] / vs,
    sum(l.map((x, i) => x * MW[i])), l[0] / ls, l[1] / ls, l[2] / ls, l[3] / ls];
}

function jac(p: number[], rows: number[]): Matrix {
  const J = new Matrix(rows.length, p.length);
  for (let k = 0; k < p.length; k++) {
    const e = 1e-7 * Math.max(1, Math.abs(p[k]));
    const a = p.slice();
    const b = p.slice();
    a[k] += e;
    b[k] -= e;
    const ha = h(a);
    const hb = h(b);
    rows.forEach((i, q) => J.set(q, k, (ha[i] - hb[i]) / (2 * e)));
  }
  return J;
}

/** Gauss-Newton on the readings `rows`; the covariance of p and of each reading's estimate. */
function fit(y: number[], s: number[], rows: number[], p0: number[]) {
  let p = p0.slice();
  const W = Matrix.diag(rows.map((i) => 1 / s[i] ** 2));
  for (let it = 0; it < 60; it++) {
    const J = jac(p, rows);
    const hp = h(p);
    const res = Matrix.columnVector(rows.map((i) => y[i] - hp[i]));
    const d = inverse(J.transpose().mmul(W).mmul(J)).mmul(J.transpose().mmul(W).mmul(res));
    p = p.map((v, k) => v + d.get(k, 0));
  }
  const all = Array.from({ length: y.length }, (_, i) => i);
  const P = inverse(jac(p, rows).transpose().mmul(W).mmul(jac(p, rows)));
  const Ja = jac(p, all);
  const C = Ja.mmul(P).mmul(Ja.transpose());
  const hp = h(p);
  const gamma = rows.reduce((g, i) => g + ((y[i] - hp[i]) / s[i]) ** 2, 0);
  return { p, P, hp, C, gamma };
}

describe('the ammonia demo against an independent fit of the same loop', () => {
  const readings = new Map<string, RowReading>([...model.readings].map(([t, rd]) => [t, { value: rd.value, fractions: rd.fractions, reference: rd.reference }]));
  const r = preparePlant(model).run({ readings }).report;
  const ins = r.instruments;
  const flow = (t: string) => ins[t].massFlow ?? ins[t].molarFlow!;
  const frac = (t: string, k: string) => ins[t].fractions![k];
  const figures = [flow('FI-101'), flow('FI-120'), frac('AI-120', 'NH3'), frac('AI-130', 'NH3'), flow('FI-150'), flow('FI-205'),
    ...['H2', 'N2', 'Ar', 'CH4'].map((k) => frac('AI-205', k)), flow('FI-310'), ...['H2', 'N2', 'Ar', 'CH4'].map((k) => frac('AI-310', k))];
  const tags = ['FI-101', 'FI-120', 'AI-120', 'AI-130', 'FI-150', 'FI-205', 'AI-205', 'AI-205', 'AI-205', 'AI-205', 'FI-310', 'AI-310', 'AI-310', 'AI-310', 'AI-310'];
  const y = figures.map((f) => f.measured!);
  const s = figures.map((f) => f.sigma!);
  const everything = y.map((_, i) => i);
  const p0 = [30, 5, 70, 25, 2.5, 6, 3, 0.025];
  const full = fit(y, s, everything, p0);

  it('the same reconciled values, sigmas after, gamma and measurement tests', () => {
    expect(r.redundancy).toBe(7);
    expect(r.globalTest.statistic! / full.gamma).toBeCloseTo(1, 4);
    figures.forEach((f, i) => {
      expect(f.reconciled! / full.hp[i], tags[i]).toBeCloseTo(1, 5);
      expect(f.reconciledSigma! / Math.sqrt(full.C.get(i, i)), tags[i]).toBeCloseTo(1, 3);
    });
    // An instrument's test is the largest of its readings'.
    const tests = new Map<string, number>();
    everything.forEach((i) => {
      const z = Math.abs(y[i] - full.hp[i]) / Math.sqrt(s[i] ** 2 - full.C.get(i, i));
      tests.set(tags[i], Math.max(tests.get(tags[i]) ?? 0, z));
    });
    for (const [t, z] of tests) expect(ins[t].test!, t).toBeCloseTo(z, 2);
    // And each analyzer component carries its own (the text table prints it on that component's line).
    everything.forEach((i) => {
      const f = figures[i];
      if (f.test === undefined) return;
      const z = Math.abs(y[i] - full.hp[i]) / Math.sqrt(s[i] ** 2 - full.C.get(i, i));
      expect(f.test!, tags[i]).toBeCloseTo(z, 2);
    });
    expect(frac('AI-205', 'CH4').test!).toBeCloseTo(ins['AI-205'].test!, 12);
    expect(frac('AI-205', 'H2').test!).toBeLessThan(ins['AI-205'].test! / 2);
  });

  it('without the suspect FI-101: the same gamma, conversion and purge fraction with their sigmas', () => {
    expect(r.suspects.map((x) => x.tag)).toEqual(['FI-101']);
    const without = fit(y, s, everything.slice(1), full.p);
    expect(r.afterRemoving!.globalTest.statistic! / without.gamma).toBeCloseTo(1, 4);
    // Derived figures by first-order propagation: g' P g.
    const derived = (f: (p: number[]) => number) => {
      const g = without.p.map((v, k) => {
        const e = 1e-7 * Math.max(1, Math.abs(v));
        const a = without.p.slice();
        const b = without.p.slice();
        a[k] += e;
        b[k] -= e;
        return (f(a) - f(b)) / (2 * e);
      });
      const G = Matrix.rowVector(g);
      return { value: f(without.p), sigma: Math.sqrt(G.mmul(without.P).mmul(G.transpose()).get(0, 0)) };
    };
    const conversion = derived((p) => p[1] / (p[0] * Z[1] + (1 - p[7]) * p[3]));
    const purge = derived((p) => p[7]);
    const c = r.parameters['converter.reactions.0.conversion'];
    expect(c.value! / conversion.value).toBeCloseTo(1, 5);
    expect(c.sigma! / conversion.sigma).toBeCloseTo(1, 3);
    const q = r.parameters['purge-split.out.purge'];
    expect(q.value! / purge.value).toBeCloseTo(1, 5);
    expect(q.sigma! / purge.sigma).toBeCloseTo(1, 3);
  });
});
