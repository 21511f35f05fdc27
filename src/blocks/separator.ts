/**
 * Separator with fixed recoveries: the fraction of each component's inlet flow sent to each
 * named outlet. One outlet may take the rest; a component not named for an outlet sends it
 * nothing (or, for the `rest` outlet, the remainder).
 *
 * Outlets at `T` and `P` when set, else at the inlet's. With the energy balance on, each outlet
 * is flashed at its T and P (its own composition decides its phases; the separation itself is
 * a black box), and the duty that the separation takes (the outlets' enthalpy less the
 * inlet's) is reported. (Taking each outlet as one phase on the stable root would save the
 * flashes, but its enthalpy jumps where the root changes, and a loop through it stalls.)
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import { energyThisPass, type BlockDef, type Stream } from './types.js';
import { editOutletFraction } from './outlet-edit.js';
import { enthalpyIn, hasEnergyData, OutletState, powerFigure, setFromState } from './energy.js';

export interface SeparatorSpec extends UnitSpecBase {
  type: 'separator';
  /** recovery[k][i]: fraction of component i to outlet k. */
  recovery: Float64Array[];
  T?: number;
  P?: number;
}

export const separator: BlockDef<SeparatorSpec> = {
  type: 'separator',
  description: 'sends a fixed fraction of each component to each outlet',
  keys: ['in', 'out', 'T', 'P'],
  read(name, f) {
    const inlet = f.stream('in', { required: true });
    const outs = f.outlets('out');
    const T = f.quantity('T', 'temperature', { above: 0, example: '40 degC' });
    const P = f.quantity('P', 'pressure', { above: 0, example: '29 barg' });
    if (!inlet || !outs) return undefined;
    const n = f.componentIds.length;
    if (outs.length < 2) {
      f.error('out', `separator \`${name}\` needs at least two outlets`, 'for example `out: { product: { CH3OH: 0.99 }, recycle: rest }`');
      return undefined;
    }
    let rest = -1;
    const recovery: Float64Array[] = [];
    for (let k = 0; k < outs.length; k++) {
      const o = outs[k];
      if (o.value === 'rest') {
        if (rest >= 0) {
          o.report(`separator \`${name}\`: only one outlet may say \`rest\``);
          return undefined;
        }
        rest = k;
        recovery.push(new Float64Array(n));
      } else if (typeof o.value === 'number') {
        recovery.push(new Float64Array(n).fill(o.value));
      } else {
        recovery.push(o.value.map((v) => (Number.isNaN(v) ? 0 : v)));
      }
    }
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < outs.length; k++) if (k !== rest) s += recovery[k][i];
      if (rest >= 0) {
        if (s > 1 + 1e-12) {
          f.error('out', `separator \`${name}\` sends ${Number(s.toPrecision(10))} of \`${f.componentIds[i]}\` to its outlets before \`rest\``, 'the recoveries of a component must add up to at most 1');
          return undefined;
        }
        recovery[rest][i] = Math.max(0, 1 - s);
      } else if (Math.abs(s - 1) > 1e-9) {
        f.error('out', `the recoveries of \`${f.componentIds[i]}\` in separator \`${name}\` add up to ${Number(s.toPrecision(10))}, not 1`, 'make each component\'s recoveries add up to 1, or let one outlet take the `rest`');
        return undefined;
      }
    }
    return { name, type: 'separator', inlets: [inlet], outlets: outs.map((o) => o.stream), recovery, T, P };
  },
  build(spec, ctx) {
    const energy = ctx.energy;
    const states = spec.outlets.map(() => new OutletState(ctx.eos, spec.name, ctx.checks));
    let duty = 0;
    return {
      spec,
      reset() {
        for (const st of states) st.reset();
      },
      compute(ins: readonly Stream[], outs: Stream[]) {
        const s = ins[0];
        const n = s.flows.length;
        let problem: EvaluationFailure | null = null;
        let Hout = 0;
        const energyNow = energyThisPass(ctx);
        for (let k = 0; k < outs.length; k++) {
          const o = outs[k];
          const r = spec.recovery[k];
          for (let i = 0; i < n; i++) o.flows[i] = r[i] * s.flows[i];
          o.T = spec.T ?? s.T;
          o.standIn = spec.T === undefined && s.standIn;
          o.P = spec.P ?? s.P;
          o.vf = Number.NaN;
          o.h = Number.NaN;
          o.hRule = 'flash';
          if (!energyNow) continue;
          const F = states[k].setFlows(o.flows);
          if (!(F > 0)) {
            o.h = Number.isFinite(s.h) ? s.h : 0;
            continue;
          }
          problem ??= states[k].atTP(o.T, o.P, true);
          setFromState(o, states[k].found, true);
          Hout += F * o.h;
        }
        duty = energyNow ? Hout - enthalpyIn(ins) : 0;
        return problem;
      },
      energy: () => ({ duty, power: 0 }),
      summary: () => ({ figures: energy ? [powerFigure('duty', 'duty', duty)] : [], notes: [] }),
    };
  },
  outputs: (_spec, model) => (hasEnergyData(model.components) ? [{ name: 'duty', dimension: 'power', read: (u) => u.figures.find((x) => x.key === 'duty')?.value ?? Number.NaN }] : []),
  structureKey: (spec) => spec.recovery.map((r) => Array.from(r, (x) => (x > 0 ? 1 : 0)).join('')).join('|'),
  structure(spec) {
    return {
      passes: (k, i) => spec.recovery[k][i] > 0,
      openOutlet: (k, id) => `give \`${id}\` a recovery above zero to the outlet \`${spec.outlets[k]}\` of separator \`${spec.name}\``,
    };
  },
  edit: editOutletFraction,
  balances(spec, model) {
    // The recovery of each component to each outlet (a parameter where the file writes one).
    return {
      law: 'components',
      figures: spec.outlets.flatMap((o, k) => model.ids.map((id, i) => ({ path: `${spec.name}.out.${o}.${id}`, value: (v) => v.outlet(k, i) / v.inlet(i) }))),
    };
  },
};
