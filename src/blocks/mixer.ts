/**
 * Mixer: inlets added component by component. Outlet pressure is the lowest inlet pressure
 * unless `P` is set (the report says when that lets an inlet down). Outlet temperature:
 *  - adiabatic (the default): the outlet's molar enthalpy is the inlets' enthalpy flow over the
 *    outlet flow, and T comes from a PH flash (so a mixed stream that partly condenses, or a
 *    liquid that flashes on mixing, is found with its vapor fraction);
 *  - `T:` set: the outlet is flashed at T and P, and the duty that takes it there is reported.
 * A file whose components lack heat-capacity or formation data has no energy balance: a mixer
 * there needs `T:`, and says so at the unit.
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import { energyThisPass, type BlockDef, type Stream, type UnitFigure } from './types.js';
import { combineInlets } from './combine.js';
import { checkCorrelationRange, lackingData, enthalpyIn, hasEnergyData, missingEnergyKeys, OutletState, powerFigure, setFromState, totalFlow } from './energy.js';

export interface MixerSpec extends UnitSpecBase {
  type: 'mixer';
  T?: number;
  P?: number;
}

/** Inlet pressure above the outlet's by more than this (relative) is reported as let down. */
const LETDOWN_REL = 1e-9;

export const mixer: BlockDef<MixerSpec> = {
  type: 'mixer',
  description: 'adds its inlets; adiabatic unless `T` is set; outlet at the lowest inlet pressure unless `P` is set',
  keys: ['in', 'out', 'T', 'P'],
  read(name, f) {
    const inlets = f.streams('in', { required: true });
    const out = f.stream('out', { required: true });
    const T = f.quantity('T', 'temperature', { above: 0, example: '40 degC' });
    const P = f.quantity('P', 'pressure', { above: 0, example: '30 barg' });
    if (!inlets || !out || !checkCorrelationRange(f, 'T', T, name)) return undefined;
    if (T === undefined && !f.has('T') && !hasEnergyData(f.components)) {
      f.error(null, `mixer \`${name}\` finds its outlet temperature by the energy balance, but ${lackingData(missingEnergyKeys(f.components))}`,
        'add the missing keys to those components under `components:` (e.g. `cp: 35 J/(mol K)`, `hf: -110.5 kJ/mol`), or give the mixer an outlet temperature, e.g. `T: 40 degC`');
      return undefined;
    }
    return { name, type: 'mixer', inlets, outlets: [out], T, P };
  },
  build(spec, ctx) {
    const energy = ctx.energy;
    const state = new OutletState(ctx.eos, spec.name, ctx.checks);
    let duty = 0;
    return {
      spec,
      reset() {
        state.reset();
      },
      compute(ins: readonly Stream[], outs: Stream[]) {
        const o = outs[0];
        combineInlets(ins, o);
        if (spec.P !== undefined) o.P = spec.P;
        const meanT = o.T;
        duty = 0;
        if (!energyThisPass(ctx)) {
          // (without the energy balance in this pass, an adiabatic outlet stands at the inlets'
          // flow-weighted temperature: no unit's flows depend on it, and the final pass finds it)
          o.standIn = spec.T === undefined;
          if (spec.T !== undefined) o.T = spec.T;
          o.vf = Number.NaN;
          o.h = Number.NaN;
          return null;
        }
        o.standIn = false;
        const Hin = enthalpyIn(ins);
        const F = state.setFlows(o.flows);
        if (!(F > 0)) {
          // nothing flows: keep a finite state for the tears (no enthalpy is carried)
          o.T = spec.T ?? meanT;
          o.vf = Number.NaN;
          o.h = firstFinite(ins.map((s) => s.h));
          return null;
        }
        const fail = spec.T !== undefined ? state.atTP(spec.T, o.P, true) : state.atPH(o.P, Hin / F, meanT);
        setFromState(o, state.found, true);
        if (spec.T !== undefined) duty = F * o.h - Hin;
        return fail;
      },
      energy: () => ({ duty, power: 0 }),
      summary(ins: readonly Stream[], outs: readonly Stream[]) {
        const figures: UnitFigure[] = [];
        const notes: string[] = [];
        if (energy && spec.T !== undefined) figures.push(powerFigure('duty', 'duty', duty));
        if (!energy && spec.T === undefined) notes.push('no energy balance: outlet T is not computed');
        if (energy && spec.T === undefined) notes.push('adiabatic');
        const P = outs[0]?.P;
        if (Number.isFinite(P)) {
          const let_down = spec.inlets.filter((_, k) => ins[k] && totalFlow(ins[k]) > 0 && ins[k].P > P * (1 + LETDOWN_REL));
          if (let_down.length) {
            notes.push(`${let_down.map((s) => `\`${s}\``).join(', ')} ${let_down.length > 1 ? 'are' : 'is'} let down to the ${spec.P === undefined ? 'lowest inlet pressure' : 'set pressure'}, ${fmt(P / 1e5)} bar abs`);
          }
        }
        return { figures, notes };
      },
    };
  },
  balances: () => ({ law: 'components' }),
  outputs(_spec, model) {
    return hasEnergyData(model.components) ? [{ name: 'duty', dimension: 'power', read: (u) => u.figures.find((x) => x.key === 'duty')?.value ?? 0 }] : [];
  },
};

function firstFinite(v: number[]): number {
  for (const x of v) if (Number.isFinite(x)) return x;
  return 0;
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
