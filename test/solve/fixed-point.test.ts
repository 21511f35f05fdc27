import { AUTO_PROBE_PASSES } from '../../src/solve/index.js';
import { describe, expect, it } from 'vitest';
import { solveDirect, solveFixedPoint, solveNewtonFixedPoint, solveWegstein } from '../../src/solve/index.js';
import type { FixedPointProblem, MethodName, SolveOptions } from '../../src/solve/types.js';
import { methanolDesign, methanolLoop, methanolSpec, purgeLoop, purgeLoopSolution } from './loops.js';

const METHODS: MethodName[] = ['direct', 'wegstein', 'newton', 'auto'];
const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('recycle loop with purge, closed form (Felder and Rousseau, 3rd ed., Sec. 4.7 balances; closed form derived in loops.ts)', () => {
  // Fresh feed 100 mol/s A and 1 mol/s inert.
  const FA = 100;
  const FI = 1;

  it.each(METHODS)('%s reaches the closed form for X = 0.5, p = 0.1', (method) => {
    const exact = purgeLoopSolution(FA, FI, 0.5, 0.1);
    const r = solveFixedPoint(purgeLoop(FA, FI, 0.5, 0.1), method);
    expect(r.status).toBe('converged');
    expect(r.scaledResidual).toBeLessThanOrEqual(1);
    expect(relErr(r.x[0], exact[0])).toBeLessThan(1e-8);
    expect(relErr(r.x[1], exact[1])).toBeLessThan(1e-8);
  });

  // High recycle ratio: 89.1 % of A and 99 % of the inert come back each pass.
  // rtol 1e-12 so that the stopping test itself guarantees 1e-8 on the slowest variable
  // (error <= rtol |x| / (1 - slope) = 1e-12 / 0.01).
  const tight: SolveOptions = { rtol: 1e-12, maxPasses: 5000, wegstein: { maxPasses: 2000 } };
  const exactHigh = purgeLoopSolution(FA, FI, 0.1, 0.01);

  it('direct, Wegstein and Newton all reach the closed form for X = 0.1, p = 0.01', () => {
    const passes: Record<string, number> = {};
    for (const method of ['direct', 'wegstein', 'newton'] as const) {
      const r = solveFixedPoint(purgeLoop(FA, FI, 0.1, 0.01), method, tight);
      expect(r.status, method).toBe('converged');
      expect(relErr(r.x[0], exactHigh[0]), method).toBeLessThan(1e-8);
      expect(relErr(r.x[1], exactHigh[1]), method).toBeLessThan(1e-8);
      passes[method] = r.passes;
    }
    // Direct substitution shrinks the inert error by 0.99 a pass; bounded Wegstein (q = -5)
    // by |-5 + 6 * 0.99| = 0.94 (wegstein.ts header): several times fewer passes.
    expect(passes.wegstein * 4).toBeLessThan(passes.direct);
    expect(passes.newton).toBeLessThanOrEqual(6);
  });

  it('unbounded Wegstein is exact in one accelerated step for this decoupled linear loop', () => {
    const r = solveWegstein(purgeLoop(FA, FI, 0.1, 0.01), { wegstein: { qMin: -1000 } });
    expect(r.status).toBe('converged');
    // 2 direct passes, one accelerated step onto the fixed point, one pass to confirm.
    expect(r.passes).toBeLessThanOrEqual(5);
    expect(relErr(r.x[1], exactHigh[1])).toBeLessThan(1e-10);
  });

  it('Newton converges the linear loop in at most 2 iterations with one Jacobian', () => {
    const r = solveNewtonFixedPoint(purgeLoop(FA, FI, 0.1, 0.01));
    expect(r.status).toBe('converged');
    expect(r.iterations).toBeLessThanOrEqual(2);
    expect(r.jacobians).toBe(1);
    // start pass + 2 Jacobian columns + one pass per step
    expect(r.passes).toBe(1 + 2 + r.iterations);
  });

  it("'auto' hands over to Newton as soon as Wegstein's observed rate says it would not finish in its budget", () => {
    const r = solveFixedPoint(purgeLoop(FA, FI, 0.1, 0.01), 'auto');
    const w = solveWegstein(purgeLoop(FA, FI, 0.1, 0.01));
    expect(w.status).toBe('not-converged');
    expect(w.passes).toBe(200);
    expect(r.status).toBe('converged');
    expect(r.method).toBe('wegstein+newton');
    // The probe (AUTO_PROBE_PASSES Wegstein passes), then Newton: far fewer than Wegstein's 200.
    expect(r.passes).toBeGreaterThan(AUTO_PROBE_PASSES);
    expect(r.passes).toBeLessThan(AUTO_PROBE_PASSES + 15);
    expect(relErr(r.x[1], exactHigh[1])).toBeLessThan(1e-8);
    // One history, passes counted across both methods.
    expect(r.history.at(-1)?.method).toBe('newton');
    expect(r.history.at(-1)?.pass).toBe(r.passes);
    for (let k = 1; k < r.history.length; k++) expect(r.history[k].pass).toBeGreaterThan(r.history[k - 1].pass);
  });

  it('Jacobian structure lets decoupled columns share one evaluation', () => {
    const dense = solveNewtonFixedPoint(purgeLoop(FA, FI, 0.1, 0.01));
    const sparse = solveNewtonFixedPoint({ ...purgeLoop(FA, FI, 0.1, 0.01), structure: { rows: [[0], [1]] } });
    expect(sparse.status).toBe('converged');
    expect(sparse.passes).toBe(dense.passes - 1);
    expect(relErr(sparse.x[0], exactHigh[0])).toBeLessThan(1e-8);
  });
});

describe('methanol synthesis loop with purge (the statement of Felder and Rousseau, 3rd ed., Example 4.7-2, from memory)', () => {
  const design = methanolDesign();
  it('the fresh feed derived from the balances holds 0.400 mol percent inert and adds up', () => {
    const [c, h, i] = design.fresh;
    expect(relErr(c + h + i, design.F)).toBeLessThan(1e-12);
    expect(relErr(i / design.F, 0.004)).toBeLessThan(1e-12);
  });
  it.each(METHODS)('%s meets the statement: 155 kmol/h methanol, reactor feed 28.0 / 70.0 / 2.00 mol percent CO2 / H2 / inert', (method) => {
    const { problem, last } = methanolLoop(design.fresh, design.p, methanolSpec.conversionH2);
    const r = solveFixedPoint(problem, method);
    expect(r.status).toBe('converged');
    // Evaluate once more at the solution so `last` describes x itself.
    problem.g(r.x, new Float64Array(3));
    const feed = last.reactorFeed;
    const total = feed[0] + feed[1] + feed[2];
    expect(relErr(last.methanol * 3.6, methanolSpec.methanolKmolPerH)).toBeLessThan(1e-8);
    methanolSpec.reactorFeed.forEach((z, k) => expect(relErr(feed[k] / total, z)).toBeLessThan(1e-8));
    expect(relErr(total, design.R)).toBeLessThan(1e-8);
  });
});

describe('bounded Wegstein factor', () => {
  // g(x) = a x + b with a = 0.99: unbounded q = a/(a-1) = -99. With q held at qMin the error
  // shrinks by |qMin + (1 - qMin) a| each accelerated pass (wegstein.ts header).
  const linear = (a: number, b: number): FixedPointProblem => ({
    n: 1,
    x0: new Float64Array([0]),
    g: (x, out) => {
      out[0] = a * x[0] + b;
    },
  });

  it.each([
    [-5, 0.94],
    [-2, 0.97],
  ])('qMin = %d gives a contraction of %d per pass', (qMin, ratio) => {
    const r = solveWegstein(linear(0.99, 1), { wegstein: { qMin, maxPasses: 40 } });
    // history[k].residual = (1 - a) |x_k - x*|; passes 3.. are accelerated steps.
    for (let k = 4; k < 30; k++) {
      expect(r.history[k].residual / r.history[k - 1].residual).toBeCloseTo(ratio, 9);
    }
  });

  it('qMin = qMax = 0 is direct substitution', () => {
    const w = solveWegstein(linear(0.9, 1), { wegstein: { qMin: 0, qMax: 0 } });
    const d = solveDirect(linear(0.9, 1));
    expect(w.status).toBe('converged');
    expect(w.passes).toBe(d.passes);
    expect(w.x[0]).toBe(d.x[0]);
  });

  it('rejects qMin > qMax as invalid input', () => {
    const r = solveWegstein(linear(0.5, 1), { wegstein: { qMin: 1, qMax: -1 } });
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/qMin/);
  });
});

describe('failures are results, not exceptions', () => {
  const diverging: FixedPointProblem = {
    n: 1,
    x0: new Float64Array([0]),
    names: ['loop.x'],
    g: (x, out) => {
      out[0] = 2 * x[0] + 1;
    },
  };

  it('direct substitution on g(x) = 2x + 1 gives not-converged with a finite last iterate', () => {
    const r = solveDirect(diverging, { maxPasses: 100 });
    expect(r.status).toBe('not-converged');
    expect(r.passes).toBe(100);
    expect(Number.isFinite(r.x[0])).toBe(true);
    expect(r.worst?.[0].name).toBe('loop.x');
    expect(r.worst?.[0].scaled).toBeGreaterThan(1);
    expect(r.history).toHaveLength(100);
  });

  it('direct substitution that overflows reports the non-finite value, never as converged', () => {
    const r = solveDirect(diverging);
    expect(r.status).toBe('not-converged');
    expect(r.message).toMatch(/loop\.x/);
    expect(Number.isFinite(r.x[0])).toBe(true);
  });

  it('Newton solves the same linear map (x = -1) in one or two steps', () => {
    const r = solveNewtonFixedPoint(diverging);
    expect(r.status).toBe('converged');
    expect(r.x[0]).toBeCloseTo(-1, 10);
    expect(r.iterations).toBeLessThanOrEqual(2);
  });

  const failingAt = (pass: number, kind: 'infeasible' | 'invalid'): FixedPointProblem => {
    let calls = 0;
    return {
      ...purgeLoop(100, 1, 0.1, 0.01),
      g(x, out) {
        calls++;
        if (calls === pass) return { kind, message: 'conversion exceeds the reactant available', unit: 'reactor', component: 'A' };
        out[0] = 0.891 * (100 + x[0]);
        out[1] = 0.99 * (1 + x[1]);
      },
    };
  };

  it.each(METHODS)('%s passes an infeasible evaluation through', (method) => {
    const r = solveFixedPoint(failingAt(3, 'infeasible'), method);
    expect(r.status).toBe('infeasible');
    expect(r.failure?.unit).toBe('reactor');
    expect(r.passes).toBe(3);
  });

  it.each(METHODS)('%s passes an invalid evaluation through', (method) => {
    const r = solveFixedPoint(failingAt(1, 'invalid'), method);
    expect(r.status).toBe('invalid');
    expect(r.failure?.message).toMatch(/conversion/);
  });

  it.each(METHODS)('%s reports NaN from g naming the variable and keeps x finite', (method) => {
    let calls = 0;
    const problem: FixedPointProblem = {
      ...purgeLoop(100, 1, 0.1, 0.01),
      g(x, out) {
        calls++;
        out[0] = 0.891 * (100 + x[0]);
        out[1] = calls >= 2 ? NaN : 0.99 * (1 + x[1]);
      },
    };
    const r = solveFixedPoint(problem, method);
    expect(r.status).toBe('not-converged');
    expect(r.message).toMatch(/recycle\.I/);
    expect(Array.from(r.x).every(Number.isFinite)).toBe(true);
    // Direct and Wegstein meet the NaN at an iterate; Newton meets it while perturbing for the
    // Jacobian, where the residual at x itself is still finite.
    if (method === 'newton') expect(r.message).toMatch(/perturbed/);
    else expect(r.worst?.[0].name).toBe('recycle.I');
  });

  it.each(METHODS)('%s rejects a non-finite start value as invalid input', (method) => {
    const r = solveFixedPoint({ ...purgeLoop(100, 1, 0.5, 0.1), x0: new Float64Array([NaN, 0]) }, method);
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/recycle\.A/);
    expect(r.passes).toBe(0);
  });

  it('rejects a start vector of the wrong length', () => {
    const r = solveFixedPoint({ ...purgeLoop(100, 1, 0.5, 0.1), x0: new Float64Array(3) }, 'direct');
    expect(r.status).toBe('invalid');
  });
});

describe('lower bounds are kept (flows never negative)', () => {
  // Fixed point at the bound: g(x) = max(0, 0.8 x - 0.05); the secant extrapolation of
  // Wegstein (q = -4) and the Newton step both aim at -0.25.
  const atBound = (seen: { min: number }): FixedPointProblem => ({
    n: 1,
    x0: new Float64Array([1]),
    lower: new Float64Array([0]),
    g: (x, out) => {
      seen.min = Math.min(seen.min, x[0]);
      out[0] = Math.max(0, 0.8 * x[0] - 0.05);
    },
  });

  it.each(METHODS)('%s converges onto the bound without evaluating below it', (method) => {
    const seen = { min: Infinity };
    const r = solveFixedPoint(atBound(seen), method);
    expect(r.status).toBe('converged');
    expect(r.x[0]).toBe(0);
    expect(seen.min).toBeGreaterThanOrEqual(0);
  });

  // No feasible fixed point: g(x) = 0.8 x - 0.05 crosses x only at -0.25.
  it.each(METHODS)('%s reports not-converged when the only fixed point is below the bound', (method) => {
    const seen = { min: Infinity };
    const r = solveFixedPoint(
      {
        n: 1,
        x0: new Float64Array([1]),
        lower: new Float64Array([0]),
        g: (x, out) => {
          seen.min = Math.min(seen.min, x[0]);
          out[0] = 0.8 * x[0] - 0.05;
        },
      },
      method,
      { maxPasses: 300 },
    );
    expect(r.status).toBe('not-converged');
    expect(r.x[0]).toBeGreaterThanOrEqual(0);
    expect(seen.min).toBeGreaterThanOrEqual(0);
  });
});

describe('history and budgets', () => {
  it('direct records one history entry per pass, ending at the reported residual', () => {
    const r = solveDirect(purgeLoop(100, 1, 0.5, 0.1));
    expect(r.history).toHaveLength(r.passes);
    expect(r.history.at(-1)?.scaled).toBe(r.scaledResidual);
    expect(r.history.at(-1)?.pass).toBe(r.passes);
    expect(r.history[0].method).toBe('direct');
  });

  it('Wegstein marks its first passes as direct steps and then accelerates', () => {
    const r = solveWegstein(purgeLoop(100, 1, 0.5, 0.1));
    expect(r.history.map((h) => h.method).slice(0, 3)).toEqual(['direct', 'direct', 'wegstein']);
  });

  it('never spends more passes than the budget', () => {
    for (const method of ['direct', 'wegstein', 'newton'] as const) {
      const r = solveFixedPoint(purgeLoop(100, 1, 0.1, 0.01), method, { maxPasses: 3, wegstein: { maxPasses: 3 } });
      expect(r.status, method).toBe('not-converged');
      expect(r.passes, method).toBeLessThanOrEqual(3);
      expect(r.worst?.length, method).toBe(2);
    }
  });
});
