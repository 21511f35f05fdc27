import { describe, expect, it } from 'vitest';
import { solveAnderson, solveDirect, solveFixedPoint, solveWegstein } from '../../src/solve/index.js';
import type { FixedPointProblem } from '../../src/solve/types.js';
import { purgeLoop, purgeLoopSolution } from './loops.js';

const relErr = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/**
 * A train of K loops in series closed by an outer loop, linear:
 *   x_k' = a x_k + c x_{k-1} + b_k,   x_0' = a x_0 + d x_{K-1} + b_0
 * (each loop returns a fraction a of its own stream, takes c of the one before, and the end of
 * the train returns d to its start). The fixed point solves (I - A) x = b, found here by
 * Gaussian elimination. Per-variable Wegstein sees only the diagonal; the coupling is what a
 * multisecant method picks up.
 */
function train(K: number, a: number, c: number, d: number): { problem: FixedPointProblem; exact: Float64Array } {
  const b = Float64Array.from({ length: K }, (_, k) => 1 + (k % 3));
  const M = Array.from({ length: K }, (_, i) => Array.from({ length: K + 1 }, (_, j) => (j === K ? b[i] : (i === j ? 1 - a : 0))));
  for (let k = 1; k < K; k++) M[k][k - 1] = -c;
  M[0][K - 1] -= d;
  for (let p = 0; p < K; p++) {
    for (let i = p + 1; i < K; i++) {
      const f = M[i][p] / M[p][p];
      for (let j = p; j <= K; j++) M[i][j] -= f * M[p][j];
    }
  }
  const exact = new Float64Array(K);
  for (let i = K - 1; i >= 0; i--) {
    let s = M[i][K];
    for (let j = i + 1; j < K; j++) s -= M[i][j] * exact[j];
    exact[i] = s / M[i][i];
  }
  return {
    exact,
    problem: {
      n: K,
      x0: new Float64Array(K),
      lower: new Float64Array(K),
      g(x, out) {
        for (let k = 0; k < K; k++) out[k] = a * x[k] + (k > 0 ? c * x[k - 1] : d * x[K - 1]) + b[k];
      },
    },
  };
}

describe('Anderson acceleration (Walker and Ni, SIAM J. Numer. Anal. 49 (2011) 1715)', () => {
  it('reaches the closed form of the purge loop with a high recycle ratio (Felder and Rousseau, 3rd ed., Sec. 4.7; closed form in loops.ts)', () => {
    const exact = purgeLoopSolution(100, 1, 0.1, 0.01);
    const r = solveAnderson(purgeLoop(100, 1, 0.1, 0.01), { rtol: 1e-12 });
    expect(r.status).toBe('converged');
    expect(r.method).toBe('anderson');
    expect(relErr(r.x[0], exact[0])).toBeLessThan(1e-8);
    expect(relErr(r.x[1], exact[1])).toBeLessThan(1e-8);
    // A linear map of two variables: two secants span it, so a few passes suffice, where
    // direct substitution shrinks the inert's error by only 0.99 a pass.
    expect(r.passes).toBeLessThanOrEqual(8);
    const d = solveDirect(purgeLoop(100, 1, 0.1, 0.01), { rtol: 1e-12, maxPasses: 5000 });
    expect(d.passes).toBeGreaterThan(20 * r.passes);
  });

  it('converges a coupled linear train in about as many passes as it has variables, or fewer, where Wegstein needs many more', () => {
    const K = 30;
    const { problem, exact } = train(K, 0.5, 0.45, 0.4);
    const r = solveAnderson(problem, { rtol: 1e-12 });
    expect(r.status).toBe('converged');
    for (let k = 0; k < K; k++) expect(relErr(r.x[k], exact[k])).toBeLessThan(1e-8);
    // For a linear map, Anderson with enough memory produces the GMRES iterates (Walker and Ni
    // 2011, Sec. 2), which reach the solution in at most n steps in exact arithmetic.
    expect(r.passes).toBeLessThanOrEqual(K + 3);
    const w = solveWegstein(train(K, 0.5, 0.45, 0.4).problem, { rtol: 1e-12, wegstein: { maxPasses: 2000 } });
    expect(w.status).toBe('converged');
    expect(w.passes).toBeGreaterThan(2 * r.passes);
  });

  it('keeps every iterate within the bounds (flows never negative)', () => {
    // A map whose extrapolation would overshoot below zero: x' = 0.99 x - 5 + 6 e^{-x}.
    let lowest = Infinity;
    const p: FixedPointProblem = {
      n: 2,
      x0: Float64Array.from([50, 40]),
      lower: new Float64Array(2),
      g(x, out) {
        lowest = Math.min(lowest, x[0], x[1]);
        out[0] = Math.max(0, 0.99 * x[0] - 5 + 6 * Math.exp(-x[0]));
        out[1] = 0.5 * x[1] + 0.1 * x[0];
      },
    };
    const r = solveAnderson(p, { rtol: 1e-10 });
    expect(lowest).toBeGreaterThanOrEqual(0);
    expect(r.status).toBe('converged');
    // Fixed point of the first equation: 0.01 x + 5 = 6 e^{-x}, near x = 0.1815 (checked by the residual).
    expect(Math.abs(0.01 * r.x[0] + 5 - 6 * Math.exp(-r.x[0]))).toBeLessThan(1e-8);
  });

  it('stops on an evaluation failure with its status and message', () => {
    let calls = 0;
    const p: FixedPointProblem = {
      n: 1,
      x0: Float64Array.from([1]),
      g(x, out) {
        calls++;
        if (calls === 3) return { kind: 'infeasible', message: 'reactor runs short' };
        out[0] = 0.5 * x[0] + 1;
      },
    };
    const r = solveAnderson(p);
    expect(r.status).toBe('infeasible');
    expect(r.message).toBe('reactor runs short');
    expect(r.passes).toBe(3);
  });

  it('is reachable by name through solveFixedPoint and reports not-converged within its budget', () => {
    const { problem } = train(20, 0.5, 0.45, 0.4);
    const r = solveFixedPoint(problem, 'anderson', { maxPasses: 3 });
    expect(r.status).toBe('not-converged');
    expect(r.passes).toBe(3);
    expect(r.message).toMatch(/Anderson acceleration did not converge in 3 passes/);
    expect(r.history.map((h) => h.method)).toEqual(['direct', 'direct', 'anderson']);
  });
});
