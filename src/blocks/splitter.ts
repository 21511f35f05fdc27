/** Splitter: the inlet divided by fractions into outlets of the same composition and state (T, P, molar enthalpy). */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { BlockDef, Stream } from './types.js';
import { editOutletFraction } from './outlet-edit.js';

export interface SplitterSpec extends UnitSpecBase {
  type: 'splitter';
  /** Fraction of the inlet to each outlet (same order as outlets); sums to 1. */
  fractions: number[];
}

export const splitter: BlockDef<SplitterSpec> = {
  type: 'splitter',
  description: 'divides its inlet by fractions into outlets of the same composition',
  keys: ['in', 'out'],
  read(name, f) {
    const inlet = f.stream('in', { required: true });
    const outs = f.outlets('out');
    if (!inlet || !outs) return undefined;
    if (outs.length < 2) {
      f.error('out', `splitter \`${name}\` needs at least two outlets`, 'for example `out: { recycle: 0.97, purge: rest }`');
      return undefined;
    }
    let rest = -1;
    let sum = 0;
    const fractions: number[] = [];
    for (let k = 0; k < outs.length; k++) {
      const o = outs[k];
      if (o.value === 'rest') {
        if (rest >= 0) {
          o.report(`splitter \`${name}\`: only one outlet may say \`rest\``, 'give the other fractions as numbers');
          return undefined;
        }
        rest = k;
        fractions.push(0);
      } else if (typeof o.value === 'number') {
        fractions.push(o.value);
        sum += o.value;
      } else {
        o.report(`splitter \`${name}\` divides the whole stream: give a fraction to \`${o.stream}\`, not per-component recoveries`, 'use a `separator` for recoveries per component');
        return undefined;
      }
    }
    if (rest >= 0) {
      if (sum > 1 + 1e-12) {
        f.error('out', `the fractions of splitter \`${name}\` add up to ${Number(sum.toPrecision(10))} before \`rest\``, 'the fractions must add up to at most 1 when one outlet takes the rest');
        return undefined;
      }
      fractions[rest] = Math.max(0, 1 - sum);
    } else if (Math.abs(sum - 1) > 1e-9) {
      f.error('out', `the fractions of splitter \`${name}\` add up to ${Number(sum.toPrecision(10))}, not 1`, 'make them add up to 1, or write `rest` for one outlet');
      return undefined;
    } else {
      // Within 1e-9 of 1: scaled to 1, so that the split neither makes nor loses material (a
      // sum of 1 + 5e-10 in a loop with a 3 % purge left the N2 balance open by 3e-9 and the
      // loop never converged).
      for (let k = 0; k < fractions.length; k++) fractions[k] /= sum;
    }
    return { name, type: 'splitter', inlets: [inlet], outlets: outs.map((o) => o.stream), fractions };
  },
  build(spec) {
    const fr = Float64Array.from(spec.fractions);
    return {
      spec,
      compute(ins: readonly Stream[], outs: Stream[]) {
        const s = ins[0];
        const n = s.flows.length;
        for (let k = 0; k < outs.length; k++) {
          const o = outs[k];
          const a = fr[k];
          for (let i = 0; i < n; i++) o.flows[i] = a * s.flows[i];
          o.T = s.T;
          o.P = s.P;
          o.vf = s.vf;
          o.h = s.h;
          o.hRule = s.hRule;
          o.standIn = s.standIn;
        }
        return null;
      },
      summary: () => ({
        figures: spec.outlets.map((o, k) => ({ label: `to ${o}`, value: fr[k], kind: 'fraction' as const, key: `fraction.${o}` })),
        notes: [],
      }),
    };
  },
  structureKey: (spec) => spec.fractions.map((x) => (x > 0 ? 1 : 0)).join(''),
  structure(spec) {
    return {
      passes: (k) => spec.fractions[k] > 0,
      openOutlet: (k) => `give the outlet \`${spec.outlets[k]}\` of splitter \`${spec.name}\` a fraction above zero (a purge), e.g. 0.01`,
    };
  },
  edit: editOutletFraction,
  balances(spec) {
    return {
      law: 'split',
      figures: spec.outlets.map((o, k) => ({ path: `${spec.name}.out.${o}`, value: (v) => v.outlet(k) / v.inlet() })),
    };
  },
};
