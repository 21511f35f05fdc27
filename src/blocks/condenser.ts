/**
 * Condenser and flash drum: vapor and liquid outlets at one T and P.
 * - `model: equilibrium` (default): flash with the file's equation of state (fugacity K-values;
 *   see src/thermo/flash.ts). The last K-values start the next pass. At a set `T:` the flash is
 *   isothermal and the duty is reported; with `duty:` (W, heat into the material; negative when
 *   removed) or `adiabatic: true` the temperature comes from the enthalpy balance (PH flash).
 * - `model: split`: a fixed fraction of each component goes to the liquid, at a set T (the
 *   vapor outlet's enthalpy on the vapor root, the liquid's on the liquid root).
 * Outlet pressure: `P:`, or the inlet's less `dp:`. `flash` is the same block under its drum name.
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import { energyThisPass, type BlockDef, type BlockRuntime, type BuildContext, type Stream, type UnitFigure, type UnitSummary } from './types.js';
import { checkCorrelationRange, enthalpyIn, hasEnergyData, OutletState, phaseH, powerFigure } from './energy.js';
import { pressureBelowZero, readEnergyMode } from './reactor.js';
import { stableRootOf } from '../thermo/flash-eos.js';

export interface CondenserSpec extends UnitSpecBase {
  type: 'condenser' | 'flash';
  /** Set temperature, K (absent: found from `duty` or `adiabatic`). */
  T?: number;
  P?: number;
  dp?: number;
  adiabatic: boolean;
  duty?: number;
  model: 'equilibrium' | 'split';
  /** Fraction of each component to the liquid (split model). */
  split?: Float64Array;
}

function makeDef(type: 'condenser' | 'flash'): BlockDef<CondenserSpec> {
  return {
    type,
    description: type === 'condenser'
      ? 'cools to a set T and P and parts vapor from liquid (equilibrium flash or fixed split)'
      : 'isothermal flash drum at a set T and P (equilibrium or fixed split)',
    keys: ['in', 'T', 'P', 'dp', 'duty', 'adiabatic', 'model', 'split', 'vapor', 'liquid'],
    read(name, f) {
      const inlet = f.streams('in', { required: true });
      const mode = readEnergyMode(name, f, type);
      const found = mode && (mode.adiabatic || mode.duty !== undefined);
      const T = f.quantity('T', 'temperature', { required: !found && !f.has('duty'), above: 0, example: '40 degC' });
      const P = f.quantity('P', 'pressure', { required: !f.has('dp'), above: 0, example: '29 barg` or the drop from the inlet, `dp: 0.2 bar' });
      const model = (f.string('model', { oneOf: ['equilibrium', 'split'] }) ?? 'equilibrium') as CondenserSpec['model'];
      if (!mode || !checkCorrelationRange(f, 'T', T, name)) return undefined;
      if (model === 'split' && found) {
        f.errorAtKey(mode.adiabatic ? 'adiabatic' : 'duty', `\`${name}\` with \`model: split\` needs a set \`T\`: a fixed split has no equilibrium to find a temperature from`, 'give `T:` (the duty is reported), or use `model: equilibrium`');
        return undefined;
      }
      const vapor = f.stream('vapor', { required: true });
      const liquid = f.stream('liquid', { required: true });
      let split: Float64Array | undefined;
      if (model === 'split') {
        split = f.componentValues('split', { required: true, defaultValue: 0, min: 0, max: 1 })?.values;
        if (!split) return undefined;
      } else if (f.has('split')) {
        f.error('split', `\`split\` is only used with \`model: split\``, 'add `model: split`, or remove `split` to use the equilibrium flash');
        return undefined;
      }
      if (!inlet || (T === undefined && !found) || (P === undefined && mode.dp === undefined) || !vapor || !liquid) return undefined;
      if (vapor === liquid) {
        f.error('liquid', `the vapor and liquid outlets of \`${name}\` are the same stream`, 'give them different names');
        return undefined;
      }
      return { name, type, inlets: inlet, outlets: [vapor, liquid], T, P, dp: mode.dp, adiabatic: mode.adiabatic, duty: mode.duty, model, split };
    },
    build: buildCondenser,
    outputs: (_spec, model) => [
      { name: 'vapor-fraction', dimension: 'dimensionless', read: (u: UnitSummary) => u.figures.find((x) => x.key === 'vaporFraction')?.value ?? Number.NaN },
      ...(hasEnergyData(model.components) ? [
        { name: 'duty', dimension: 'power' as const, read: (u: UnitSummary) => u.figures.find((x) => x.key === 'duty')?.value ?? Number.NaN },
      ] : []),
    ],
    structureKey: (spec) => (spec.model === 'split' && spec.split ? `split ${Array.from(spec.split, (x) => `${x > 0 ? 1 : 0}${x < 1 ? 1 : 0}`).join('')}` : spec.model),
    structure(spec, model) {
      return {
        // outlets: [vapor, liquid]. Under an equilibrium flash any component dissolves a little
        // (except under the ideal-gas model, where the flash gives no liquid).
        passes: (k, i) => (spec.model === 'split' && spec.split ? (k === 1 ? spec.split[i] > 0 : spec.split[i] < 1) : model.thermo.eos === 'ideal' ? k === 0 : true),
        openOutlet: (k, id) => `let some \`${id}\` go to \`${spec.outlets[k]}\` in the \`split\` of \`${spec.name}\``,
      };
    },
    // A flash at a temperature the energy balance finds (duty or adiabatic) splits by it.
    needsEnergyEveryPass: (spec) => spec.model === 'equilibrium' && spec.T === undefined,
    balances(spec, model) {
      // The fraction of each component that leaves as liquid (the `split` parameter of a split
      // model; a figure of the data for an equilibrium flash).
      return { law: 'components', figures: model.ids.map((id, i) => ({ path: `${spec.name}.split.${id}`, value: (v) => v.outlet(1, i) / v.inlet(i) })) };
    },
  };
}

function buildCondenser(spec: CondenserSpec, ctx: BuildContext): BlockRuntime {
  const n = ctx.model.ids.length;
  const energy = ctx.energy;
  const state = new OutletState(ctx.eos, spec.name, ctx.checks);
  const feed = new Float64Array(n);
  const zv = new Float64Array(n);
  const zl = new Float64Array(n);
  let note = '';
  let lastIterations = 0;
  let lastBeta = Number.NaN;
  let lastT = Number.NaN;
  let duty = 0;
  const findsT = spec.T === undefined;
  return {
    spec,
    reset() {
      state.reset();
    },
    compute(ins: readonly Stream[], outs: Stream[]) {
      const [v, l] = outs;
      feed.fill(0);
      let pIn = Infinity;
      let tSum = 0;
      let F = 0;
      for (const s of ins) {
        let t = 0;
        for (let i = 0; i < n; i++) {
          feed[i] += s.flows[i];
          t += s.flows[i];
        }
        if (s.P < pIn) pIn = s.P;
        if (t > 0 && Number.isFinite(s.T)) tSum += t * s.T;
        F += t;
      }
      const inletT = F > 0 ? tSum / F : ins[0]?.T ?? Number.NaN;
      let problem: EvaluationFailure | null = null;
      const energyNow = energyThisPass(ctx);
      note = '';
      duty = 0;
      // This pass's figures only: with no flow there is no split (a runtime reused across
      // solves would otherwise report the last solve's).
      lastBeta = Number.NaN;
      lastT = Number.NaN;
      lastIterations = 0;
      let P = spec.P ?? pIn - (spec.dp ?? 0);
      if (!(P > 0)) {
        problem = pressureBelowZero(spec.name, pIn, spec.dp ?? 0);
        P = pIn;
      }
      const Hin = energyNow ? enthalpyIn(ins) : 0;
      for (const o of outs) {
        o.standIn = false;
        o.T = spec.T ?? inletT;
        o.P = P;
      }
      v.vf = 1;
      l.vf = 0;
      v.hRule = spec.model === 'split' ? 'vapor' : 'stable';
      l.hRule = spec.model === 'split' ? 'liquid' : 'stable';
      if (!(F > 0)) {
        v.flows.fill(0);
        l.flows.fill(0);
        const h = Number.isFinite(ins[0]?.h) ? ins[0].h : energyNow ? 0 : Number.NaN;
        v.h = h;
        l.h = h;
        return problem;
      }
      if (spec.model === 'split') {
        const sp = spec.split!;
        let V = 0;
        for (let i = 0; i < n; i++) {
          l.flows[i] = sp[i] * feed[i];
          v.flows[i] = feed[i] - l.flows[i];
          V += v.flows[i];
        }
        lastBeta = V / F;
        lastT = spec.T!;
        v.h = l.h = Number.NaN;
        if (energyNow) {
          // each outlet on its own root at the set T: the split says which phase it is
          const L = F - V;
          if (V > 0) for (let i = 0; i < n; i++) zv[i] = v.flows[i] / V;
          if (L > 0) for (let i = 0; i < n; i++) zl[i] = l.flows[i] / L;
          v.h = phaseH(ctx.eos, spec.T!, P, V > 0 ? zv : feed, 'vapor');
          l.h = phaseH(ctx.eos, spec.T!, P, L > 0 ? zl : feed, 'liquid');
          duty = V * v.h + L * l.h - Hin;
        }
        return problem;
      }
      for (let i = 0; i < n; i++) state.z[i] = feed[i] / F;
      const fail = findsT ? state.atPH(P, (Hin + (spec.duty ?? 0)) / F, inletT) : state.atTP(spec.T!, P, energyNow);
      const r = state.found;
      lastIterations = r.flashes;
      lastT = r.T;
      problem ??= fail;
      if (r.liquidLiquid) {
        // Two liquids, no vapor: a vapor outlet fed a liquid would be no solution.
        problem = {
          kind: 'invalid',
          unit: spec.name,
          message: `the flash in \`${spec.name}\` finds two liquid phases and no vapor at the set T and P`,
          help: 'set binary interaction parameters for the polar pairs under `thermo.kij` (from a fit to phase-equilibrium data), or use `model: split`',
        };
      }
      for (const o of outs) o.T = r.T;
      if (r.phase === 'two-phase') {
        for (let i = 0; i < n; i++) {
          v.flows[i] = F * r.beta * r.y[i];
          l.flows[i] = feed[i] - v.flows[i];
          if (l.flows[i] < 0) {
            l.flows[i] = 0;
            v.flows[i] = feed[i];
          }
        }
        lastBeta = r.beta;
        v.h = r.hV;
        l.h = r.hL;
      } else if (r.phase === 'vapor') {
        v.flows.set(feed);
        l.flows.fill(0);
        lastBeta = 1;
        note = `all vapor at ${findsT ? 'the T found' : 'the set T'} and P: no liquid`;
        v.h = l.h = r.h;
      } else {
        l.flows.set(feed);
        v.flows.fill(0);
        lastBeta = 0;
        note = `all liquid at ${findsT ? 'the T found' : 'the set T'} and P: no vapor`;
        v.h = l.h = r.h;
      }
      if (energyNow) {
        let V = 0;
        let L = 0;
        for (let i = 0; i < n; i++) {
          V += v.flows[i];
          L += l.flows[i];
        }
        duty = findsT ? spec.duty ?? 0 : V * v.h + L * l.h - Hin;
        if (findsT) {
          // the outlets carry the balance's enthalpy exactly (the flash's residual spread)
          const d = (Hin + duty - V * v.h - L * l.h) / F;
          v.h += d;
          l.h += d;
        }
      } else {
        v.h = l.h = Number.NaN;
      }
      return problem;
    },
    energy: () => ({ duty, power: 0 }),
    summary(_ins, outs) {
      const figures: UnitFigure[] = [{ label: 'vapor fraction', value: lastBeta, kind: 'fraction', key: 'vaporFraction' }];
      const notes: string[] = note ? [note] : [];
      // A split condenser takes its liquid as given; say when the equation of state finds no liquid
      // there (supercritical methane "condensed" at 250 K has the density of a gas).
      const liquid = outs?.[1];
      if (spec.model === 'split' && liquid && ctx.eos.name !== 'ideal') {
        let L = 0;
        for (let i = 0; i < n; i++) L += liquid.flows[i];
        if (L > 0 && Number.isFinite(liquid.T) && liquid.P > 0) {
          for (let i = 0; i < n; i++) zl[i] = liquid.flows[i] / L;
          if (stableRootOf(ctx.eos, liquid.T, liquid.P, zl) !== 'liquid') {
            notes.push(`the liquid outlet \`${spec.outlets[1]}\` is not a liquid by ${ctx.eos.name} at its T and P (its only or stable root is a gas): the split condenses what the equation of state leaves as gas; check the split fractions against the condenser's T and P`);
          }
        }
      }
      if (spec.model === 'equilibrium') figures.push({ label: 'flash iterations in the last pass (from the previous K-values)', value: lastIterations, kind: 'count', key: 'flashIterations' });
      if (energy) figures.push(powerFigure('duty', spec.adiabatic ? 'duty (adiabatic)' : 'duty', duty));
      if (findsT) figures.push({ label: 'temperature found', value: lastT, kind: 'temperature', key: 'T' });
      return { figures, notes };
    },
  };
}

export const condenser = makeDef('condenser');
export const flash = makeDef('flash');
