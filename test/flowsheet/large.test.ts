import { describe, expect, it } from 'vitest';
// @ts-expect-error: a plain ES module of the benchmarks, without type declarations
import { generateFlowsheet } from '../../bench/generate.mjs';
import { validateText } from '../../src/flowsheet/validate.js';
import { AUTO_ANDERSON_VARIABLES, solveFlowsheet } from '../../src/flowsheet/solve.js';

// The generated nested-recycle trains of the scaling benchmark (invented flowsheets: a test of
// the solver against itself, no published values). Every stage returns gas and liquid to its
// own mixer, every group of five stages returns gas to its first mixer, the end of the train
// returns gas to the start.
function train(units: number, components: number, method = 'wegstein') {
  const g = generateFlowsheet({ units, components, method }) as { text: string };
  return validateText(`generated-${units}.yaml`, g.text).model;
}

describe('large flowsheets: auto solves a large tear set by Anderson acceleration', () => {
  it('a 60-unit train (above the threshold) converges to the state Wegstein finds, in fewer passes', () => {
    const model = train(60, 5);
    const w = solveFlowsheet(model, { method: 'wegstein' });
    const a = solveFlowsheet(model, { method: 'auto' });
    expect(w.status).toBe('converged');
    expect(a.status).toBe('converged');
    expect(a.x.length).toBeGreaterThan(AUTO_ANDERSON_VARIABLES);
    expect(a.method).toMatch(/^anderson/);
    // The converged state is unique: both meet rtol 1e-10 on every tear variable; the error of
    // a linearly converging iteration is at most its residual over (1 - rate), so 1e-7 is loose.
    let worst = 0;
    for (let i = 0; i < a.x.length; i++) {
      const scale = Math.max(Math.abs(w.x[i]), 1e-6);
      worst = Math.max(worst, Math.abs(a.x[i] - w.x[i]) / scale);
    }
    expect(worst).toBeLessThan(1e-7);
    expect(a.passes).toBeLessThan(w.passes);
  });

  it('a one-stage train (below the threshold) keeps Wegstein then Newton under auto', () => {
    const model = train(5, 5);
    const r = solveFlowsheet(model, { method: 'auto' });
    expect(r.status).toBe('converged');
    expect(r.x.length).toBeLessThanOrEqual(AUTO_ANDERSON_VARIABLES);
    expect(r.method).not.toMatch(/anderson/);
  });

  it('anderson can be asked for by name and agrees with Wegstein on a small train', () => {
    const model = train(10, 5);
    const w = solveFlowsheet(model, { method: 'wegstein' });
    const a = solveFlowsheet(model, { method: 'anderson' });
    expect(a.status).toBe('converged');
    for (let i = 0; i < a.x.length; i++) expect(Math.abs(a.x[i] - w.x[i])).toBeLessThanOrEqual(1e-7 * Math.max(Math.abs(w.x[i]), 1e-6));
  });
});
