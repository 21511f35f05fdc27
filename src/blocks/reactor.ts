/**
 * Reactor: reactions written as chemical equations, each with a key reactant and a fractional
 * conversion per pass (of the key's inlet flow), or a fixed extent (mol/s). Parallel on the
 * inlet by default; `sequence: true` applies them one after another.
 *
 * A fixed conversion that would take more of a reactant than reaches the reactor is no
 * steady state: the extents are scaled down to what is available (so the solvers see a
 * continuous map), and the block reports the shortfall as an infeasibility.
 *
 * Equilibrium: a reaction written `equilibrium: true` (with an optional `approach: 20 K`) takes no
 * conversion or extent: its extent is what brings it to chemical equilibrium at the reactor's
 * outlet temperature and pressure (src/thermo/equilibrium.ts: K(T) from the formation Gibbs
 * energies and the ideal-gas heat capacities, fugacity coefficients from the file's equation of
 * state; with an approach, the equilibrium of T + approach for an exothermic reaction and of
 * T - approach for an endothermic one). All the reactions at equilibrium of a reactor are solved
 * together, on what reaches them after the reactions at fixed conversion or extent (applied first,
 * in parallel or in sequence as the reactor says). An adiabatic converter finds its outlet
 * temperature and its equilibrium together. `key` is optional for an equilibrium reaction (the
 * conversion of its first reactant is reported without one).
 *
 * Energy: `T:` holds the outlet at T (isothermal; the duty that takes is reported), and so does
 * a reactor with none of `T`, `adiabatic` and `duty`, at its inlet temperature (with several
 * inlets, that of the inlets mixed adiabatically at the inlet pressure); `adiabatic: true`
 * or `duty:` (W, heat into the reactor's material) finds the outlet T from the enthalpy
 * balance with a PH flash. Enthalpies are on the formation basis (src/thermo/enthalpy.ts), so
 * the heat of reaction is in them; each reaction's heat at the outlet temperature is reported
 * as the ideal-gas sum_i nu_i h_i(T) per mole of extent. Outlet pressure: `P:`, or the inlet's
 * less `dp:`.
 */
import type { UnitSpecBase } from '../flowsheet/model.js';
import { parseEquation, elementImbalance, EquationError } from '../thermo/reaction.js';
import type { EvaluationFailure } from '../solve/types.js';
import { hIG } from '../thermo/ideal-gas.js';
import { makeEos } from '../thermo/eos.js';
import { prepareEquilibrium, type EquilibriumResult, type EquilibriumSolver } from '../thermo/equilibrium.js';
import { newAdiabaticResult, solveAdiabaticEquilibrium, type AdiabaticResult } from '../thermo/equilibrium-adiabatic.js';
import { energyThisPass, type BlockDef, type Stream, type UnitFigure, type UnitSummary } from './types.js';
import { combineInlets } from './combine.js';
import { checkCorrelationRange, lackingData, enthalpyIn, hasEnergyData, missingEnergyKeys, OutletState, powerFigure, setFromState, type StateFound } from './energy.js';

export interface ReactionSpec {
  equation: string;
  nu: Float64Array;
  /** The component whose conversion is reported (an equilibrium reaction without `key`: its first reactant). */
  key: number;
  conversion?: number;
  extent?: number;
  /** Held at chemical equilibrium (its extent follows from K). */
  equilibrium?: boolean;
  /** Approach to equilibrium, K (equilibrium reactions only). */
  approach?: number;
}

export interface ReactorSpec extends UnitSpecBase {
  type: 'reactor';
  reactions: ReactionSpec[];
  sequence: boolean;
  T?: number;
  P?: number;
  /** Pressure drop, Pa (outlet P = inlet P - dp when P is not set). */
  dp?: number;
  adiabatic: boolean;
  /** Heat into the reactor's material, W (outlet T found). */
  duty?: number;
}

/** Relative shortfall below which a reactant is taken as exactly used up (rounding). */
const SHORTFALL_TOL = 1e-12;
/** Outlet temperatures an adiabatic converter at equilibrium is searched between, K. */
const ADIABATIC_TMIN = 150;
const ADIABATIC_TMAX = 2500;

export const reactor: BlockDef<ReactorSpec> = {
  type: 'reactor',
  description: 'reactions by fixed conversion of a key reactant, fixed extent, or chemical equilibrium',
  keys: ['in', 'out', 'reactions', 'sequence', 'T', 'P', 'dp', 'adiabatic', 'duty'],
  read(name, f) {
    const inlet = f.streams('in', { required: true });
    const out = f.stream('out', { required: true });
    const T = f.quantity('T', 'temperature', { above: 0, example: '250 degC' });
    const P = f.quantity('P', 'pressure', { above: 0, example: '29 barg' });
    const energyOk = readEnergyMode(name, f, 'reactor');
    if (!energyOk || !checkCorrelationRange(f, 'T', T, name)) return undefined;
    const { adiabatic, duty, dp } = energyOk;
    const sequence = f.boolean('sequence') ?? false;
    const items = f.items('reactions', { required: true });
    if (!items) return undefined;
    const reactions: ReactionSpec[] = [];
    let ok = true;
    const readers: typeof items = [];
    for (const it of items) {
      it.checkKeys(['equation', 'key', 'conversion', 'extent', 'equilibrium', 'approach']);
      const eq = it.string('equation', { required: true, example: '"CO2 + 3 H2 -> CH3OH + H2O"' });
      const atEquilibrium = it.boolean('equilibrium') ?? false;
      const key = atEquilibrium && !it.has('key') ? undefined : it.component('key', { required: true });
      const hasX = it.has('conversion');
      const hasE = it.has('extent');
      let approach: number | undefined;
      if (atEquilibrium) {
        if (hasX || hasE) {
          it.errorAtKey(hasX ? 'conversion' : 'extent', `${it.what} is at \`equilibrium\`, so it takes no \`${hasX ? 'conversion' : 'extent'}\`: its extent follows from the equilibrium constant`, 'remove it, or remove `equilibrium: true` to fix the conversion');
          ok = false;
        }
        if (it.has('approach')) {
          // A temperature difference: in kelvin (a reading such as `20 degC` would be a temperature).
          approach = it.quantity('approach', 'temperature', { min: 0, max: 200, example: '20 K', difference: true });
          if (approach === undefined) ok = false;
        }
      } else {
        if (it.has('approach')) {
          it.errorAtKey('approach', `${it.what} has an \`approach\` but is not at equilibrium`, 'add `equilibrium: true`, or remove `approach`');
          ok = false;
        }
        if (hasX === hasE) {
          it.error(null, `${it.what} needs exactly one of \`conversion\` (per pass, 0 to 1) and \`extent\` (mol/s)`, 'for example `conversion: 0.25`, or `equilibrium: true` to let the equilibrium decide');
          ok = false;
        }
      }
      const conversion = hasX && !atEquilibrium ? it.number('conversion', { min: 0, max: 1, example: '0.25' }) : undefined;
      const extent = hasE && !atEquilibrium ? it.quantity('extent', 'molarFlow', { min: 0, example: '0.8 mol/s' }) : undefined;
      if (eq === undefined || (!atEquilibrium && key === undefined) || (hasX && !atEquilibrium && conversion === undefined) || (hasE && !atEquilibrium && extent === undefined)) {
        ok = false;
        continue;
      }
      let nu: Float64Array;
      let species: number[];
      try {
        ({ nu, species } = parseEquation(eq, f.componentIds));
      } catch (e) {
        if (!(e instanceof EquationError)) throw e;
        it.error('equation', e.message, e.help);
        ok = false;
        continue;
      }
      const bad = elementImbalance(nu, f.elements);
      const els = Object.keys(bad);
      if (els.length > 0) {
        const desc = els.map((el) => `${el} (${bad[el] > 0 ? '+' : ''}${Number(bad[el].toPrecision(6))} on the product side)`).join(', ');
        it.error('equation', `equation \`${eq}\` is not balanced in ${desc}`, 'check the coefficients and the component formulas');
        ok = false;
        continue;
      }
      if (key !== undefined && !(nu[key] < 0)) {
        it.error('key', `the key \`${f.componentIds[key]}\` is not a reactant of \`${eq}\``, 'the key must appear on the left of the arrow');
        ok = false;
        continue;
      }
      if (atEquilibrium) {
        // K(T) needs the formation data of every species of the reaction.
        const lacking = [...nu.keys()].filter((i) => nu[i] !== 0).map((i) => f.components[i]).filter((c) => c.cp === undefined || c.hf === undefined || c.gf === undefined);
        if (lacking.length) {
          const names: Record<string, string> = { cp: '`cp` (ideal-gas heat capacity)', hf: '`hf` (enthalpy of formation)', gf: '`gf` (Gibbs energy of formation)' };
          it.errorAtKey('equilibrium', `${it.what} is at equilibrium, but ${lacking.map((c) => `\`${c.id}\` has no ${['cp', 'hf', 'gf'].filter((k) => c[k as 'cp' | 'hf' | 'gf'] === undefined).map((k) => names[k]).join(', no ')}`).join('; ')}`,
            'K(T) needs cp, hf and gf of every species of the reaction: add them to those components under `components:` (e.g. `gf: -16.4 kJ/mol`, ideal gas at 298.15 K and 1 bar), or give the reaction a fixed `conversion`');
          ok = false;
          continue;
        }
      }
      // Without a key: the reactant written first in the equation.
      const firstReactant = species.find((i) => nu[i] < 0) ?? 0;
      reactions.push({ equation: eq, nu, key: key ?? firstReactant, conversion, extent, ...(atEquilibrium ? { equilibrium: true, approach } : {}) });
      readers.push(it);
    }
    const atEq = reactions.filter((rx) => rx.equilibrium);
    if (ok && atEq.length) {
      // The equilibrium solver's own checks of the set (independent reactions), at read time.
      const prepared = prepareEquilibrium(makeEos('ideal', f.components), atEq.map((rx) => ({ nu: rx.nu, approach: rx.approach, label: `\`${rx.equation}\`` })));
      if (prepared.status === 'invalid') {
        for (const pr of prepared.problems) {
          const r = pr.reaction >= 0 ? reactions.indexOf(atEq[pr.reaction]) : -1;
          if (r >= 0) readers[r].error(null, `${readers[r].what}: ${pr.message}`, pr.help);
          else f.error('reactions', `unit \`${name}\`: ${pr.message}`, pr.help);
        }
        return undefined;
      }
    }
    if (!ok || !inlet || !out) return undefined;
    if (!sequence) {
      // Parallel reactions sharing a key: their conversions add up.
      const byKey = new Map<number, number>();
      for (const rx of reactions) if (rx.conversion !== undefined) byKey.set(rx.key, (byKey.get(rx.key) ?? 0) + rx.conversion);
      for (const [k, sum] of byKey) {
        if (sum > 1 + 1e-12) {
          f.error('reactions', `the conversions of \`${f.componentIds[k]}\` in parallel reactions of \`${name}\` add up to ${Number(sum.toPrecision(8))}, more than 1`, 'lower them, or set `sequence: true` so that each applies to what the one before leaves');
          return undefined;
        }
      }
    }
    return { name, type: 'reactor', inlets: inlet, outlets: [out], reactions, sequence, T, P, dp, adiabatic, duty };
  },
  build(spec, ctx) {
    const ids = ctx.model.ids;
    const n = ids.length;
    const R = spec.reactions.length;
    const ext = new Float64Array(R);
    const req = new Float64Array(R);
    const gen = new Float64Array(n);
    const keyIn = new Float64Array(R);
    const cons = new Float64Array(n);
    const inlet = new Float64Array(n);
    const keys = keyComponents(spec);
    const energy = ctx.energy;
    const state = new OutletState(ctx.eos, spec.name, ctx.checks);
    /** The inlets mixed (several inlets, no T, duty or adiabatic). */
    const mixState = new OutletState(ctx.eos, spec.name, ctx.checks);
    const heat = new Float64Array(R).fill(Number.NaN);
    let duty = 0;
    const comps = ctx.model.components;

    // Reactions at equilibrium: one solver for all of them, warm-started from the last pass.
    const eqIdx: number[] = [];
    spec.reactions.forEach((rx, r) => {
      if (rx.equilibrium) eqIdx.push(r);
    });
    let eqSolver: EquilibriumSolver | undefined;
    let eqResult: EquilibriumResult | undefined;
    let adResult: AdiabaticResult | undefined;
    const eqStart = new Float64Array(eqIdx.length);
    let eqWarm = false;
    const eqLnK = new Float64Array(R).fill(Number.NaN);
    const eqTeq = new Float64Array(R).fill(Number.NaN);
    const eqNote: string[] = [];
    if (eqIdx.length) {
      const prepared = prepareEquilibrium(ctx.eos, eqIdx.map((r) => {
        const rx = spec.reactions[r];
        return { nu: rx.nu, approach: rx.approach, key: rx.key, label: `\`${rx.equation}\`` };
      }));
      // read() ran the same checks on the same reactions; a set refused here is a program fault.
      if (prepared.status !== 'ok') throw new Error(`reactor ${spec.name}: ${prepared.problems.map((p) => p.message).join('; ')}`);
      eqSolver = prepared.solver;
      eqResult = eqSolver.newResult();
      if (spec.adiabatic || spec.duty !== undefined) adResult = newAdiabaticResult(eqSolver);
    }

    const shortfall = (i: number, need: number, have: number, rx: ReactionSpec | null): EvaluationFailure => {
      const what = rx
        ? `reaction \`${rx.equation}\` (${rx.conversion !== undefined ? `conversion ${rx.conversion} of ${ids[rx.key]}` : `extent ${rx.extent} mol/s`})`
        : `its reactions (${spec.reactions.map((r) => r.equation).join('; ')})`;
      return {
        kind: 'infeasible',
        unit: spec.name,
        component: ids[i],
        message: `reactor \`${spec.name}\`: ${what} needs ${fmt(need)} mol/s of ${ids[i]}, but only ${fmt(have)} mol/s reaches it`,
        help: rx && rx.conversion !== undefined && rx.key !== i
          ? `${ids[i]} runs out before the key ${ids[rx.key]} reaches its conversion: make ${ids[i]} the key reactant, lower the conversion, or feed more ${ids[i]}`
          : `lower the ${rx?.extent !== undefined ? 'extent' : 'conversion'}, or feed more ${ids[i]}`,
      };
    };

    let lastOutT = Number.NaN;
    /** dg/dT of the last adiabatic equilibrium solve (W/K): the next pass's first step. */
    let lastSlope = Number.NaN;
    const reactionHeats = (T: number) => {
      for (let r = 0; r < R; r++) {
        const nu = spec.reactions[r].nu;
        let q = 0;
        for (let i = 0; i < n; i++) if (nu[i] !== 0) q += nu[i] * hIG(comps[i], T);
        heat[r] = q;
      }
    };
    /** Takes a converged equilibrium into the outlet flows f, the extents and the generation; else the failure. */
    const takeEquilibrium = (res: EquilibriumResult, f: Float64Array): EvaluationFailure | null => {
      eqNote.length = 0;
      if (res.status !== 'converged') {
        eqWarm = false;
        return equilibriumFailure(res.status, res.message);
      }
      for (let q = 0; q < eqIdx.length; q++) {
        const r = eqIdx[q];
        const e = res.extents[q];
        ext[r] = e;
        req[r] = e;
        keyIn[r] = f[spec.reactions[r].key];
        eqLnK[r] = res.lnK[q];
        eqTeq[r] = res.Teq[q];
        const nu = spec.reactions[r].nu;
        for (let i = 0; i < n; i++) gen[i] += nu[i] * e;
      }
      eqStart.set(res.extents);
      eqWarm = true;
      if (res.message) eqNote.push(res.message);
      for (let i = 0; i < n; i++) {
        const v = res.flows[i];
        f[i] = v > 0 ? v : 0;
      }
      return null;
    };
    const equilibriumFailure = (status: EquilibriumResult['status'], text: string): EvaluationFailure => {
      // The solver's own advice, when it gives one, ends its message as "(to fix: ...)".
      const own = /^([\s\S]*?) \(to fix: ([^)]*)\)([\s\S]*)$/.exec(text);
      const message = own ? own[1] + own[3] : text;
      return {
        kind: status === 'converged' ? 'invalid' : status,
        unit: spec.name,
        message: `reactor \`${spec.name}\`: ${message}`,
        help: own ? own[2] : status === 'infeasible'
        ? 'the converter model is one gas phase: raise its temperature or lower its pressure, or check the feed'
          : status === 'not-converged' ? 'the equilibrium was not found from this state: try --method direct, or check the converter\'s T and P' : 'check the converter\'s T, P and feed',
      };
    };
    /**
     * The equilibrium holds for one gas phase. With the energy balance the outlet's flash (with its
     * stability test on a thorough pass) says whether it is one; without, on a thorough pass (the
     * final pass of a solve above all), the tangent-plane test of the outlet.
     */
    const phaseAtEnd = (T: number, P: number, flows: Float64Array, found?: StateFound): EvaluationFailure | null => {
      if (!eqSolver) return null;
      let why: string | null = null;
      if (found) {
        if (found.phase !== 'vapor') why = `at ${fmt(T)} K and ${fmt(P / 1e5)} bar the converter outlet is ${found.phase === 'liquid' ? 'a liquid' : `two phases (vapor fraction ${fmt(found.beta)})`}; the equilibrium model is for one gas phase`;
      } else if (ctx.checks === undefined || ctx.checks.thorough) {
        why = eqSolver.phaseProblem(T, P, flows);
      }
      return why ? { kind: 'infeasible', unit: spec.name, message: `reactor \`${spec.name}\`: ${why}`, help: 'raise the converter\'s temperature or lower its pressure' } : null;
    };

    return {
      spec,
      reset() {
        state.reset();
        mixState.reset();
        eqWarm = false;
        lastSlope = Number.NaN;
      },
      compute(ins: readonly Stream[], outs: Stream[]) {
        const o = outs[0];
        const f = o.flows;
        combineInlets(ins, o);
        inlet.set(f);
        let inletT = o.T;
        const inletP = o.P;
        let problem: EvaluationFailure | null = null;
        gen.fill(0);
        if (!spec.sequence) {
          // Extents on the inlet, then scaled together if a reactant would go negative.
          cons.fill(0);
          for (let r = 0; r < R; r++) {
            const rx = spec.reactions[r];
            keyIn[r] = f[rx.key];
            req[r] = rx.equilibrium ? 0 : rx.conversion !== undefined ? (rx.conversion * f[rx.key]) / -rx.nu[rx.key] : rx.extent!;
            ext[r] = req[r];
            for (let i = 0; i < n; i++) if (rx.nu[i] < 0) cons[i] -= rx.nu[i] * req[r];
          }
          let scale = 1;
          let worst = -1;
          for (let i = 0; i < n; i++) {
            if (cons[i] > f[i] * (1 + SHORTFALL_TOL) + 1e-300) {
              const s = f[i] / cons[i];
              if (s < scale) {
                scale = s;
                worst = i;
              }
            }
          }
          if (worst >= 0) {
            problem = shortfall(worst, cons[worst], f[worst], R === 1 ? spec.reactions[0] : null);
            for (let r = 0; r < R; r++) ext[r] *= scale;
          }
          for (let r = 0; r < R; r++) {
            const nu = spec.reactions[r].nu;
            for (let i = 0; i < n; i++) gen[i] += nu[i] * ext[r];
          }
          for (let i = 0; i < n; i++) {
            const v = f[i] + gen[i];
            f[i] = v > 0 ? v : 0;
          }
        } else {
          for (let r = 0; r < R; r++) {
            const rx = spec.reactions[r];
            keyIn[r] = f[rx.key];
            if (rx.equilibrium) {
              ext[r] = req[r] = 0;
              continue;
            }
            req[r] = rx.conversion !== undefined ? (rx.conversion * f[rx.key]) / -rx.nu[rx.key] : rx.extent!;
            let e = req[r];
            let worst = -1;
            for (let i = 0; i < n; i++) {
              if (rx.nu[i] < 0) {
                const need = -rx.nu[i] * e;
                if (need > f[i] * (1 + SHORTFALL_TOL) + 1e-300) {
                  const cap = f[i] / -rx.nu[i];
                  if (cap < e || worst < 0) {
                    if (worst < 0 && !problem) problem = shortfall(i, need, f[i], rx);
                    e = Math.min(e, cap);
                    worst = i;
                  }
                }
              }
            }
            ext[r] = e;
            for (let i = 0; i < n; i++) {
              gen[i] += rx.nu[i] * e;
              const v = f[i] + rx.nu[i] * e;
              f[i] = v > 0 ? v : 0;
            }
          }
        }
        o.P = spec.P ?? inletP - (spec.dp ?? 0);
        duty = 0;
        if (!(o.P > 0)) {
          o.P = inletP;
          problem ??= pressureBelowZero(spec.name, inletP, spec.dp ?? 0);
        }
        const fixedT = !spec.adiabatic && spec.duty === undefined;
        // With none of `T`, `duty` and `adiabatic` the reactor is isothermal at its inlet
        // temperature; with several inlets, at that of the inlets mixed adiabatically at the inlet
        // pressure (the flow-weighted mean of their temperatures is only a start: a reactor where
        // nothing reacts would report the duty of taking the mixture to it).
        const mixedInlets = fixedT && spec.T === undefined && ins.length > 1;
        if (mixedInlets && energyThisPass(ctx)) {
          const Fm = mixState.setFlows(inlet);
          if (Fm > 0) {
            const fl = mixState.atPH(inletP, enthalpyIn(ins) / Fm, inletT);
            if (fl) return problem ?? fl;
            inletT = mixState.found.T;
          }
        }
        if (eqSolver && fixedT) {
          // The equilibrium at the outlet temperature, on what the fixed reactions leave.
          const Tout = spec.T ?? inletT;
          const res = eqSolver.solve({ T: Tout, P: o.P, flows: f, start: eqWarm ? eqStart : undefined }, eqResult);
          const failed = takeEquilibrium(res, f);
          if (failed) return problem ?? failed;
        }
        if (!energyThisPass(ctx)) {
          // (an adiabatic reactor of fixed extents, in a pass without the energy balance: its
          // outlet stands at the inlet temperature until the final pass finds it)
          if (spec.T !== undefined) o.standIn = false;
          else if (!fixedT || (mixedInlets && energy)) o.standIn = true;
          o.T = spec.T ?? inletT;
          o.vf = Number.NaN;
          o.h = Number.NaN;
          return problem ?? phaseAtEnd(o.T, o.P, f);
        }
        o.standIn = false;
        const Hin = enthalpyIn(ins);
        if (eqSolver && !fixedT) {
          // Adiabatic or fixed duty: the outlet T and the equilibrium found together.
          let flashFailure: EvaluationFailure | null = null;
          const target = Hin + (spec.duty ?? 0);
          const warmT = Number.isFinite(lastOutT);
          const T0 = warmT ? lastOutT : inletT;
          const ad = solveAdiabaticEquilibrium(eqSolver, { P: o.P, flows: f, start: eqWarm ? eqStart : undefined }, (T, flows) => {
            const Ft = state.setFlows(flows);
            if (!(Ft > 0)) return Number.NaN;
            const fl = state.atTP(T, o.P, true);
            if (fl) {
              flashFailure = fl;
              return Number.NaN;
            }
            return Ft * state.found.h - target;
          }, { Tmin: ADIABATIC_TMIN, Tmax: ADIABATIC_TMAX, T0, tolT: 1e-7, slope0: warmT ? lastSlope : undefined }, adResult);
          if (ad.status !== 'converged') {
            if (flashFailure) return problem ?? flashFailure;
            return problem ?? equilibriumFailure(ad.status, `the adiabatic equilibrium: ${ad.message}`);
          }
          const failed = takeEquilibrium(ad.equilibrium, f);
          if (failed) return problem ?? failed;
          lastOutT = ad.T;
          if (ad.slope > 0) lastSlope = ad.slope;
          // state.found is the state of the last trial: the outlet at ad.T with these flows.
          setFromState(o, state.found, true);
          duty = spec.duty ?? 0;
          reactionHeats(o.T);
          return problem ?? phaseAtEnd(o.T, o.P, f, state.found);
        }
        const F = state.setFlows(f);
        if (!(F > 0)) {
          o.T = spec.T ?? inletT;
          o.vf = Number.NaN;
          o.h = Number.isFinite(ins[0]?.h) ? ins[0].h : 0;
          return problem;
        }
        const fail = fixedT ? state.atTP(spec.T ?? inletT, o.P, true) : state.atPH(o.P, (Hin + (spec.duty ?? 0)) / F, inletT);
        setFromState(o, state.found, true);
        duty = fixedT ? F * o.h - Hin : spec.duty ?? 0;
        if (!fixedT) lastOutT = o.T;
        reactionHeats(o.T);
        return problem ?? fail ?? phaseAtEnd(o.T, o.P, f, state.found);
      },
      generation: () => gen,
      energy: () => ({ duty, power: 0 }),
      summary(_ins, outs) {
        const out = outs[0]?.flows;
        const conversions: Record<string, number> = {};
        // (in - out) / in of each key; undefined (NaN) for a key no inlet carries (formed and used
        // within the reactor), not 0.
        for (const k of keys) conversions[ids[k]] = out && inlet[k] > 0 ? (inlet[k] - out[k]) / inlet[k] : Number.NaN;
        const figures: UnitFigure[] = spec.reactions.map((rx, r) => ({ label: `extent of ${rx.equation}`, value: ext[r], kind: 'molarFlow' as const, key: `extent.${r}` }));
        if (energy) figures.push(powerFigure('duty', spec.adiabatic ? 'duty (adiabatic)' : 'duty', duty));
        const notes: string[] = [];
        if (spec.T === undefined && !spec.adiabatic && spec.duty === undefined) {
          notes.push(energy
            ? `isothermal at the ${spec.inlets.length > 1 ? 'temperature of its inlets mixed adiabatically' : 'inlet temperature'} (no \`T\`, \`duty\` or \`adiabatic\` given)`
            : 'outlet T carried from the inlet; no energy balance');
        }
        if (spec.adiabatic) notes.push('adiabatic');
        for (const r of eqIdx) {
          const rx = spec.reactions[r];
          figures.push({ label: `equilibrium temperature of ${rx.equation}`, value: eqTeq[r], kind: 'temperature', key: `equilibrium-temperature.${r}` });
          figures.push({ label: `equilibrium constant of ${rx.equation}`, value: Math.exp(eqLnK[r]), kind: 'number', key: `equilibrium-constant.${r}` });
        }
        notes.push(...eqNote);
        return {
          figures,
          notes,
          reactions: spec.reactions.map((rx, r) => ({
            equation: rx.equation,
            key: ids[rx.key],
            extent: ext[r],
            conversion: keyIn[r] > 0 ? (ext[r] * -rx.nu[rx.key]) / keyIn[r] : 0,
            requested: rx.conversion,
            ...(energy && Number.isFinite(heat[r]) ? { heatOfReaction: heat[r] } : {}),
            ...(rx.equilibrium ? { equilibrium: true, equilibriumConstant: Math.exp(eqLnK[r]), equilibriumTemperature: eqTeq[r], approach: rx.approach ?? 0 } : {}),
          })),
          conversions,
        };
      },
    };
  },
  outputs(spec, model) {
    const energy = hasEnergyData(model.components);
    return [
      ...(energy ? [{ name: 'duty', dimension: 'power' as const, read: (u: UnitSummary) => u.figures.find((x) => x.key === 'duty')?.value ?? Number.NaN }] : []),
      ...(energy ? spec.reactions.map((_, r) => ({
        name: `heat-of-reaction.${r}`,
        dimension: 'molarEnergy' as const,
        read: (u: UnitSummary) => u.reactions?.[r]?.heatOfReaction ?? Number.NaN,
      })) : []),
      ...keyComponents(spec).map((k) => ({
        name: `conversion.${model.ids[k]}`,
        dimension: 'dimensionless' as const,
        read: (u: UnitSummary) => u.conversions?.[model.ids[k]] ?? Number.NaN,
      })),
      ...spec.reactions.map((_, r) => ({
        name: `extent.${r}`,
        dimension: 'molarFlow' as const,
        read: (u: UnitSummary) => u.reactions?.[r]?.extent ?? Number.NaN,
      })),
      ...spec.reactions.flatMap((rx, r) => rx.equilibrium ? [
        { name: `equilibrium-temperature.${r}`, dimension: 'temperature' as const, read: (u: UnitSummary) => u.reactions?.[r]?.equilibriumTemperature ?? Number.NaN },
        { name: `equilibrium-constant.${r}`, dimension: 'dimensionless' as const, read: (u: UnitSummary) => u.reactions?.[r]?.equilibriumConstant ?? Number.NaN },
      ] : []),
    ];
  },
  // Reactions at equilibrium at a temperature the energy balance finds, or at the inlet's: the
  // extents depend on it. Fixed conversions or extents do not, at any temperature.
  needsEnergyEveryPass: (spec) => spec.reactions.some((rx) => rx.equilibrium) && (spec.adiabatic || spec.duty !== undefined || spec.T === undefined),
  balances(spec) {
    // Conversion per pass of each reaction's key: its extent times the key's coefficient over
    // what reaches it (the inlet; in sequence, what the reactions before it leave).
    return {
      law: 'elements',
      reactions: spec.reactions.map((rx) => ({ nu: rx.nu, label: rx.equation })),
      figures: spec.reactions.map((rx, r) => ({
        path: `${spec.name}.reactions.${r}.${rx.conversion !== undefined ? 'conversion' : 'extent'}`,
        value: (v) => {
          if (rx.conversion === undefined) return v.extent(r);
          let key = v.inlet(rx.key);
          if (spec.sequence) for (let q = 0; q < r; q++) key += spec.reactions[q].nu[rx.key] * v.extent(q);
          return (v.extent(r) * -rx.nu[rx.key]) / key;
        },
      })),
    };
  },
  structureKey: (spec) => reactorStructureKey(spec),
  structure(spec, model) {
    return {
      passes: () => true,
      transform: (inlet) => reactorOutlet(spec, inlet),
      check(have0, report) {
        const n = model.ids.length;
        const have = Uint8Array.from(have0);
        for (const rx of spec.reactions) {
          // A reaction at equilibrium that cannot proceed has extent 0, and its solve says so.
          if (active(rx) && !rx.equilibrium) {
            const missing: number[] = [];
            for (let i = 0; i < n; i++) if (rx.nu[i] < 0 && !have[i]) missing.push(i);
            if (missing.includes(rx.key)) {
              report(`the key reactant \`${model.ids[rx.key]}\` of reaction \`${rx.equation}\` never reaches reactor \`${spec.name}\`: no feed carries it and no reaction upstream forms it`,
                `add \`${model.ids[rx.key]}\` to the composition of a feed upstream of \`${spec.name}\`, or remove the reaction`);
            } else if (missing.length > 0) {
              const names = missing.map((i) => `\`${model.ids[i]}\``).join(', ');
              const many = missing.length > 1;
              report(`reactant${many ? 's' : ''} ${names} of reaction \`${rx.equation}\` never reach${many ? '' : 'es'} reactor \`${spec.name}\`: no feed carries ${many ? 'them' : 'it'} and no reaction upstream forms ${many ? 'them' : 'it'}`,
                `feed ${names} upstream of \`${spec.name}\`, or change the equation`);
            }
          }
          if (spec.sequence && active(rx) && !rx.equilibrium && rx.nu.every((x, i) => x >= 0 || have[i])) {
            for (let i = 0; i < n; i++) if (rx.nu[i] > 0) have[i] = 1;
          }
        }
      },
    };
  },
};

/**
 * The energy keys shared by the reactor and the condenser: `adiabatic`, `duty` (W) and `dp`
 * (Pa), checked against `T` and `P` (a duty and a T are two answers to one question). Returns
 * undefined when a problem was reported.
 */
export function readEnergyMode(name: string, f: import('../flowsheet/fields.js').FieldReader, what: string): { adiabatic: boolean; duty?: number; dp?: number } | undefined {
  const adiabatic = f.boolean('adiabatic') ?? false;
  const duty = f.quantity('duty', 'power', { example: '-1.2 MW' });
  const dp = f.quantity('dp', 'pressure', { min: 0, example: '0.5 bar', difference: true });
  let ok = true;
  if (f.has('T') && f.has('duty')) {
    f.errorAtKey('duty', `${what} \`${name}\` has both \`T\` and \`duty\`: give one (the other follows from the energy balance)`, 'keep `T:` to hold the outlet temperature (the duty is reported), or `duty:` to find the temperature');
    ok = false;
  }
  if (adiabatic && (f.has('T') || f.has('duty'))) {
    f.errorAtKey('adiabatic', `${what} \`${name}\` is \`adiabatic\` and has \`${f.has('T') ? 'T' : 'duty'}\` too: give one`, 'an adiabatic unit has duty 0 and finds its temperature; remove `adiabatic: true` to hold T');
    ok = false;
  }
  if (f.has('P') && f.has('dp')) {
    f.errorAtKey('dp', `${what} \`${name}\` has both \`P\` and \`dp\`: give one`, 'an outlet pressure `P:`, or a pressure drop `dp:` from the inlet');
    ok = false;
  }
  if ((adiabatic || f.has('duty')) && !hasEnergyData(f.components)) {
    const miss = missingEnergyKeys(f.components);
    f.error(adiabatic ? 'adiabatic' : 'duty', `${what} \`${name}\` needs the energy balance, but ${lackingData(miss)}`, 'add the missing keys to those components under `components:` (e.g. `cp: 35 J/(mol K)`, `hf: -110.5 kJ/mol`), or set `T:` instead');
    ok = false;
  }
  if (!ok || (f.has('duty') && duty === undefined) || (f.has('dp') && dp === undefined)) return undefined;
  return { adiabatic, duty, dp };
}

/** A pressure drop larger than the inlet pressure. */
export function pressureBelowZero(unit: string, inletP: number, dp: number) {
  return {
    kind: 'invalid' as const,
    unit,
    message: `\`${unit}\`: the pressure drop ${fmt(dp / 1e5)} bar is more than the inlet pressure ${fmt(inletP / 1e5)} bar abs`,
    help: 'lower `dp`, or set the outlet pressure `P:`',
  };
}

/** The key components of a reactor, each once, in the order of its reactions. */
function keyComponents(spec: ReactorSpec): number[] {
  const out: number[] = [];
  for (const rx of spec.reactions) if (!out.includes(rx.key)) out.push(rx.key);
  return out;
}

/** Whether a reaction runs at all (a zero conversion or extent does nothing; one at equilibrium may run). */
function active(rx: ReactionSpec): boolean {
  if (rx.equilibrium) return true;
  return rx.conversion !== undefined ? rx.conversion > 0 : (rx.extent ?? 0) > 0;
}

/**
 * What a reactor's outlet can carry, given what reaches its inlet: the inlet's components,
 * the products of reactions whose reactants all reach it, less a key used up completely
 * (conversion 1) and not formed again. Also returns what the reactions use up and form.
 */
/**
 * What reactorOutlet and the reactor's structure check read of the values: each reaction's
 * running at all (active), its equilibrium flag and full conversion (sequence), and, for
 * reactions side by side, whether the conversions of the reactions on one key add up to 1 for
 * every set of them that could run together (the sums in reactorOutlet's order).
 */
function reactorStructureKey(spec: ReactorSpec): string | undefined {
  const parts = spec.reactions.map((rx) => `${rx.equilibrium ? 1 : 0}${active(rx) ? 1 : 0}${rx.conversion !== undefined && rx.conversion >= 1 ? 1 : 0}`);
  let key = `${spec.sequence ? 's' : 'p'} ${parts.join(' ')}`;
  if (!spec.sequence) {
    const byKey = new Map<number, number[]>();
    spec.reactions.forEach((rx, r) => {
      if (!rx.equilibrium && rx.conversion !== undefined) byKey.set(rx.key, [...(byKey.get(rx.key) ?? []), r]);
    });
    for (const [k, rs] of byKey) {
      if (rs.length > 10) return undefined; // too many sets to enumerate: always checked again
      const flags: number[] = [];
      for (let set = 1; set < 1 << rs.length; set++) {
        let sum = 0;
        for (let j = 0; j < rs.length; j++) if (set & (1 << j)) sum += spec.reactions[rs[j]].conversion!;
        flags.push(sum >= 1 - 1e-12 ? 1 : 0);
      }
      key += ` k${k}:${flags.join('')}`;
    }
  }
  return key;
}

function reactorOutlet(spec: ReactorSpec, inlet: Uint8Array): { out: Uint8Array; consumed: Uint8Array; formed: Uint8Array } {
  const n = inlet.length;
  const cur = Uint8Array.from(inlet);
  const consumed = new Uint8Array(n);
  const formed = new Uint8Array(n);
  // The direction a reaction can run in: 1 forward (its reactants reach it), -1 backward (an
  // equilibrium reaction whose products reach it and reactants do not), 0 not at all.
  const direction = (rx: ReactionSpec, have: Uint8Array): number => {
    if (!active(rx)) return 0;
    if (rx.nu.every((x, i) => x >= 0 || have[i])) return 1;
    if (rx.equilibrium && rx.nu.every((x, i) => x <= 0 || have[i])) return -1;
    return 0;
  };
  if (spec.sequence) {
    for (const rx of spec.reactions) {
      const d = rx.equilibrium ? 0 : direction(rx, cur);
      if (d === 0) continue;
      for (let i = 0; i < n; i++) {
        if (d * rx.nu[i] < 0) consumed[i] = 1;
        if (d * rx.nu[i] > 0) {
          cur[i] = 1;
          formed[i] = 1;
        }
      }
      if (rx.conversion !== undefined && rx.conversion >= 1) cur[rx.key] = 0;
    }
  } else {
    const fullKey = new Float64Array(n);
    for (const rx of spec.reactions) {
      const d = rx.equilibrium ? 0 : direction(rx, inlet);
      if (d === 0) continue;
      for (let i = 0; i < n; i++) {
        if (d * rx.nu[i] < 0) consumed[i] = 1;
        if (d * rx.nu[i] > 0) formed[i] = 1;
      }
      if (rx.conversion !== undefined) fullKey[rx.key] += rx.conversion;
    }
    for (let i = 0; i < n; i++) {
      if (formed[i]) cur[i] = 1;
      else if (fullKey[i] >= 1 - 1e-12) cur[i] = 0;
    }
  }
  // The reactions at equilibrium take what the others leave, all together: repeated until
  // nothing more can form (one may form what another needs).
  for (let changed = true; changed;) {
    changed = false;
    for (const rx of spec.reactions) {
      const d = rx.equilibrium ? direction(rx, cur) : 0;
      if (d === 0) continue;
      for (let i = 0; i < n; i++) {
        if (d * rx.nu[i] < 0) consumed[i] = 1;
        if (d * rx.nu[i] > 0) {
          formed[i] = 1;
          if (!cur[i]) changed = true;
          cur[i] = 1;
        }
      }
    }
  }
  return { out: cur, consumed, formed };
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}
