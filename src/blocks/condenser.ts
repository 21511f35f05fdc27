/**
 * Condenser and flash drum: vapor and liquid outlets at a set T and P.
 * - `model: equilibrium` (default): isothermal flash with the file's equation of state
 *   (fugacity K-values; see src/thermo/flash.ts). The last K-values start the next pass.
 * - `model: split`: a fixed fraction of each component goes to the liquid.
 * `flash` is the same block under its drum name.
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import { flashTP } from '../thermo/flash.js';
import type { BlockDef, BlockRuntime, BuildContext, Stream, UnitSummary } from './types.js';

export interface CondenserSpec extends UnitSpecBase {
  type: 'condenser' | 'flash';
  T: number;
  P: number;
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
    keys: ['in', 'T', 'P', 'model', 'split', 'vapor', 'liquid'],
    read(name, f) {
      const inlet = f.streams('in', { required: true });
      const T = f.quantity('T', 'temperature', { required: true, above: 0, example: '40 degC' });
      const P = f.quantity('P', 'pressure', { required: true, above: 0, example: '29 barg' });
      const model = (f.string('model', { oneOf: ['equilibrium', 'split'] }) ?? 'equilibrium') as CondenserSpec['model'];
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
      if (!inlet || T === undefined || P === undefined || !vapor || !liquid) return undefined;
      if (vapor === liquid) {
        f.error('liquid', `the vapor and liquid outlets of \`${name}\` are the same stream`, 'give them different names');
        return undefined;
      }
      return { name, type, inlets: inlet, outlets: [vapor, liquid], T, P, model, split };
    },
    build: buildCondenser,
    outputs: () => [{ name: 'vapor-fraction', dimension: 'dimensionless', read: (u: UnitSummary) => u.figures.find((x) => x.key === 'vaporFraction')?.value ?? Number.NaN }],
    structure(spec, model) {
      return {
        // outlets: [vapor, liquid]. Under an equilibrium flash any component dissolves a little
        // (except under the ideal-gas model, where the flash gives no liquid).
        passes: (k, i) => (spec.model === 'split' && spec.split ? (k === 1 ? spec.split[i] > 0 : spec.split[i] < 1) : model.thermo.eos === 'ideal' ? k === 0 : true),
        openOutlet: (k, id) => `let some \`${id}\` go to \`${spec.outlets[k]}\` in the \`split\` of \`${spec.name}\``,
      };
    },
    balances(spec, model) {
      // The fraction of each component that leaves as liquid (the `split` parameter of a split
      // model; a figure of the data for an equilibrium flash).
      return { law: 'components', figures: model.ids.map((id, i) => ({ path: `${spec.name}.split.${id}`, value: (v) => v.outlet(1, i) / v.inlet(i) })) };
    },
  };
}

function buildCondenser(spec: CondenserSpec, ctx: BuildContext): BlockRuntime {
  const n = ctx.model.ids.length;
  const z = new Float64Array(n);
  const feed = new Float64Array(n);
  let K0: Float64Array | undefined;
  let note = '';
  let lastIterations = 0;
  let lastBeta = Number.NaN;
  return {
    spec,
    reset() {
      K0 = undefined;
    },
    compute(ins: readonly Stream[], outs: Stream[]) {
      const [v, l] = outs;
      feed.fill(0);
      for (const s of ins) for (let i = 0; i < n; i++) feed[i] += s.flows[i];
      let F = 0;
      for (let i = 0; i < n; i++) F += feed[i];
      let problem: EvaluationFailure | null = null;
      note = '';
      for (const o of outs) {
        o.T = spec.T;
        o.P = spec.P;
      }
      if (!(F > 0)) {
        v.flows.fill(0);
        l.flows.fill(0);
        v.vf = 1;
        l.vf = 0;
        return null;
      }
      if (spec.model === 'split') {
        const sp = spec.split!;
        let V = 0;
        for (let i = 0; i < n; i++) {
          l.flows[i] = sp[i] * feed[i];
          v.flows[i] = feed[i] - l.flows[i];
          V += v.flows[i];
        }
        v.vf = 1;
        l.vf = 0;
        lastBeta = V / F;
        return null;
      }
      for (let i = 0; i < n; i++) z[i] = feed[i] / F;
      const r = flashTP(ctx.eos, spec.T, spec.P, z, { K0 });
      lastIterations = r.iterations;
      if (r.status !== 'converged') {
        problem = {
          kind: 'not-converged',
          unit: spec.name,
          message: `the flash in \`${spec.name}\` did not converge (${r.iterations} iterations, fugacity residual ${r.residual.toExponential(2)})`,
          help: 'check T and P against the mixture; a point near the mixture critical point is hard',
        };
      }
      if (r.liquidLiquid) {
        // Two liquids, no vapor: a vapor outlet fed a liquid would be no solution.
        problem = {
          kind: 'invalid',
          unit: spec.name,
          message: `the flash in \`${spec.name}\` finds two liquid phases and no vapor at the set T and P`,
          help: 'set binary interaction parameters for the polar pairs under `thermo.kij` (from a fit to phase-equilibrium data), or use `model: split`',
        };
      }
      if (r.phase === 'two-phase') {
        K0 = Float64Array.from(r.K);
        for (let i = 0; i < n; i++) {
          v.flows[i] = F * r.beta * r.y[i];
          l.flows[i] = feed[i] - v.flows[i];
          if (l.flows[i] < 0) {
            l.flows[i] = 0;
            v.flows[i] = feed[i];
          }
        }
        lastBeta = r.beta;
      } else if (r.phase === 'vapor') {
        v.flows.set(feed);
        l.flows.fill(0);
        lastBeta = 1;
        note = r.note ?? 'all vapor at the set T and P: no liquid';
      } else {
        l.flows.set(feed);
        v.flows.fill(0);
        lastBeta = 0;
        note = r.note ?? 'all liquid at the set T and P: no vapor';
      }
      v.vf = 1;
      l.vf = 0;
      return problem;
    },
    summary() {
      return {
        figures: [
          { label: 'vapor fraction', value: lastBeta, kind: 'fraction', key: 'vaporFraction' },
          ...(spec.model === 'equilibrium' ? [{ label: 'flash iterations in the last pass (from the previous K-values)', value: lastIterations, kind: 'count' as const, key: 'flashIterations' }] : []),
        ],
        notes: note ? [note] : [],
      };
    },
  };
}

export const condenser = makeDef('condenser');
export const flash = makeDef('flash');
