/**
 * Mixer: inlets added component by component. Outlet pressure is the lowest inlet pressure
 * unless set; outlet temperature is set, or the molar-flow-weighted mean of the inlets (a
 * stand-in until the energy balance lands: exact only for equal molar heat capacities).
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { BlockDef, Stream } from './types.js';
import { combineInlets } from './combine.js';

export interface MixerSpec extends UnitSpecBase {
  type: 'mixer';
  T?: number;
  P?: number;
}

export const mixer: BlockDef<MixerSpec> = {
  type: 'mixer',
  description: 'adds its inlets; outlet at the lowest inlet pressure unless `P` is set',
  keys: ['in', 'out', 'T', 'P'],
  read(name, f) {
    const inlets = f.streams('in', { required: true });
    const out = f.stream('out', { required: true });
    const T = f.quantity('T', 'temperature', { above: 0, example: '40 degC' });
    const P = f.quantity('P', 'pressure', { above: 0, example: '30 barg' });
    if (!inlets || !out) return undefined;
    return { name, type: 'mixer', inlets, outlets: [out], T, P };
  },
  build(spec) {
    return {
      spec,
      compute(ins: readonly Stream[], outs: Stream[]) {
        const o = outs[0];
        combineInlets(ins, o);
        if (spec.P !== undefined) o.P = spec.P;
        if (spec.T !== undefined) o.T = spec.T;
        o.vf = Number.NaN;
        return null;
      },
      summary: () => ({ figures: [], notes: spec.T === undefined ? ['outlet T is the flow-weighted mean of the inlets (no energy balance yet)'] : [] }),
    };
  },
  balances: () => ({ law: 'components' }),
};
