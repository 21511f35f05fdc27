/**
 * Second-order steps (src/plant/curvature.ts): the step of sequential quadratic programming with
 * the exact Hessian of the Lagrangian (Nocedal and Wright, "Numerical Optimization", 2nd ed.,
 * Springer 2006, Sec. 18.1) against the Gauss-Newton steps (options.secondOrder: false) on the
 * ammonia demo's rows: the same reconciliation to the step tolerance, fewer iterations, and
 * steps that fall quadratically (each at most a small multiple of the square of the one before)
 * where the Gauss-Newton steps fall by a constant factor. The answers themselves are checked
 * against published examples and closed forms in linear.test.ts, flowsheet.test.ts and
 * bilinear.test.ts, which run with the second-order steps on.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { parseHistorian, frozenTags, rowInput } from '../../src/plant/historian.js';
import { preparePlant, prepareReconciliation, PLANT_RECONCILE_DEFAULTS, PreparedReconciliation } from '../../src/plant/index.js';
import type { ReconcileResult } from '../../src/plant/index.js';

const DEMO = 'flowsheets/ammonia-loop.yaml';

/** Every solve of fn's plant runs, in order. */
function solvesOf(fn: () => void): ReconcileResult[] {
  const out: ReconcileResult[] = [];
  const orig = PreparedReconciliation.prototype.solve;
  PreparedReconciliation.prototype.solve = function (this: PreparedReconciliation, s) {
    const r = orig.call(this, s);
    out.push(r);
    return r;
  };
  try {
    fn();
  } finally {
    PreparedReconciliation.prototype.solve = orig;
  }
  return out;
}

describe('second-order steps', () => {
  const { model } = loadFlowsheet(DEMO);
  const historian = parseHistorian(readFileSync('flowsheets/data/ammonia-loop-year.csv', 'utf8'), 'year.csv', model);
  const frozen = frozenTags(historian);
  const newton = preparePlant(model);
  const gauss = preparePlant(model, { reconcile: { secondOrder: false } });
  // Rows 1-24 and a day with the makeup meter reading high (serial elimination takes it out).
  const picks = [...Array.from({ length: 24 }, (_, k) => k), ...Array.from({ length: 24 }, (_, k) => 200 * 24 + k)];

  it('reach the Gauss-Newton reconciliation to the step tolerance, in fewer iterations, with quadratically falling steps', () => {
    let warmA: Float64Array | undefined;
    let warmB: Float64Array | undefined;
    let itA = 0;
    let itB = 0;
    let quadratic = 0;
    let linear = 0;
    for (const r of picks) {
      const { input } = rowInput(historian, model, r, frozen);
      let a!: ReturnType<typeof newton.run>;
      let b!: ReturnType<typeof gauss.run>;
      const sa = solvesOf(() => (a = newton.run(input, warmA)));
      const sb = solvesOf(() => (b = gauss.run(input, warmB)));
      warmA = a.x;
      warmB = b.x;
      expect(a.report.status).toBe(b.report.status);
      expect(a.report.suspects.map((s) => s.tag)).toEqual(b.report.suspects.map((s) => s.tag));
      expect(sa.length).toBe(sb.length);
      sa.forEach((ra, k) => {
        const rb = sb[k];
        expect(ra.status).toBe(rb.status);
        itA += ra.iterations;
        itB += rb.iterations;
        // The same solution: every reading's reconciled value within 1e-6 of its sigma (the plant's step tolerance).
        for (const e of ra.estimates) {
          const f = rb.estimates[e.index];
          if (e.role === 'measured') expect(Math.abs(e.value! - f.value!), e.name).toBeLessThanOrEqual(1e-6 * e.sigma!);
        }
        expect(Math.abs(ra.objective - rb.objective)).toBeLessThanOrEqual(1e-6 * Math.max(1, rb.objective));
        // Steps below 0.1 (in sigmas): the next is within 0.1 x its square (second order), or it falls
        // by at least 100x less than that (first order; the Gauss-Newton steps here fall by about 1e-2,
        // a ratio to the square of 1e-2 / step, above 0.1 for every step below 0.1). The constant of
        // the second order depends on how the balances are written: with the analyzers on the purge
        // written on the splitter's inlet the largest seen is 0.061 (9.5e-3, 5.5e-6, 2.0e-13).
        const ratio = (h: ReconcileResult['history']) => {
          for (let i = 1; i + 1 < h.length; i++) if (h[i].step < 0.1 && h[i].step > 1e-5) return h[i + 1].step / h[i].step ** 2;
          return NaN;
        };
        const qa = ratio(ra.history);
        const qb = ratio(rb.history);
        if (Number.isFinite(qa)) {
          expect(qa).toBeLessThan(0.1);
          quadratic++;
        }
        if (Number.isFinite(qb) && qb > 0.05) linear++;
      });
    }
    expect(itA).toBeLessThan(0.8 * itB);
    expect(quadratic).toBeGreaterThan(40);
    expect(linear).toBeGreaterThan(40);
  });

  it('balances that give only their Jacobian (no products) take the same steps: their products are found by differencing it', () => {
    const net = newton.network;
    const plain = { count: net.constraints.count, names: net.constraints.names, evaluate: (x: Float64Array, o: Float64Array) => net.constraints.evaluate(x, o), jacobian: (x: Float64Array, o: Float64Array) => net.constraints.jacobian(x, o) };
    const stated = prepareReconciliation({ variables: net.variables, constraints: net.constraints }, { ...PLANT_RECONCILE_DEFAULTS, structured: false });
    const found = prepareReconciliation({ variables: net.variables, constraints: plain }, PLANT_RECONCILE_DEFAULTS);
    const none = prepareReconciliation({ variables: net.variables, constraints: plain }, { ...PLANT_RECONCILE_DEFAULTS, secondOrder: false });
    const values = Float64Array.from(net.variables, (v) => (v.measured ? v.measured.value * 1.01 : NaN));
    const sigmas = Float64Array.from(net.variables, (v) => (v.measured ? Math.max(1e-6, 0.01 * Math.abs(v.measured.value)) : NaN));
    const a = stated.solve({ values, sigmas });
    const b = found.solve({ values, sigmas });
    const c = none.solve({ values, sigmas });
    expect(b.iterations).toBe(a.iterations);
    a.history.forEach((h, k) => expect(Math.abs(b.history[k].step - h.step)).toBeLessThanOrEqual(1e-9 * Math.max(h.step, 1e-6)));
    expect(c.iterations).toBeGreaterThan(a.iterations);
  });

  it('balances whose Jacobian is not affine in x take Gauss-Newton steps', () => {
    // x0 + x1 = 2 and x0^3 = x2: the cubic's Jacobian changes with x0 in a way no product gives.
    const cubic = {
      count: 2,
      names: ['sum', 'cube'],
      evaluate: (x: Float64Array, o: Float64Array) => {
        o[0] = x[0] + x[1] - 2;
        o[1] = x[0] ** 3 - x[2];
      },
      jacobian: (x: Float64Array, o: Float64Array) => {
        o[0] = 1;
        o[1] = 1;
        o[3] = 3 * x[0] ** 2;
        o[5] = -1;
      },
    };
    const variables = [
      { name: 'x0', start: 1, measured: { value: 1.1, sigma: 0.05 } },
      { name: 'x1', start: 1, measured: { value: 0.95, sigma: 0.05 } },
      { name: 'x2', start: 1, measured: { value: 1.2, sigma: 0.05 } },
    ];
    const on = prepareReconciliation({ variables, constraints: cubic }).solve();
    const off = prepareReconciliation({ variables, constraints: cubic }, { secondOrder: false }).solve();
    expect(on.status).toBe('reconciled');
    expect(on.iterations).toBe(off.iterations);
    on.x.forEach((v, j) => expect(v).toBe(off.x[j]));
  });
});
