/**
 * A regression found through the energy balance (the effluent cooler of the methanol demo at
 * 120 degC during a sweep): the stability test's extrapolated trial step threw ln W past what
 * exp() holds, the trial's mole fractions turned NaN and the flash threw instead of answering.
 */
import { describe, expect, it } from 'vitest';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { makeEos } from '../../src/thermo/eos.js';
import { flashTP } from '../../src/thermo/flash.js';
import { stabilityTest } from '../../src/thermo/stability.js';

describe('stability test with an extrapolation near lambda = 1', () => {
  it('answers (a stable gas) at the state that made it overflow', () => {
    const { model } = loadFlowsheet('flowsheets/methanol-pilot.yaml');
    const eos = makeEos(model.thermo.eos, model.components, model.thermo.kij);
    // H2, N2, CO2, H2O, CH3OH as model.ids lists them
    expect([...model.ids]).toEqual(['H2', 'N2', 'CO2', 'H2O', 'CH3OH']);
    const z = Float64Array.from([0.723963370804049, 0.03972912315043724, 0.20399770346061466, 0.013091359790148202, 0.019218442794750917]);
    const s = stabilityTest(eos, 393.15, 3011325, z);
    expect(s.stable).toBe(true);
    const r = flashTP(eos, 393.15, 3011325, z);
    expect(r.status).toBe('converged');
    expect(r.phase).toBe('vapor');
  });
});
