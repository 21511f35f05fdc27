import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { parameter } from '../../src/study/parameters.js';
import { solvePoint } from '../../src/study/point.js';
import { readFileSync } from 'node:fs';
import { blockRows, lineStart, prepareSweep, solveOne, type Solved, type SweepSpec } from '../../src/study/sweep.js';

describe('continuation with the neighbour\'s tear Jacobian', () => {
  it('a chord from the neighbour\'s Jacobian needs fewer passes and gives the same steady state as a cold solve to 1e-9', () => {
    const p = loadFlowsheet('flowsheets/methanol-pilot.yaml').model;
    const ref = parameter(p, 'reactor.reactions.0.conversion');
    const first = solvePoint(p, [{ parameter: ref, value: 0.25 }]);
    expect(first.jacobian).toBeDefined();
    const next = [{ parameter: ref, value: 0.2502 }];
    const withJ = solvePoint(p, next, { start: first.start, jacobian: first.jacobian, method: 'newton' });
    const withoutJ = solvePoint(p, next, { start: first.start, method: 'newton' });
    const cold = solvePoint(p, next);
    for (const r of [withJ, withoutJ, cold]) expect(r.status).toBe('converged');
    expect(withJ.result!.jacobians).toBeLessThan(withoutJ.result!.jacobians);
    expect(withJ.result!.passes).toBeLessThan(withoutJ.result!.passes);
    const a = withJ.result!.streams.get('recycle')!;
    const b = cold.result!.streams.get('recycle')!;
    a.flows.forEach((v, i) => expect(Math.abs(v - b.flows[i]) / b.total).toBeLessThan(1e-9));
  });

  it('a Jacobian of the wrong size is refused, said (not ignored)', () => {
    const p = loadFlowsheet('flowsheets/methanol-pilot.yaml').model;
    const r = solvePoint(p, [], { jacobian: new Float64Array(4), method: 'newton' });
    expect(r.status).toBe('invalid');
    expect(r.message).toMatch(/Jacobian to start from has 4 entries/);
  });
});

describe('a start along the line of the grid (sweep continuation)', () => {
  const PILOT = 'flowsheets/methanol-pilot.yaml';
  const spec = (grid: string[], continuation: boolean): SweepSpec => ({
    file: PILOT, text: readFileSync(PILOT, 'utf8'), axes: grid.map((text) => ({ kind: 'grid' as const, text })),
    report: ['loop.recycle-ratio', 'streams.purge.flows.H2'], targets: [], block: 50, continuation,
  });

  it('is closer to the point\'s steady state than the neighbour\'s solution, and only on a line of the grid', () => {
    const ctx = prepareSweep(spec(['reactor.reactions.0.conversion=0.2:0.3:11'], true));
    const solved = new Map<number, Solved>();
    const at = (point: number): Solved => {
      const r = solveOne(ctx, point, undefined);
      expect(r.row.status).toBe('converged');
      return { point, start: r.start! };
    };
    const s0 = at(4);
    const s1 = at(5);
    const s2 = at(6);
    solved.set(4, s0);
    solved.set(5, s1);
    const line = lineStart(ctx, 6, s1, solved)!;
    expect(line).toBeDefined();
    const err = (x: Float64Array) => Math.max(...Array.from(x, (v, j) => Math.abs(v - s2.start[j]) / (Math.abs(s2.start[j]) + 1e-12)));
    // First order in the step from the neighbour, second order along the line: at least ten times closer.
    expect(err(line)).toBeLessThan(err(s1.start) / 10);
    // No point one step before the neighbour: no line.
    expect(lineStart(ctx, 6, s1, new Map([[5, s1]]))).toBeUndefined();
  });

  it('gives the rows of cold solves on a two-axis grid (to 1e-7)', () => {
    const grid = ['reactor.reactions.0.conversion=0.2:0.3:5', 'purge-split.out.recycle=0.95:0.97:3'];
    const warm = prepareSweep(spec(grid, true));
    const cold = prepareSweep(spec(grid, false));
    const rows = (ctx: ReturnType<typeof prepareSweep>) => ctx.blocks.flatMap((_, b) => [...blockRows(ctx, b)]);
    const a = rows(warm);
    const b = rows(cold);
    expect(a.length).toBe(15);
    a.forEach((r, i) => {
      expect(r.status).toBe('converged');
      r.outputs!.forEach((v, k) => expect(Math.abs((v as number) - (b[i].outputs![k] as number)) / Math.abs(b[i].outputs![k] as number)).toBeLessThan(1e-7));
    });
  });
});
