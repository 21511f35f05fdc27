import { describe, expect, it } from 'vitest';
import { ParametricFlowsheet } from '../../src/study/params.js';
import { solvePoint } from '../../src/study/point.js';

describe('continuation with the neighbour\'s tear Jacobian', () => {
  it('a chord from the neighbour\'s Jacobian needs fewer passes and gives the same steady state as a cold solve to 1e-9', () => {
    const p = new ParametricFlowsheet('flowsheets/methanol-pilot.yaml');
    const ref = p.input('reactor.reactions.0.conversion');
    const first = solvePoint(p, [{ ref, value: 0.25 }]);
    expect(first.jacobian).toBeDefined();
    const next = [{ ref, value: 0.2502 }];
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

  it('a Jacobian of the wrong size is ignored', () => {
    const p = new ParametricFlowsheet('flowsheets/methanol-pilot.yaml');
    const r = solvePoint(p, [], { jacobian: new Float64Array(4), method: 'newton' });
    expect(r.status).toBe('converged');
  });
});
