import { describe, expect, it } from 'vitest';
import { prepareReconciliation } from '../../src/plant/index.js';
import { problem, steadyState } from '../../bench/reconcile-problem.js';

// The 36-variable methanol loop of the benchmark (an invented scenario, seeded noise): makeup
// water and methanol are zero, so their analyzer readings scatter around zero and bounds are
// held, often several that pin each other through a balance (makeup, reactor-inlet and loop-gas
// water around the mixer). The solution of a snapshot must not depend on where the solve starts.

describe('bounds held together through a balance (methanol loop, 80 seeded snapshots)', () => {
  it('a cold start and a start from the previous snapshot reach the same reconciliation', () => {
    const state = steadyState();
    const prep = prepareReconciliation(problem(state, 7));
    let previous: Float64Array | undefined;
    let severalHeld = 0;
    for (let row = 0; row < 80; row++) {
      const q = problem(state, 1000 + row);
      const values = Float64Array.from(q.variables, (v) => (v.measured ? v.measured.value : NaN));
      const cold = prep.solve({ values });
      const warm = prep.solve({ values, start: previous });
      previous = warm.x;
      expect(cold.status, `row ${row}`).toBe('reconciled');
      expect(warm.status, `row ${row}`).toBe('reconciled');
      expect(Math.abs(cold.objective - warm.objective)).toBeLessThan(1e-8 * Math.max(1, warm.objective));
      for (let j = 0; j < cold.x.length; j++) {
        if (Number.isNaN(warm.x[j])) continue;
        expect(Math.abs(cold.x[j] - warm.x[j]), `row ${row}, ${prep.names[j]}`).toBeLessThan(1e-7 * Math.max(1e-3, Math.abs(warm.x[j])));
      }
      if (cold.history.some((h) => h.activeBounds >= 2)) severalHeld++;
    }
    expect(severalHeld).toBeGreaterThan(10);
  });
});
