/**
 * Compressor: gas from its inlet pressure P1 to `P:` (or `ratio:` times P1), with an
 * `isentropic-efficiency:` or a `polytropic-efficiency:`. Reports the shaft power (W, into the
 * fluid), the outlet temperature and the head (J/kg).
 *
 * Isentropic: the isentropic outlet (a PS flash at P2 with the inlet's entropy) gives
 * dh_s = h2s - h1; the actual rise is dh = dh_s / eta_s, and the outlet is the PH flash at P2 with
 * h1 + dh. Head: dh_s / M.
 *
 * Polytropic, by Schultz's method for a real gas (J. M. Schultz, "The polytropic analysis of
 * centrifugal compressors", Trans. ASME, J. Eng. Power 84 (1962) 69-82; the method of ASME
 * PTC 10-1997, Performance Test Code on Compressors and Exhausters, section 5 and Appendix B):
 *  - the isentropic path gives the isentropic volume exponent n_s = ln(P2/P1) / ln(v1/v2s) and
 *    Schultz's polytropic head factor f = (h2s - h1) / [n_s/(n_s - 1) (P2 v2s - P1 v1)];
 *  - the polytropic head along the actual path is H_p = f n/(n - 1) (P2 v2 - P1 v1), with
 *    n = ln(P2/P1) / ln(v1/v2) from the actual outlet's molar volume v2;
 *  - the actual rise is dh = H_p / eta_p. Since v2 depends on the outlet state, the rise is
 *    iterated (a contraction: a few PH flashes) until it changes by less than 1e-9 of itself.
 *  - the volumes are those of the states found: a state that is a split (an isentropic or
 *    actual outlet inside the two-phase region) has the volume of its two phases together.
 * In the ideal-gas limit with a constant heat capacity f = 1 and the outlet follows
 * T2/T1 = (P2/P1)^(R / (eta_p cp)) exactly (the textbook relation the tests check).
 *
 * The inlet must be all vapor: a compressor whose inlet holds liquid is reported as invalid,
 * with its vapor fraction. Needs cp, hf and gf of every component (entropy).
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import { energyThisPass, type BlockDef, type Stream, type UnitFigure, type UnitSummary } from './types.js';
import { eosWork, type Eos } from '../thermo/types.js';
import { newPhaseProperties, phasePropertiesInto } from '../thermo/enthalpy.js';
import { lackingData, missingEnergyKeys, OutletState, phaseH, phaseS, powerFigure, setFromState, type StateFound } from './energy.js';

export interface CompressorSpec extends UnitSpecBase {
  type: 'compressor';
  /** Outlet pressure, Pa (or ratio). */
  P?: number;
  ratio?: number;
  /** Exactly one of the two efficiencies. */
  isentropic?: number;
  polytropic?: number;
}

/** Liquid fraction up to which an inlet counts as a vapor at its dew point (flash rounding). */
const DEW_POINT_LIQUID = 1e-6;

/** Relative change of the outlet temperature that ends the polytropic iteration. */
const POLY_TOL = 1e-9;
const POLY_MAX = 60;

export const compressor: BlockDef<CompressorSpec> = {
  type: 'compressor',
  description: 'compresses gas to `P` or by `ratio` with an isentropic or polytropic efficiency; reports power, outlet T and head',
  keys: ['in', 'out', 'P', 'ratio', 'isentropic-efficiency', 'polytropic-efficiency'],
  read(name, f) {
    const inlet = f.stream('in', { required: true });
    const out = f.stream('out', { required: true });
    const P = f.quantity('P', 'pressure', { above: 0, example: '150 bar' });
    let ratio = f.number('ratio', { above: 0, example: '1.08' });
    if (ratio !== undefined && ratio < 1) {
      f.error('ratio', `compressor \`${name}\`: \`ratio: ${ratio}\` puts the outlet pressure below the inlet's; a compressor raises the pressure`, 'give a ratio of 1 or more, or let the pressure down with a `valve`');
      ratio = undefined;
    }
    const isentropic = f.number('isentropic-efficiency', { above: 0, max: 1, example: '0.75' });
    const polytropic = f.number('polytropic-efficiency', { above: 0, max: 1, example: '0.78' });
    let ok = true;
    if (f.has('P') === f.has('ratio')) {
      f.error(f.has('ratio') ? 'ratio' : null, `compressor \`${name}\` needs exactly one of \`P\` (outlet pressure) and \`ratio\` (outlet over inlet pressure)`, 'for example `P: 155 bar` or `ratio: 1.08`');
      ok = false;
    }
    if (f.has('isentropic-efficiency') === f.has('polytropic-efficiency')) {
      f.error(f.has('polytropic-efficiency') ? 'polytropic-efficiency' : null, `compressor \`${name}\` needs exactly one of \`isentropic-efficiency\` and \`polytropic-efficiency\``, 'for example `isentropic-efficiency: 0.75`');
      ok = false;
    }
    const miss = missingEnergyKeys(f.components, true);
    if (miss.length) {
      f.error(null, `compressor \`${name}\` needs enthalpies and entropies, but ${lackingData(miss, 'them')}`, 'add the missing keys to those components under `components:` (`cp:`, `hf:` and `gf:`)');
      ok = false;
    }
    if (!ok || !inlet || !out || (f.has('P') && P === undefined) || (f.has('ratio') && ratio === undefined)
      || (f.has('isentropic-efficiency') && isentropic === undefined) || (f.has('polytropic-efficiency') && polytropic === undefined)) return undefined;
    return { name, type: 'compressor', inlets: [inlet], outlets: [out], P, ratio, isentropic, polytropic };
  },
  build(spec, ctx) {
    const eos = ctx.eos;
    const comps = ctx.model.components;
    const n = comps.length;
    const inState = new OutletState(eos, spec.name, ctx.checks);
    const isState = new OutletState(eos, spec.name, ctx.checks);
    const outState = new OutletState(eos, spec.name, ctx.checks);
    let power = 0;
    let head = Number.NaN;
    let polyN = Number.NaN;
    let factor = Number.NaN;
    let T2s = Number.NaN;
    return {
      spec,
      raisesPressure: true,
      reset() {
        inState.reset();
        isState.reset();
        outState.reset();
      },
      compute(ins: readonly Stream[], outs: Stream[]) {
        const s = ins[0];
        const o = outs[0];
        // Until the outlet is found it is the inlet as it is (so that a unit that cannot run
        // leaves a consistent state behind its condition).
        o.flows.set(s.flows);
        const P1 = s.P;
        const P2 = spec.P ?? P1 * spec.ratio!;
        o.P = P1;
        o.T = s.T;
        o.vf = s.vf;
        o.h = s.h;
        o.hRule = s.hRule;
        o.standIn = s.standIn;
        power = 0;
        // This pass's figures only (with no flow, or the energy left out, there are none).
        head = Number.NaN;
        T2s = Number.NaN;
        polyN = Number.NaN;
        factor = Number.NaN;
        const F = inState.setFlows(s.flows);
        if (!(F > 0)) {
          o.P = P2;
          return null;
        }
        if (P2 < P1 * (1 - 1e-12)) {
          return {
            kind: 'invalid', unit: spec.name,
            message: `compressor \`${spec.name}\`: the outlet pressure ${fmt(P2 / 1e5)} bar abs is below the inlet's, ${fmt(P1 / 1e5)} bar abs`,
            help: 'raise `P` above the inlet pressure, or let the pressure down with a `valve`',
          };
        }
        if (!energyThisPass(ctx)) {
          // No unit's flows depend on this outlet's temperature: it stands at the inlet's until
          // the final pass, which computes it with the power.
          o.P = P2;
          o.h = Number.NaN;
          o.standIn = true;
          return null;
        }
        o.standIn = false;
        outState.z.set(inState.z);
        isState.z.set(inState.z);
        let fail = inState.atTP(s.T, P1, true);
        if (fail) return fail;
        const st = inState.found;
        const beta = st.phase === 'vapor' ? 1 : st.phase === 'liquid' ? 0 : st.beta;
        if (beta < 1 - DEW_POINT_LIQUID) {
          return {
            kind: 'invalid', unit: spec.name,
            message: `the inlet of compressor \`${spec.name}\` is not all vapor: vapor fraction ${beta > 0.999 ? beta.toPrecision(9) : fmt(beta)} at ${fmt(s.T - 273.15)} degC and ${fmt(P1 / 1e5)} bar; a compressor takes gas only`,
            help: 'knock the liquid out upstream (a flash drum or condenser), or heat the inlet above its dew point',
          };
        }
        // A vapor at its dew point (the vapor of a condenser or drum) may flash to a trace of
        // liquid at its own T and P: it is taken as the vapor it is.
        const atDew = st.phase !== 'vapor';
        const h1 = atDew ? phaseH(eos, s.T, P1, inState.z, 'vapor') : st.h;
        const s1 = atDew ? phaseS(eos, s.T, P1, inState.z, 'vapor') : inState.entropy();
        let M = 0;
        for (let i = 0; i < n; i++) M += inState.z[i] * comps[i].MW;
        // The isentropic outlet: Newton on S(T) along the vapor root at P2 (a compressed gas
        // is superheated, as a rule); flashPS from scratch when that does not settle, or when the
        // vapor found there would condense. Compressed from its dew point, a vapor whose
        // saturated-vapor entropy rises with T (n-hexane, the heavier hydrocarbons) lands inside
        // the two-phase region: the isentropic state is then the equilibrium split at P2 with the
        // inlet's entropy, not the supersaturated vapor of the vapor root.
        let iso = vaporAtEntropy(eos, P2, s1, s.T * Math.pow(P2 / P1, 0.25), inState.z);
        if (iso) {
          fail = isState.atTP(iso.T, P2, false);
          if (fail || isState.found.phase !== 'vapor') iso = undefined;
          fail = null;
        }
        if (!iso) {
          const ps = isState.atPS(P2, s1, s.T * Math.pow(P2 / P1, 0.25));
          if (ps.failure) return ps.failure;
          iso = { T: ps.T, h: ps.h };
        }
        T2s = iso.T;
        const dhs = iso.h - h1;
        let dh: number;
        if (spec.isentropic !== undefined) {
          dh = dhs / spec.isentropic;
          head = dhs / M;
          fail = outState.atPH(P2, s.h + dh, T2s);
        } else {
          const ep = spec.polytropic!;
          // Volumes of the states found (the isentropic state may be a split: see above; so may
          // the outlet), each phase on its own root.
          const v1 = eos.molarVolume(s.T, P1, inState.z, 'vapor');
          const v2s = stateVolume(eos, isState.found, inState.z);
          const lnr = Math.log(P2 / P1);
          if (!(lnr > 0)) {
            // no pressure rise: no head
            dh = 0;
            head = 0;
            fail = outState.atPH(P2, s.h, s.T);
          } else {
            const ns = lnr / Math.log(v1 / v2s);
            factor = dhs / ((ns / (ns - 1)) * (P2 * v2s - P1 * v1));
            let T2 = s.T + (T2s - s.T) / ep;
            dh = dhs / ep;
            fail = null;
            // The outlet volume of the last state found (at first, the vapor at the estimate T2);
            // a contraction on the rise dh, which settles when it changes by 1e-9 of itself (the
            // temperature alone would stop too soon inside a narrow two-phase region, where it
            // hardly moves while the vapor fraction does).
            let v2 = eos.molarVolume(T2, P2, inState.z, 'vapor');
            let dhLast = Number.NaN;
            let k = 0;
            for (; k < POLY_MAX; k++) {
              polyN = lnr / Math.log(v1 / v2);
              const Hp = factor * (polyN / (polyN - 1)) * (P2 * v2 - P1 * v1);
              dh = Hp / ep;
              head = Hp / M;
              fail = outState.atPH(P2, s.h + dh, T2);
              if (fail) break;
              T2 = outState.found.T;
              const done = Math.abs(dh - dhLast) <= POLY_TOL * Math.abs(dh);
              dhLast = dh;
              if (done) break;
              v2 = stateVolume(eos, outState.found, inState.z);
            }
            if (!fail && k === POLY_MAX) {
              fail = { kind: 'not-converged', unit: spec.name, message: `compressor \`${spec.name}\`: the polytropic outlet temperature did not settle in ${POLY_MAX} steps`, help: 'use `isentropic-efficiency`, or check the pressures' };
            }
          }
        }
        setFromState(o, outState.found, true);
        power = F * dh;
        return fail as EvaluationFailure | null;
      },
      energy: () => ({ duty: 0, power }),
      summary(_ins, outs) {
        const figures: UnitFigure[] = [
          powerFigure('power', 'power', power),
          { label: spec.isentropic !== undefined ? 'isentropic head, J/kg' : 'polytropic head, J/kg', value: head, kind: 'number', key: spec.isentropic !== undefined ? 'isentropicHead' : 'polytropicHead' },
          { label: 'isentropic outlet temperature', value: T2s, kind: 'temperature', key: 'isentropicT' },
        ];
        if (outs[0]) figures.push({ label: 'outlet temperature', value: outs[0].T, kind: 'temperature', key: 'outletT' });
        if (spec.polytropic !== undefined) {
          figures.push({ label: 'polytropic exponent n', value: polyN, kind: 'number', key: 'polytropicExponent' });
          figures.push({ label: 'Schultz head factor f', value: factor, kind: 'number', key: 'schultzFactor' });
        }
        const notes: string[] = [];
        // A discharge with liquid: the energy balance stands, but the machine would be wet.
        const vf = outs[0]?.vf;
        if (vf !== undefined && vf < 1 - DEW_POINT_LIQUID) {
          notes.push(`the discharge is not all vapor (vapor fraction ${fmt(vf)} at ${fmt(outs[0].T - 273.15)} degC): liquid would form inside the machine; the power is that of the equilibrium states, and a compressor handles gas only`);
        }
        return { figures, notes };
      },
    };
  },
  outputs: () => [
    { name: 'power', dimension: 'power', read: (u: UnitSummary) => u.figures.find((x) => x.key === 'power')?.value ?? Number.NaN },
    { name: 'outlet-T', dimension: 'temperature', read: (u: UnitSummary) => u.figures.find((x) => x.key === 'outletT')?.value ?? Number.NaN },
  ],
  // Plant data: what goes in comes out, component by component.
  balances: () => ({ law: 'components' }),
};

/**
 * The vapor-root state at P with molar entropy s: Newton on S(T) with dS/dT = Cp/T (the
 * analytic heat capacity of the root), from T0. Undefined when the root is not a vapor or the
 * iteration does not settle in 30 steps to |S - s| <= 1e-10 R.
 */
function vaporAtEntropy(eos: Eos, P: number, s: number, T0: number, z: Float64Array): { T: number; h: number } | undefined {
  let T = T0;
  const props = eosWork(eos, 'compressorIsentropic', newPhaseProperties);
  for (let k = 0; k < 30; k++) {
    const p = phasePropertiesInto(eos, T, P, z, 'vapor', true, props);
    if (p.root !== 'vapor' || !(p.Cp > 0)) return undefined;
    const r = p.S - s;
    if (Math.abs(r) <= 1e-10 * 8.314462618) return { T, h: p.H };
    let Tn = T - (r * T) / p.Cp;
    if (!(Tn > 0.5 * T)) Tn = 0.5 * T;
    if (Tn > 2 * T) Tn = 2 * T;
    T = Tn;
  }
  return undefined;
}

/** Molar volume of a state found: of the split, each phase on its own root, or of the one phase. */
function stateVolume(eos: Eos, f: StateFound, z: Float64Array): number {
  if (f.phase === 'two-phase') return f.beta * eos.molarVolume(f.T, f.P, f.y, 'vapor') + (1 - f.beta) * eos.molarVolume(f.T, f.P, f.x, 'liquid');
  return eos.molarVolume(f.T, f.P, z, f.phase);
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
