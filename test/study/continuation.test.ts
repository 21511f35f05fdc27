import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { parameter } from '../../src/study/parameters.js';
import { solvePoint } from '../../src/study/point.js';

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
