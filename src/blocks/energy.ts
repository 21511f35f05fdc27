/**
 * The energy side of the blocks: the state of an outlet at a set T and P (isothermal flash and
 * molar enthalpy) or at a set P and molar enthalpy (PH flash), and the enthalpy flow of inlets.
 * One `OutletState` per outlet (or per unit) keeps the warm start of its flashes: the last
 * K-values and temperature, which is what keeps a PH flash inside a loop near the cost of one
 * isothermal flash (src/thermo/flash-ph.ts).
 *
 * Molar enthalpies are on the formation basis of src/thermo/enthalpy.ts (elements at 298.15 K
 * and 1 bar), so a reactor's heat of reaction is in the enthalpies themselves and a duty is
 * simply (enthalpy flow out) - (enthalpy flow in).
 *
 * A stream's enthalpy is set by the block that makes it, from its own state: the isothermal
 * flash of an outlet at a set T, or the enthalpy balance (then T comes from a PH flash). Where a
 * PH flash leaves a residual (below its tolerance, 1e-10 R T here), the outlet keeps the
 * balance's enthalpy, not the flash's, so that the unit's balance closes to rounding and the
 * temperature carries the flash's tolerance. The maker also says how h follows from T, P and
 * the flows (Stream.hRule); the taker of a tear stream, which iterates on flows, T and P only,
 * gets h back by that rule (`enthalpyByRule`).
 */
import type { FieldReader } from '../flowsheet/fields.js';
import type { EvaluationFailure } from '../solve/types.js';
import { newPhaseProperties, phasePropertiesInto, type PhaseProperties } from '../thermo/enthalpy.js';
import { flashTP, flashTPInto, newFlashResult, type FlashOptions, type FlashResult } from '../thermo/flash.js';
import { flashPH, flashPS } from '../thermo/flash-ph.js';
import { outsideRange } from '../thermo/ideal-gas.js';
import { R as R_GAS } from '../thermo/constants.js';
import { eosWork, type ComponentData, type Eos, type RootChoice } from '../thermo/types.js';
import type { EnthalpyRule, PhaseChecks, Stream } from './types.js';

/** Tolerance of the PH and PS flashes run by blocks, on |H - H_spec| / (R T). */
export const STATE_TOL = 1e-10;
/**
 * How near a verified single phase a state must be for an iteration pass to skip its stability
 * test: 2 K, 0.1 % in pressure, 1e-4 in every mole fraction. Early passes move further and are
 * checked in full; the final pass of a solve checks every state in full.
 */
const NEAR_T = 2;
const NEAR_P = 1e-3;
const NEAR_Z = 1e-4;

/** Flashes the warm two-phase PH iteration may take before flashPH takes over. */
const NESTED_MAX = 6;
/** Largest temperature step of that iteration, K. */
const NESTED_STEP = 10;

/**
 * A component whose definition failed stays in the file's list as a placeholder (molar mass
 * NaN; its problem is reported already): the energy checks pass over it rather than report it
 * twice.
 */
function placeholder(c: ComponentData): boolean {
  return !Number.isFinite(c.MW);
}

/** Whether every component has cp and hf (the energy balance can be on). */
export function hasEnergyData(components: readonly ComponentData[]): boolean {
  return components.every((c) => placeholder(c) || (c.cp !== undefined && c.cp.pieces.length > 0 && c.hf !== undefined && Number.isFinite(c.hf)));
}

/** Components that lack cp or hf (or gf when entropy is asked), with the keys to add. */
export function missingEnergyKeys(components: readonly ComponentData[], entropy = false): { id: string; keys: string[] }[] {
  const out: { id: string; keys: string[] }[] = [];
  for (const c of components) {
    if (placeholder(c)) continue;
    const keys: string[] = [];
    if (c.cp === undefined || c.cp.pieces.length === 0) keys.push('cp');
    if (c.hf === undefined || !Number.isFinite(c.hf)) keys.push('hf');
    if (entropy && (c.gf === undefined || !Number.isFinite(c.gf))) keys.push('gf');
    if (keys.length) out.push({ id: c.id, keys });
  }
  return out;
}

/** "X1 (cp, hf), X2 (hf)" for messages. */
export function describeMissing(m: { id: string; keys: string[] }[]): string {
  return m.map((x) => `\`${x.id}\` (${x.keys.map((k) => `\`${k}:\``).join(', ')})`).join(', ');
}

/** "`CO` (`cp:`) has no data for it": the components a unit's energy balance lacks, as its message says them. */
export function lackingData(m: { id: string; keys: string[] }[], forWhat = 'it'): string {
  return `${describeMissing(m)} ${m.length > 1 ? 'have' : 'has'} no data for ${forWhat}`;
}

/** Total molar flow of a stream, mol/s. */
export function totalFlow(s: Stream): number {
  let t = 0;
  const f = s.flows;
  for (let i = 0; i < f.length; i++) t += f[i];
  return t;
}

/** Enthalpy flow of the inlets, W (streams with no flow count zero, whatever their h). */
export function enthalpyIn(ins: readonly Stream[]): number {
  let H = 0;
  for (const s of ins) {
    const F = totalFlow(s);
    if (F > 0) H += F * s.h;
  }
  return H;
}

/** Phase properties for the blocks' single-phase shortcuts, in the equation of state's work areas. */
function nearScratch(eos: Eos): PhaseProperties {
  return eosWork(eos, 'blocksNear', newPhaseProperties);
}

/** Phase properties for phaseH and phaseRoot, in the equation of state's work areas. */
function phaseScratch(eos: Eos): PhaseProperties {
  return eosWork(eos, 'blocksPhase', newPhaseProperties);
}

/** Molar enthalpy and root of the stable root of x at T, P. */
function phaseRootState(eos: Eos, T: number, P: number, x: ArrayLike<number>): { H: number; root: 'vapor' | 'liquid' } {
  const p = phasePropertiesInto(eos, T, P, x, 'stable', false, nearScratch(eos));
  return { H: p.H, root: p.root };
}

/** Molar enthalpy of one phase of composition x at T, P (data present: the caller checked). */
export function phaseH(eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice = 'stable'): number {
  const p = phaseScratch(eos);
  return phasePropertiesInto(eos, T, P, x, root, false, p).H;
}

/** Molar enthalpy and the root taken, of one phase of composition x at T, P (data present). */
export function phaseRoot(eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice): { H: number; root: 'vapor' | 'liquid' } {
  const p = phaseScratch(eos);
  phasePropertiesInto(eos, T, P, x, root, false, p);
  return { H: p.H, root: p.root };
}

/** Molar entropy of one phase of composition x at T, P (cp, hf and gf present). */
export function phaseS(eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice = 'stable'): number {
  const p = phaseScratch(eos);
  return phasePropertiesInto(eos, T, P, x, root, true, p).S;
}

/** A PH or PS flash's state (T, phase, split, flash count) into `found`, at P. */
function takeFlash(f: StateFound, r: { T: number; phase: StateFound['phase']; beta: number; x: ArrayLike<number>; y: ArrayLike<number>; flashes: number }, P: number): void {
  f.T = r.T;
  f.P = P;
  f.phase = r.phase;
  f.beta = r.beta;
  f.x.set(r.x);
  f.y.set(r.y);
  f.flashes = r.flashes;
  f.liquidLiquid = false;
}

/** The state an OutletState found: the split and the molar enthalpies. */
export interface StateFound {
  T: number;
  P: number;
  phase: 'two-phase' | 'vapor' | 'liquid';
  /** Vapor mole fraction. */
  beta: number;
  /** Liquid and vapor compositions (the feed when single phase). */
  x: Float64Array;
  y: Float64Array;
  /** Molar enthalpy of the whole stream, J/mol. */
  h: number;
  /** Of the vapor and liquid parts (NaN where the part is absent). */
  hV: number;
  hL: number;
  /** Isothermal flashes the last call ran. */
  flashes: number;
  /** Two liquids and no vapor (the flash's liquid-liquid split). */
  liquidLiquid: boolean;
}

/**
 * The state of one outlet (or one unit's mixed contents), with its warm start. `z` is filled by
 * the caller or by `setFlows`.
 */
export class OutletState {
  readonly z: Float64Array;
  private K0: Float64Array | undefined;
  private lastT = Number.NaN;
  /** dH/dT of the two-phase state last found (the secant), J/(mol K); NaN before one is known. */
  private slope = Number.NaN;
  readonly found: StateFound;

  /** The last single phase verified by a full flash: its T, P, composition and root. */
  private verified = false;
  private vT = Number.NaN;
  private vP = Number.NaN;
  private readonly vZ: Float64Array;
  /** The warm flashes' result and options, reused on every pass (no history kept). */
  private readonly flashOut: FlashResult;
  private readonly flashOpts: FlashOptions = { K0: undefined, history: false };

  constructor(private readonly eos: Eos, private readonly unit: string, private readonly checks?: PhaseChecks) {
    const n = eos.n;
    this.z = new Float64Array(n);
    this.vZ = new Float64Array(n);
    this.flashOut = newFlashResult(n);
    this.found = { T: NaN, P: NaN, phase: 'vapor', beta: 1, x: new Float64Array(n), y: new Float64Array(n), h: NaN, hV: NaN, hL: NaN, flashes: 0, liquidLiquid: false };
  }

  /** The isothermal flash from the last K-values, into the reused result. */
  private warmFlash(T: number, P: number): FlashResult {
    this.flashOpts.K0 = this.K0;
    return flashTPInto(this.eos, T, P, this.z, this.flashOpts, this.flashOut);
  }

  /** Keeps K as the next flash's start (in place: no flash holds on to the array). */
  private keepK(K: Float64Array): void {
    if (this.K0 !== undefined && this.K0.length === K.length) this.K0.set(K);
    else this.K0 = Float64Array.from(K);
  }

  reset(): void {
    this.K0 = undefined;
    this.lastT = Number.NaN;
    this.slope = Number.NaN;
    this.verified = false;
  }

  /** Whether a pass of an iteration may take the verified single phase at T, P and z as still single. */
  private nearVerified(T: number, P: number): boolean {
    if (!this.verified || this.checks === undefined || this.checks.thorough) return false;
    if (!(Math.abs(T - this.vT) <= NEAR_T) || !(Math.abs(P - this.vP) <= NEAR_P * this.vP)) return false;
    const z = this.z;
    for (let i = 0; i < z.length; i++) if (!(Math.abs(z[i] - this.vZ[i]) <= NEAR_Z)) return false;
    return true;
  }

  private remember(): void {
    const f = this.found;
    if (f.phase === 'two-phase') {
      this.verified = false;
      return;
    }
    this.verified = true;
    this.vT = f.T;
    this.vP = f.P;
    this.vZ.set(this.z);
  }

  /** The single phase on the stable root at T, P (no stability test), as the state found. */
  private single(T: number, P: number): void {
    const f = this.found;
    const p = phaseRootState(this.eos, T, P, this.z);
    f.T = T;
    f.P = P;
    f.phase = p.root;
    f.beta = p.root === 'vapor' ? 1 : 0;
    f.x.set(this.z);
    f.y.set(this.z);
    f.flashes = 0;
    f.liquidLiquid = false;
    f.h = p.H;
    f.hV = p.root === 'vapor' ? p.H : NaN;
    f.hL = p.root === 'liquid' ? p.H : NaN;
    this.lastT = T;
  }

  /**
   * Sets z from component flows; returns the total. With no flow, or a flow that is negative
   * or not finite (an iterate gone wrong, which the solve reports on its own), z is left as it
   * was and the return is 0 or NaN: callers treat both as no flow.
   */
  setFlows(flows: ArrayLike<number>): number {
    let F = 0;
    for (let i = 0; i < flows.length; i++) {
      const v = flows[i];
      if (!(v >= 0) || v === Infinity) return Number.NaN;
      F += v;
    }
    if (F > 0 && F < Infinity) for (let i = 0; i < flows.length; i++) this.z[i] = flows[i] / F;
    return F < Infinity ? F : Number.NaN;
  }

  /** Last temperature found (NaN before the first). */
  get T(): number {
    return this.lastT;
  }

  /**
   * Equilibrium state at T, P (isothermal flash, warm-started) and its enthalpies. Returns a
   * not-converged condition when the flash does not converge (the state is then the last
   * iterate's).
   */
  atTP(T: number, P: number, withH: boolean): EvaluationFailure | null {
    if (withH && this.nearVerified(T, P)) {
      this.single(T, P);
      return null;
    }
    const r = this.warmFlash(T, P);
    const f = this.found;
    f.T = T;
    f.P = P;
    f.phase = r.phase;
    f.beta = r.beta;
    f.x.set(r.x);
    f.y.set(r.y);
    f.flashes = 1;
    f.liquidLiquid = r.liquidLiquid === true;
    if (r.phase === 'two-phase') this.keepK(r.K);
    this.lastT = T;
    if (withH) this.enthalpies();
    else f.h = f.hV = f.hL = NaN;
    if (r.status === 'converged' && !f.liquidLiquid) this.remember();
    else this.verified = false;
    if (r.status !== 'converged') {
      return {
        kind: 'not-converged',
        unit: this.unit,
        message: `the isothermal flash in \`${this.unit}\` did not converge (${r.iterations} iterations, fugacity residual ${r.residual.toExponential(2)})`,
        help: 'check T and P against the mixture; a point near the mixture critical point is hard',
      };
    }
    return null;
  }

  /**
   * State at P with molar enthalpy h (PH flash from the last T, or T0). The enthalpy kept is h
   * itself (see the module comment). Returns a not-converged condition naming the unit when no
   * state is found.
   */
  atPH(P: number, h: number, T0: number): EvaluationFailure | null {
    if (!Number.isFinite(h) || !(P > 0) || P === Infinity) {
      return { kind: 'not-converged', unit: this.unit, message: `\`${this.unit}\`: no state can be found from an enthalpy of ${h} J/mol at ${P} Pa`, help: 'the iteration left the physical range: try --method direct' };
    }
    if (this.verified && Number.isFinite(this.lastT) && this.found.phase !== 'two-phase' && this.checks !== undefined && !this.checks.thorough) {
      const T = this.singleAtEnthalpy(P, h, this.lastT);
      if (T !== undefined && this.nearVerified(T, P)) {
        this.single(T, P);
        const f = this.found;
        const d = h - f.h;
        f.h = h;
        if (Number.isFinite(f.hV)) f.hV += d;
        if (Number.isFinite(f.hL)) f.hL += d;
        return null;
      }
    }
    if (this.K0 && Number.isFinite(this.lastT) && this.found.phase === 'two-phase') {
      if (this.nested(P, h, this.lastT)) return null;
    } else if (this.K0 === undefined && !Number.isFinite(this.lastT) && Number.isFinite(T0) && T0 > 0) {
      // a first call: one isothermal flash at the starting temperature says whether the state
      // is two-phase there (then the warm iteration goes on from its K-values)
      const r0 = flashTP(this.eos, T0, P, this.z);
      if (r0.status === 'converged' && r0.phase === 'two-phase' && !r0.liquidLiquid) {
        this.K0 = Float64Array.from(r0.K);
        if (this.nested(P, h, T0)) return null;
      }
    }
    const start = Number.isFinite(this.lastT) ? this.lastT : Number.isFinite(T0) && T0 > 0 ? T0 : undefined;
    const r = flashPH(this.eos, P, h, this.z, { T0: start, K0: this.K0, tol: STATE_TOL });
    const f = this.found;
    if (r.status === 'invalid') {
      return { kind: 'invalid', unit: this.unit, message: `\`${this.unit}\`: ${r.message}`, help: 'add `cp:` and `hf:` to those components under `components:`' };
    }
    takeFlash(f, r, P);
    if (r.phase === 'two-phase') this.keepK(r.K);
    this.enthalpies();
    if (r.status === 'converged') this.remember();
    else this.verified = false;
    // keep the balance's enthalpy: spread the flash's residual over the phases
    const d = h - f.h;
    f.h = h;
    if (Number.isFinite(f.hV)) f.hV += d;
    if (Number.isFinite(f.hL)) f.hL += d;
    if (r.status !== 'converged') {
      return {
        kind: 'not-converged',
        unit: this.unit,
        message: `\`${this.unit}\`: no state at ${fmt(P / 1e5)} bar has the enthalpy the energy balance asks for (${fmt(h / 1000)} kJ/mol): ${r.message ?? 'the PH flash did not converge'}`,
        help: 'check the duty (or the adiabatic option) against the inlet: a duty that would heat or cool the stream beyond the range of the heat-capacity data has no state',
      };
    }
    this.lastT = r.T;
    return null;
  }

  /**
   * The warm start of a two-phase outlet in a loop: the previous pass left a two-phase state
   * and its K-values, and the new target is close. A secant iteration on T with isothermal
   * flashes from the last K-values (each a few Newton steps, no stability test: flashTP's fast
   * path) finds the state in two to four flashes; Michelsen's simultaneous iteration in
   * flashPH, robust from any start, takes far more near a dew point (a trace of liquid). The
   * slope starts from the last call's secant. Returns false, having changed nothing that
   * matters, when the state leaves the two-phase region or the iteration does not settle in
   * NESTED_MAX flashes: flashPH then solves it from scratch.
   */
  private nested(P: number, h: number, Tstart: number): boolean {
    const f = this.found;
    let T = Tstart;
    let slope = this.slope;
    let Tp = Number.NaN;
    let rp = Number.NaN;
    for (let k = 0; k < NESTED_MAX; k++) {
      const r0 = this.warmFlash(T, P);
      if (r0.status !== 'converged' || r0.phase !== 'two-phase' || r0.liquidLiquid) return false;
      this.keepK(r0.K);
      const hV = phaseH(this.eos, T, P, r0.y);
      const hL = phaseH(this.eos, T, P, r0.x);
      const H = r0.beta * hV + (1 - r0.beta) * hL;
      const r = H - h;
      if (Math.abs(r) <= STATE_TOL * R_GAS * T) {
        f.T = T;
        f.P = P;
        f.phase = 'two-phase';
        f.beta = r0.beta;
        f.x.set(r0.x);
        f.y.set(r0.y);
        f.flashes = k + 1;
        f.liquidLiquid = false;
        // keep the balance's enthalpy (the residual is far below the tolerance of the tears)
        f.hV = hV + (h - H);
        f.hL = hL + (h - H);
        f.h = h;
        this.lastT = T;
        return true;
      }
      if (Number.isFinite(rp) && T !== Tp) {
        const s2 = (r - rp) / (T - Tp);
        if (s2 > 0) slope = s2;
      }
      Tp = T;
      rp = r;
      // no slope known yet: a probe of 0.01 K towards the target gives the first secant
      let dT = slope > 0 ? -r / slope : -Math.sign(r) * 0.01;
      if (Math.abs(dT) > NESTED_STEP) dT = Math.sign(dT) * NESTED_STEP;
      T += dT;
      this.slope = slope;
    }
    return false;
  }

  /** Newton on H(T) along the stable root at P from T0; undefined when it does not settle. */
  private singleAtEnthalpy(P: number, h: number, T0: number): number | undefined {
    let T = T0;
    for (let k = 0; k < 20; k++) {
      const p = phasePropertiesInto(this.eos, T, P, this.z, 'stable', false, nearScratch(this.eos));
      if (!(p.Cp > 0)) return undefined;
      const r = p.H - h;
      if (Math.abs(r) <= STATE_TOL * R_GAS * T) return T;
      const dT = -r / p.Cp;
      if (!(Math.abs(dT) <= NEAR_T)) return undefined;
      T += dT;
    }
    return undefined;
  }

  /** Molar entropy of the state last found (both phases), J/(mol K). */
  entropy(): number {
    const f = this.found;
    if (f.phase !== 'two-phase') return phaseS(this.eos, f.T, f.P, this.z);
    return f.beta * phaseS(this.eos, f.T, f.P, f.y) + (1 - f.beta) * phaseS(this.eos, f.T, f.P, f.x);
  }

  /** State at P with molar entropy s (PS flash); a converged state is also left in `found` (its split, T, P and h). */
  atPS(P: number, s: number, T0: number): { failure: EvaluationFailure | null; T: number; h: number } {
    const r = flashPS(this.eos, P, s, this.z, { T0, tol: STATE_TOL });
    if (r.status === 'converged') {
      const f = this.found;
      takeFlash(f, r, P);
      f.h = r.H;
      f.hV = f.hL = Number.NaN;
      this.verified = false;
    }
    if (r.status === 'invalid') {
      return { failure: { kind: 'invalid', unit: this.unit, message: `\`${this.unit}\`: ${r.message}`, help: 'add `cp:`, `hf:` and `gf:` to those components under `components:`' }, T: NaN, h: NaN };
    }
    if (r.status !== 'converged') {
      return {
        failure: { kind: 'not-converged', unit: this.unit, message: `\`${this.unit}\`: no state at ${fmt(P / 1e5)} bar has the inlet's entropy: ${r.message ?? 'the PS flash did not converge'}`, help: 'check the outlet pressure' },
        T: r.T, h: r.H,
      };
    }
    return { failure: null, T: r.T, h: r.H };
  }

  private enthalpies(): void {
    const f = this.found;
    const eos = this.eos;
    if (f.phase === 'two-phase') {
      f.hV = phaseH(eos, f.T, f.P, f.y);
      f.hL = phaseH(eos, f.T, f.P, f.x);
      f.h = f.beta * f.hV + (1 - f.beta) * f.hL;
    } else {
      f.h = phaseH(eos, f.T, f.P, this.z);
      f.hV = f.phase === 'vapor' ? f.h : NaN;
      f.hL = f.phase === 'liquid' ? f.h : NaN;
    }
  }
}

/** Components present in z whose heat-capacity correlation does not cover T. */
export function outsideRangeIds(components: readonly ComponentData[], T: number, z: ArrayLike<number>): string[] {
  const out: string[] = [];
  for (let i = 0; i < components.length; i++) if (z[i] > 0 && components[i].cp && outsideRange(components[i], T)) out.push(components[i].id);
  return out;
}

/** Fills an outlet from a state found for the whole stream (one outlet: vf and h of the mixture). */
export function setFromState(o: Stream, s: StateFound, energy: boolean): void {
  o.T = s.T;
  o.P = s.P;
  o.vf = s.phase === 'two-phase' ? s.beta : s.phase === 'vapor' ? 1 : 0;
  o.h = energy ? s.h : Number.NaN;
  // A single phase found stable is the stable root of its composition: a tear guess gets its
  // enthalpy back from that root with no flash (the same value at the same T, P and flows).
  o.hRule = s.phase === 'two-phase' ? 'flash' : 'stable';
}

/**
 * The molar enthalpy of a stream from its flows, T and P by a maker's rule (a tear guess): the
 * equilibrium state (isothermal flash, warm-started by `state`) or one phase on a root. NaN
 * with no flow.
 */
export function enthalpyByRule(eos: Eos, s: Stream, rule: EnthalpyRule, state: OutletState): number {
  if (!(state.setFlows(s.flows) > 0) || !(s.T > 0) || !(s.P > 0) || !Number.isFinite(s.T) || !Number.isFinite(s.P)) return Number.NaN;
  if (rule !== 'flash') return phaseH(eos, s.T, s.P, state.z, rule);
  state.atTP(s.T, s.P, true);
  return state.found.h;
}

/** A duty or power figure for a unit's summary. */
export function powerFigure(key: 'duty' | 'power', label: string, value: number): { label: string; value: number; kind: 'power'; key: string } {
  return { label, value, kind: 'power', key };
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

/** Molar enthalpy of a stream at T, P in its equilibrium state (a feed), J/mol; NaN with no flow. */
export function equilibriumEnthalpy(eos: Eos, T: number, P: number, flows: ArrayLike<number>): { h: number; vf: number; converged: boolean } {
  const st = new OutletState(eos, 'feed');
  if (!(st.setFlows(flows) > 0)) return { h: Number.NaN, vf: Number.NaN, converged: true };
  const fail = st.atTP(T, P, true);
  const f = st.found;
  return { h: f.h, vf: f.phase === 'two-phase' ? f.beta : f.phase === 'vapor' ? 1 : 0, converged: fail === null };
}

/**
 * Reports a set temperature far outside the heat-capacity correlation of a component of the
 * file: below half its lowest or above 1.5 times its highest temperature of validity (the range
 * the state flashes search, src/thermo/flash-ph.ts). Inside that band but outside the range
 * itself, the result says so per stream instead (result.ts). Returns whether T is usable.
 */
export function checkCorrelationRange(f: FieldReader, key: string, T: number | undefined, unit: string): boolean {
  if (T === undefined) return true;
  for (const c of f.components) {
    const p = c.cp?.pieces;
    if (!p || p.length === 0 || !Number.isFinite(c.MW)) continue;
    const lo = p[0].Tmin;
    const hi = p[p.length - 1].Tmax;
    if (T < 0.5 * lo || T > 1.5 * hi) {
      f.error(key, `\`${key}\` of \`${unit}\` is ${Number(T.toPrecision(6))} K, far outside the range of the heat-capacity correlation of \`${c.id}\` (${lo} K to ${hi} K)`,
        `an enthalpy is extrapolated at most to half the lowest and 1.5 times the highest temperature of a correlation; set a temperature inside that band, or give \`${c.id}\` a \`cp:\` that covers it`);
      return false;
    }
  }
  return true;
}
