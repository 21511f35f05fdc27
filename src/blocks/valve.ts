/**
 * Valve: an isenthalpic letdown to a lower pressure (`P:`, or `dp:` below the inlet). The outlet
 * has the inlet's molar enthalpy; its temperature (the Joule-Thomson change) and vapor
 * fraction (a liquid that flashes on letdown) come from a PH flash. An outlet pressure above the
 * inlet's is no letdown: the unit reports it as invalid.
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import { energyThisPass, type BlockDef, type Stream, type UnitFigure } from './types.js';
import { combineInlets } from './combine.js';
import { lackingData, enthalpyIn, hasEnergyData, missingEnergyKeys, OutletState, setFromState } from './energy.js';
import { pressureBelowZero } from './reactor.js';

export interface ValveSpec extends UnitSpecBase {
  type: 'valve';
  P?: number;
  dp?: number;
}

export const valve: BlockDef<ValveSpec> = {
  type: 'valve',
  description: 'isenthalpic letdown to a set pressure `P` or by `dp`',
  keys: ['in', 'out', 'P', 'dp'],
  read(name, f) {
    const inlet = f.streams('in', { required: true });
    const out = f.stream('out', { required: true });
    const P = f.quantity('P', 'pressure', { above: 0, example: '5 barg' });
    const dp = f.quantity('dp', 'pressure', { min: 0, example: '10 bar', difference: true });
    if (f.has('P') === f.has('dp')) {
      f.error(null, `valve \`${name}\` needs exactly one of \`P\` (outlet pressure) and \`dp\` (pressure drop)`, 'for example `P: 5 barg`');
      return undefined;
    }
    if (!hasEnergyData(f.components)) {
      const miss = missingEnergyKeys(f.components);
      f.error(null, `valve \`${name}\` keeps the enthalpy across the letdown, but ${lackingData(miss)}`, 'add the missing keys to those components under `components:` (e.g. `cp: 35 J/(mol K)`, `hf: -110.5 kJ/mol`)');
      return undefined;
    }
    if (!inlet || !out || (f.has('P') && P === undefined) || (f.has('dp') && dp === undefined)) return undefined;
    return { name, type: 'valve', inlets: inlet, outlets: [out], P, dp };
  },
  build(spec, ctx) {
    const state = new OutletState(ctx.eos, spec.name, ctx.checks);
    let dT = Number.NaN;
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
        o.P = spec.P ?? pIn - spec.dp!;
        if (!(o.P > 0)) {
          problem = pressureBelowZero(spec.name, pIn, spec.dp ?? 0);
          o.P = pIn;
        } else if (o.P > pIn * (1 + 1e-12)) {
          problem = {
            kind: 'invalid', unit: spec.name,
            message: `valve \`${spec.name}\`: the outlet pressure ${fmt(o.P / 1e5)} bar is above the inlet's, ${fmt(pIn / 1e5)} bar; a valve only lets down`,
            help: 'lower `P` below the inlet pressure, or raise the pressure with a `compressor`',
          };
        }
        if (!energyThisPass(ctx)) {
          // the outlet temperature stands at the inlet's until the final pass finds it
          o.h = Number.NaN;
          o.standIn = true;
          return problem;
        }
        o.standIn = false;
        const Hin = enthalpyIn(ins);
        const F = state.setFlows(o.flows);
        if (!(F > 0)) {
          o.T = inT;
          o.h = Number.isFinite(ins[0]?.h) ? ins[0].h : 0;
          o.vf = Number.NaN;
          return problem;
        }
        const fail = state.atPH(o.P, Hin / F, inT);
        setFromState(o, state.found, true);
        dT = o.T - inT;
        return problem ?? fail;
      },
      energy: () => ({ duty: 0, power: 0 }),
      summary() {
        const figures: UnitFigure[] = [{ label: 'temperature change (Joule-Thomson), K', value: dT, kind: 'number', key: 'temperatureChange' }];
        return { figures, notes: ['isenthalpic'] };
      },
    };
  },
  // Plant data: what goes in comes out, component by component.
  balances: () => ({ law: 'components' }),
};

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
