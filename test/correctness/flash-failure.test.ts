/**
 * A flash that does not converge is a not-converged result of the solve, with the state it
 * stopped at: not an input error (the file is fine) and never a solution.
 */
import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { createRuntime } from '../../src/flowsheet/runtime.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { makeEos } from '../../src/thermo/eos.js';
import type { Eos } from '../../src/thermo/types.js';
import { noWayOut } from './fixtures.js';

/** The file's equation of state, with fugacity coefficients that jump on every call (a flash cannot settle). */
function restless(eos: Eos): Eos {
  let calls = 0;
  return new Proxy(eos, {
    get(target, prop, receiver) {
      if (prop === 'lnPhi') {
        return (T: number, P: number, x: ArrayLike<number>, which: never, out: Float64Array) => {
          const r = target.lnPhi(T, P, x, which, out);
          calls++;
          for (let i = 0; i < out.length; i++) out[i] += 0.5 * Math.sin(1.7 * calls + i);
          return r;
        };
      }
      const v = Reflect.get(target, prop, receiver);
      return typeof v === 'function' ? v.bind(target) : v;
    },
  });
}

describe('a flash that does not converge', () => {
  it('makes the solve not-converged, naming the unit, with the last iterate kept', () => {
    const text = noWayOut.replace('cooler: { type: condenser, in: reactor-out, T: 40 degC, P: 30 bar, vapor: recycle, liquid: crude }',
      'cooler: { type: condenser, in: reactor-out, T: 40 degC, P: 30 bar, vapor: gas, liquid: crude }\n  split: { type: splitter, in: gas, out: { purge: 0.1, recycle: rest } }');
    const { model } = validateText('f.yaml', text);
    const eos = restless(makeEos(model.thermo.eos, model.components, model.thermo.kij));
    const r = solveFlowsheet(model, { runtime: createRuntime(model, eos), method: 'direct', maxPasses: 50 });
    expect(r.status).toBe('not-converged');
    // With the energy balance on, the mixer's PH flash and the reactor's flash meet the same
    // fugacities before the condenser does: the first unit in the order is named.
    expect(r.failure?.kind).toBe('not-converged');
    expect(['mix', 'reactor', 'cooler']).toContain(r.failure?.unit);
    expect(r.message).toContain(`\`${r.failure?.unit}\``);
    expect(r.message).toMatch(/did not converge|no state/);
    expect(r.x.length).toBeGreaterThan(0);
    expect(r.x.every((v) => Number.isFinite(v))).toBe(true);
  });
});
