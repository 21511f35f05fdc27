import { describe, expect, it } from 'vitest';
import { columnGroups, solveRoot } from '../../src/solve/index.js';
import type { RootProblem } from '../../src/solve/types.js';

const tol = (n: number, v = 1e-12) => new Float64Array(n).fill(v);

describe('solveRoot on standard nonlinear test problems', () => {
  // Moré, Garbow and Hillstrom, "Testing unconstrained optimization software", ACM Trans.
  // Math. Softw. 7(1) (1981) 17-41, problem 1 (Rosenbrock): f1 = 10 (x2 - x1^2), f2 = 1 - x1,
  // start (-1.2, 1), root (1, 1).
  it('Rosenbrock function (Moré, Garbow, Hillstrom 1981, problem 1): root (1, 1)', () => {
    const r = solveRoot({
      n: 2,
      x0: new Float64Array([-1.2, 1]),
      tol: tol(2),
      f: (x, out) => {
        out[0] = 10 * (x[1] - x[0] * x[0]);
        out[1] = 1 - x[0];
      },
    });
    expect(r.status).toBe('converged');
    expect(r.x[0]).toBeCloseTo(1, 10);
    expect(r.x[1]).toBeCloseTo(1, 10);
    // The full first step overshoots to x2 = -3.84 and is cut back by the line search.
    expect(r.iterations).toBeLessThanOrEqual(20);
    expect(r.history[0].scaled).toBeGreaterThan(1);
    expect(r.scaledResidual).toBeLessThanOrEqual(1);
  });

  // Same source, problem 3 (Powell badly scaled): f1 = 1e4 x1 x2 - 1,
  // f2 = exp(-x1) + exp(-x2) - 1.0001, start (0, 1), root near (1.098e-5, 9.106) (from memory).
  it('Powell badly scaled function (Moré, Garbow, Hillstrom 1981, problem 3)', () => {
    const r = solveRoot(
      {
        n: 2,
        x0: new Float64Array([0, 1]),
        tol: tol(2, 1e-13),
        f: (x, out) => {
          out[0] = 1e4 * x[0] * x[1] - 1;
          out[1] = Math.exp(-x[0]) + Math.exp(-x[1]) - 1.0001;
        },
      },
      { maxPasses: 2000 },
    );
    expect(r.status).toBe('converged');
    expect(Math.abs(1e4 * r.x[0] * r.x[1] - 1)).toBeLessThan(1e-12);
    expect(r.x[0]).toBeCloseTo(1.098e-5, 8);
    expect(r.x[1]).toBeCloseTo(9.106, 3);
  });

  // Water-gas shift CO + H2O = CO2 + H2 from 1 mol CO and 1 mol H2O, unknowns (n_CO, n_CO2).
  // Carbon balance n_CO + n_CO2 = 1; law of mass action with n_H2 = n_CO2, n_H2O = 1 - n_CO2
  // (equimolar reaction, pressure cancels): n_CO2^2 = K n_CO (1 - n_CO2). Closed form derived
  // here: n_CO2 = sqrt(K) / (1 + sqrt(K)); K = 4 gives 2/3. K is a test parameter, not a
  // property value.
  it('two-variable reaction equilibrium with a closed-form answer, from a start near the bound', () => {
    const K = 4;
    const seen = { min: Infinity };
    const r = solveRoot({
      n: 2,
      x0: new Float64Array([0.999, 0.001]),
      lower: new Float64Array(2),
      upper: new Float64Array([1, 1]),
      tol: tol(2),
      names: ['n_CO', 'n_CO2'],
      f: (x, out) => {
        seen.min = Math.min(seen.min, x[0], x[1]);
        out[0] = x[0] + x[1] - 1;
        out[1] = x[1] * x[1] - K * x[0] * (1 - x[1]);
      },
    });
    expect(r.status).toBe('converged');
    expect(r.x[1]).toBeCloseTo(2 / 3, 11);
    expect(r.x[0]).toBeCloseTo(1 / 3, 11);
    expect(seen.min).toBeGreaterThanOrEqual(0);
  });
});

describe('solveRoot keeps bounds and reports trouble as results', () => {
  it('projects a step that would go negative (sqrt is undefined there)', () => {
    // f(x) = sqrt(x) - 0.1, root 0.01; the first Newton step from 4 lands at -3.6.
    const seen = { min: Infinity };
    const r = solveRoot({
      n: 1,
      x0: new Float64Array([4]),
      lower: new Float64Array(1),
      tol: tol(1),
      f: (x, out) => {
        seen.min = Math.min(seen.min, x[0]);
        out[0] = Math.sqrt(x[0]) - 0.1;
      },
    });
    expect(r.status).toBe('converged');
    expect(r.x[0]).toBeCloseTo(0.01, 10);
    expect(seen.min).toBeGreaterThanOrEqual(0);
  });

  it('without the bound the same step gives NaN, which the line search backs away from', () => {
    const r = solveRoot({
      n: 1,
      x0: new Float64Array([4]),
      tol: tol(1),
      f: (x, out) => {
        out[0] = Math.sqrt(x[0]) - 0.1;
      },
    });
    expect(r.status).toBe('converged');
    expect(r.x[0]).toBeCloseTo(0.01, 10);
  });

  it('a singular Jacobian gives not-converged with a message naming the idle variable', () => {
    let r: ReturnType<typeof solveRoot> | undefined;
    expect(() => {
      r = solveRoot({
        n: 2,
        x0: new Float64Array([3, 3]),
        tol: tol(2),
        names: ['a', 'b'],
        f: (x, out) => {
          out[0] = x[0] * x[0] - 1;
          out[1] = x[0] - 1;
        },
      });
    }).not.toThrow();
    expect(r?.status).toBe('not-converged');
    expect(r?.message).toMatch(/singular/);
    expect(r?.message).toMatch(/\bb\b/);
    expect(r?.worst?.length).toBe(2);
  });

  it('dependent equations give a singular Jacobian, not an exception', () => {
    const r = solveRoot({
      n: 2,
      x0: new Float64Array([0, 0]),
      tol: tol(2),
      f: (x, out) => {
        out[0] = x[0] + 2 * x[1] - 1;
        out[1] = 2 * x[0] + 4 * x[1] - 2;
      },
    });
    expect(r.status).toBe('not-converged');
    expect(r.message).toMatch(/singular/);
  });

  it('passes an infeasible evaluation through', () => {
    let calls = 0;
    const r = solveRoot({
      n: 1,
      x0: new Float64Array([2]),
      tol: tol(1),
      f: (x, out) => {
        if (++calls === 4) return { kind: 'infeasible', message: 'no liquid at this temperature' };
        out[0] = x[0] * x[0] - 2;
      },
    });
    expect(r.status).toBe('infeasible');
    expect(r.failure?.message).toMatch(/liquid/);
    expect(r.passes).toBe(4);
  });

  it('rejects a non-positive tolerance as invalid input', () => {
    const r = solveRoot({ n: 1, x0: new Float64Array([1]), tol: new Float64Array([0]), f: () => {} });
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/tol/);
  });
});

describe('Jacobian structure (Curtis, Powell and Reid 1974 column grouping)', () => {
  // f_i = x_i^2 - (i + 1), i = 0..5, decoupled: one evaluation fills the whole Jacobian.
  const problem = (structured: boolean): RootProblem => ({
    n: 6,
    x0: new Float64Array(6).fill(1),
    tol: tol(6),
    ...(structured ? { structure: { rows: [[0], [1], [2], [3], [4], [5]] } } : {}),
    f: (x, out) => {
      for (let i = 0; i < 6; i++) out[i] = x[i] * x[i] - (i + 1);
    },
  });

  it('groups structurally independent columns', () => {
    expect(columnGroups(6, [[0], [1], [2], [3], [4], [5]])).toEqual([[0, 1, 2, 3, 4, 5]]);
    expect(columnGroups(3, [[0, 1], [1, 2], [2]])).toEqual([[0, 2], [1]]);
    expect(columnGroups(2)).toEqual([[0], [1]]);
  });

  it('reaches the same root with fewer passes', () => {
    const dense = solveRoot(problem(false));
    const sparse = solveRoot(problem(true));
    expect(dense.status).toBe('converged');
    expect(sparse.status).toBe('converged');
    for (let i = 0; i < 6; i++) expect(sparse.x[i]).toBeCloseTo(Math.sqrt(i + 1), 11);
    expect(sparse.jacobians).toBe(dense.jacobians);
    expect(sparse.passes).toBe(dense.passes - 5 * dense.jacobians);
  });

  it('rejects groups whose columns share a row', () => {
    const r = solveRoot({ ...problem(true), structure: { rows: [[0, 1], [1], [2], [3], [4], [5]], groups: [[0, 1], [2, 3, 4, 5]] } });
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/share row 1/);
  });
});
