import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { createRuntime } from '../../src/flowsheet/runtime.js';
import { tearStructure } from '../../src/flowsheet/jacobian-structure.js';
import { solveNewtonFixedPoint } from '../../src/solve/newton.js';
import type { FixedPointProblem } from '../../src/solve/types.js';

// Invented flowsheets (structure only; no published values are checked here).
const COMPONENTS = `
components:
  A: { Tc: 190.6 K, Pc: 46 bar, omega: 0.011, formula: C2H4 }
  B: { Tc: 305 K, Pc: 49 bar, omega: 0.1, formula: C4H8 }
`;

/** One recycle loop named by suffix k, fed by `feed`, sending its product to `product-k`. */
function loop(k: string, feed: string): string {
  return `
  mix-${k}: { type: mixer, in: [${feed}, rec-${k}], out: rin-${k}, T: 300 K }
  rx-${k}:
    type: reactor
    in: rin-${k}
    out: rout-${k}
    reactions: [ { equation: "2 A -> B", key: A, conversion: 0.3 } ]
  sep-${k}:
    type: separator
    in: rout-${k}
    out: { product-${k}: { B: 1 }, gas-${k}: rest }
  split-${k}: { type: splitter, in: gas-${k}, out: { purge-${k}: 0.1, rec-${k}: rest } }`;
}

function runtimeOf(text: string) {
  return createRuntime(validateText('s.yaml', text).model);
}

describe('tear Jacobian structure from the graph', () => {
  it('two loops in series: the downstream tear does not reach the upstream one', () => {
    const rt = runtimeOf(`${COMPONENTS}
feeds:
  fresh: { flows: { A: 10 mol/s }, T: 300 K, P: 20 bar }
units:${loop('a', 'fresh')}${loop('b', 'purge-a')}
tears: [rec-a, rec-b]
`);
    expect(rt.plan.tears).toEqual(['rec-a', 'rec-b']);
    const s = tearStructure(rt)!;
    const m = rt.perTear;
    expect(s.rows.length).toBe(2 * m);
    // rec-a reaches rec-a and (through purge-a) rec-b; rec-b reaches only itself.
    expect(s.rows[0]).toEqual(Array.from({ length: 2 * m }, (_, i) => i));
    expect(s.rows[m]).toEqual(Array.from({ length: m }, (_, i) => m + i));
  });

  it('one loop: dense, no structure', () => {
    const rt = runtimeOf(`${COMPONENTS}
feeds:
  fresh: { flows: { A: 10 mol/s }, T: 300 K, P: 20 bar }
units:${loop('a', 'fresh')}
`);
    expect(tearStructure(rt)).toBeUndefined();
  });

  it('two independent loops: Newton with the structure needs half the Jacobian passes and agrees', () => {
    const rt = runtimeOf(`${COMPONENTS}
feeds:
  f1: { flows: { A: 10 mol/s }, T: 300 K, P: 20 bar }
  f2: { flows: { A: 4 mol/s, B: 1 mol/s }, T: 300 K, P: 20 bar }
units:${loop('a', 'f1')}${loop('b', 'f2')}
tears: [rec-a, rec-b]
`);
    const s = tearStructure(rt)!;
    const { n, perTear: m } = rt;
    const N = 2 * m;
    const x0 = new Float64Array(N);
    for (let t = 0; t < 2; t++) {
      x0[t * m + n] = 300;
      x0[t * m + n + 1] = 20e5;
    }
    const problem: FixedPointProblem = {
      n: N,
      x0,
      lower: new Float64Array(N),
      g(x, out) {
        rt.tearStreams.forEach((st: { flows: Float64Array; T: number; P: number }, t: number) => {
          for (let i = 0; i < n; i++) st.flows[i] = x[t * m + i];
          st.T = x[t * m + n];
          st.P = x[t * m + n + 1];
        });
        rt.pass();
        rt.tearOutputs.forEach((st: { flows: Float64Array; T: number; P: number }, t: number) => {
          for (let i = 0; i < n; i++) out[t * m + i] = st.flows[i];
          out[t * m + n] = st.T;
          out[t * m + n + 1] = st.P;
        });
      },
    };
    const dense = solveNewtonFixedPoint(problem);
    const sparse = solveNewtonFixedPoint({ ...problem, structure: s });
    expect(dense.status).toBe('converged');
    expect(sparse.status).toBe('converged');
    // Columns of the two loops share no row: one pass perturbs a column of each, so each
    // Jacobian takes m passes instead of N = 2m; the iterations are the same.
    expect(sparse.jacobians).toBe(dense.jacobians);
    expect(sparse.iterations).toBe(dense.iterations);
    expect(dense.passes - sparse.passes).toBe(dense.jacobians * (N - m));
    for (let j = 0; j < N; j++) expect(Math.abs(sparse.x[j] - dense.x[j])).toBeLessThanOrEqual(1e-8 * Math.max(1, Math.abs(dense.x[j])));
  });
});
