/**
 * Heater and cooler (one block under two names, as condenser and flash are): one inlet, one
 * outlet of the same composition, brought to a set outlet temperature `T:` (the duty is
 * reported) or given a duty `duty:` (W, heat into the stream; negative when removed: the
 * outlet T is found by a PH flash). Outlet pressure: `P:`, or the inlet's less `dp:` (default:
 * the inlet's). Two-phase outlets are found with their vapor fraction.
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import { energyThisPass, type BlockDef, type Stream, type UnitFigure, type UnitSummary } from './types.js';
import { combineInlets } from './combine.js';
import { checkCorrelationRange, enthalpyIn, hasEnergyData, OutletState, powerFigure, setFromState } from './energy.js';
import { pressureBelowZero, readEnergyMode } from './reactor.js';

export interface HeaterSpec extends UnitSpecBase {
  type: 'heater' | 'cooler';
  T?: number;
  duty?: number;
  P?: number;
  dp?: number;
}

function makeDef(type: 'heater' | 'cooler'): BlockDef<HeaterSpec> {
  return {
    type,
    description: type === 'heater'
      ? 'brings a stream to a set T (duty reported) or adds a set duty (T found); optional pressure drop'
      : 'the heater block under its cooling name: a set T (duty reported) or a set duty (T found)',
    keys: ['in', 'out', 'T', 'duty', 'P', 'dp'],
    read(name, f) {
      const inlet = f.streams('in', { required: true });
      const out = f.stream('out', { required: true });
      const mode = readEnergyMode(name, f, type);
      const T = f.quantity('T', 'temperature', { above: 0, example: type === 'heater' ? '250 degC' : '40 degC' });
      const P = f.quantity('P', 'pressure', { above: 0, example: '29 barg' });
      if (!mode || !checkCorrelationRange(f, 'T', T, name)) return undefined;
      if (!f.has('T') && !f.has('duty')) {
        f.error(null, `${type} \`${name}\` needs an outlet temperature \`T\` or a duty \`duty\``, `for example \`T: ${type === 'heater' ? '250 degC' : '40 degC'}\` (the duty is reported), or \`duty: ${type === 'heater' ? '' : '-'}1.5 MW\` (the temperature is found)`);
        return undefined;
      }
      if (!inlet || !out || (f.has('T') && T === undefined)) return undefined;
      return { name, type, inlets: inlet, outlets: [out], T, duty: mode.duty, P, dp: mode.dp };
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
          const inT = o.T;
          const pIn = o.P;
          let problem: EvaluationFailure | null = null;
          o.P = spec.P ?? pIn - (spec.dp ?? 0);
          if (!(o.P > 0)) {
            problem = pressureBelowZero(spec.name, pIn, spec.dp ?? 0);
            o.P = pIn;
          }
          duty = 0;
          if (!energyThisPass(ctx)) {
            // with a duty, the outlet stands at the inlet's temperature until the final pass
            o.standIn = spec.T === undefined;
            o.T = spec.T ?? inT;
            o.vf = Number.NaN;
            o.h = Number.NaN;
            return problem;
          }
          o.standIn = false;
          const Hin = enthalpyIn(ins);
          const F = state.setFlows(o.flows);
          if (!(F > 0)) {
            o.T = spec.T ?? inT;
            o.h = Number.isFinite(ins[0]?.h) ? ins[0].h : 0;
            o.vf = Number.NaN;
            duty = 0;
            return problem;
          }
          const fail = spec.T !== undefined ? state.atTP(spec.T, o.P, true) : state.atPH(o.P, (Hin + spec.duty!) / F, inT);
          setFromState(o, state.found, true);
          duty = spec.T !== undefined ? F * o.h - Hin : spec.duty!;
          return problem ?? fail;
        },
        energy: () => ({ duty, power: 0 }),
        summary(_ins, outs) {
          const figures: UnitFigure[] = [];
          if (energy) figures.push(powerFigure('duty', 'duty', duty));
          if (spec.T === undefined && outs[0]) figures.push({ label: 'outlet temperature found', value: outs[0].T, kind: 'temperature', key: 'outletT' });
          return { figures, notes: energy ? [] : ['no energy balance: the duty is not computed'] };
        },
      };
    },
    outputs: (_spec, model) => (hasEnergyData(model.components) ? [{ name: 'duty', dimension: 'power', read: (u: UnitSummary) => u.figures.find((x) => x.key === 'duty')?.value ?? Number.NaN }] : []),
    // Plant data: what goes in comes out, component by component.
    balances: () => ({ law: 'components' }),
  };
}

export const heater = makeDef('heater');
export const cooler = makeDef('cooler');
