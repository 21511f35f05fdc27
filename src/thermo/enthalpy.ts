/**
 * Molar enthalpy and entropy of phases and streams: the ideal-gas mixture (ideal-gas.ts) plus
 * the residual properties of the equation of state (departure.ts).
 *
 *   H(T, P, x) = sum_i x_i h_i^ig(T) + H^R(T, P, x)
 *   S(T, P, x) = sum_i x_i s_i^ig(T) - R sum_i x_i ln x_i - R ln(P / 1 bar) + S^R(T, P, x)
 *
 * Reference state (formation basis). The elements in their standard states at 298.15 K and
 * 1 bar have H = 0 and S = 0. Each species as an ideal gas at 298.15 K has H equal to its
 * standard enthalpy of formation hf, and at 298.15 K and 1 bar G equal to its standard Gibbs
 * energy of formation gf, so that its entropy there is (hf - gf)/298.15 K: the entropy of
 * formation from the elements, not the third-law absolute entropy (the two differ by the
 * elements' absolute entropies, which cancel in every balance that conserves the elements,
 * reacting or not). Heats of reaction and adiabatic temperatures follow from H alone, with no
 * separate heat-of-reaction term; equilibrium constants follow from G = H - TS. The ideal-gas
 * mixture at the pressure of the phase is the reference of the residual properties, so a
 * liquid's enthalpy includes its heat of vaporisation through H^R.
 *
 * Where the cubic is weak: SRK and PR with the generalised alpha function and van der Waals
 * mixing describe the gas phase of a reaction loop well (residual enthalpies within a few
 * percent of reference equations for light gases away from the critical region), but they are
 * a weak liquid model. The liquid enthalpy rests on H^R, i.e. on the model's heat of
 * vaporisation; for polar and hydrogen-bonding liquids (water, methanol, ammonia) it is off by
 * several percent, and liquid heat capacities by more (Poling, Prausnitz and O'Connell, The
 * Properties of Gases and Liquids, 5th ed., chapters 4 and 6, (from memory)). The tests
 * measure it for water against the IAPWS-IF97 verification values (test/thermo/enthalpy.test.ts):
 * the enthalpy of liquid water at 300 K and 3 MPa relative to the vapor at 3.5 kPa comes out
 * 6.9 % (SRK) and 4.0 % (PR) too large in magnitude, and the residual enthalpy of dense steam
 * at 700 K and 30 MPa 7.4 % (SRK) and 6.0 % (PR) too small.
 * Condenser duties and adiabatic temperatures of streams with much polar liquid carry that
 * error; results must be reviewed by a qualified engineer and are not for relief, safety or
 * code-compliance design.
 *
 * A component without the data (cp and hf for enthalpy; cp, hf and gf for entropy) gives an
 * explicit 'invalid' result naming it, never NaN. Only components present (x_i > 0) are
 * checked: one that is absent contributes nothing.
 */
import { R } from './constants.js';
import { departureInto, newDeparture, type Departure } from './departure.js';
import { flashTP, type FlashOptions, type FlashResult } from './flash.js';
import { cpIG, hIG, P_STD, sIG } from './ideal-gas.js';
import { eosWork, type ComponentData, type Eos, type RootChoice } from './types.js';

export type ThermoField = 'cp' | 'hf' | 'gf';

export interface MissingComponentData {
  /** Index of the component in the equation of state's list. */
  index: number;
  id: string;
  fields: ThermoField[];
}

/** Result when a component lacks the data a property needs. */
export interface MissingThermoData {
  status: 'invalid';
  missing: MissingComponentData[];
  message: string;
}

/** Which data a property needs: enthalpy (and heat capacity) needs cp and hf; entropy needs gf too. */
export type ThermoNeed = 'enthalpy' | 'entropy';

/**
 * The components that lack data for `need`, or undefined when none does. With x, only the
 * components with x_i > 0 are checked.
 */
export function missingThermoData(
  components: readonly ComponentData[], need: ThermoNeed, x?: ArrayLike<number>,
): MissingThermoData | undefined {
  let missing: MissingComponentData[] | undefined;
  for (let i = 0; i < components.length; i++) {
    if (x !== undefined && !(x[i] > 0)) continue;
    const c = components[i];
    const fields: ThermoField[] = [];
    if (c.cp === undefined || c.cp.pieces.length === 0) fields.push('cp');
    if (c.hf === undefined || !Number.isFinite(c.hf)) fields.push('hf');
    if (need === 'entropy' && (c.gf === undefined || !Number.isFinite(c.gf))) fields.push('gf');
    if (fields.length > 0) (missing ??= []).push({ index: i, id: c.id, fields });
  }
  if (missing === undefined) return undefined;
  const names: Record<ThermoField, string> = {
    cp: 'ideal-gas heat capacity (cp)',
    hf: 'enthalpy of formation (hf)',
    gf: 'Gibbs energy of formation (gf)',
  };
  const what = missing.map((m) => `${m.id} has no ${m.fields.map((f) => names[f]).join(', no ')}`).join('; ');
  const needs = need === 'entropy' ? 'entropies need cp, hf and gf' : 'enthalpies need cp and hf';
  return { status: 'invalid', missing, message: `missing thermal data: ${what} (${needs} for every component present)` };
}

/** Sum of the present fractions; throws on a bad composition (a programming error, as in the flash). */
function fractionSum(x: ArrayLike<number>, n: number): number {
  if (x.length !== n) throw new RangeError(`composition has ${x.length} entries, expected ${n}`);
  let s = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!(v >= 0) || v === Infinity) throw new RangeError(`mole fraction ${i} must be finite and >= 0, got ${v}`);
    s += v;
  }
  if (!(s > 0)) throw new RangeError('composition must have a positive sum');
  return s;
}

/** Ideal-gas mixture enthalpy sum_i x_i h_i^ig(T), J/mol (x normalised here). Data must be present. */
export function idealGasEnthalpy(components: readonly ComponentData[], T: number, x: ArrayLike<number>): number {
  const inv = 1 / fractionSum(x, components.length);
  let h = 0;
  for (let i = 0; i < components.length; i++) if (x[i] > 0) h += x[i] * inv * hIG(components[i], T);
  return h;
}

/** Ideal-gas mixture heat capacity sum_i x_i cp_i^ig(T), J/(mol K). Data must be present. */
export function idealGasCp(components: readonly ComponentData[], T: number, x: ArrayLike<number>): number {
  const inv = 1 / fractionSum(x, components.length);
  let c = 0;
  for (let i = 0; i < components.length; i++) if (x[i] > 0) c += x[i] * inv * cpIG(components[i], T);
  return c;
}

/**
 * Ideal-gas mixture entropy at T, P: sum_i x_i s_i^ig(T) - R sum_i x_i ln x_i - R ln(P/1 bar),
 * J/(mol K). Data must be present.
 */
export function idealGasEntropy(components: readonly ComponentData[], T: number, P: number, x: ArrayLike<number>): number {
  const inv = 1 / fractionSum(x, components.length);
  let s = -R * Math.log(P / P_STD);
  for (let i = 0; i < components.length; i++) {
    const xi = x[i] * inv;
    if (xi > 0) s += xi * (sIG(components[i], T) - R * Math.log(xi));
  }
  return s;
}

/** Molar properties of one phase. */
export interface PhaseProperties {
  /** Enthalpy, J/mol (formation basis). */
  H: number;
  /** Entropy, J/(mol K) (formation basis; NaN when not asked for). */
  S: number;
  /** Isobaric heat capacity at fixed composition, J/(mol K). */
  Cp: number;
  Z: number;
  root: 'vapor' | 'liquid';
}

export function newPhaseProperties(): PhaseProperties {
  return { H: 0, S: 0, Cp: 0, Z: 1, root: 'vapor' };
}

/**
 * Scratch of phasePropertiesInto per equation of state: the departure, and each component's
 * ideal-gas h, cp (and s) at the last temperature (a loop's flashes and enthalpies come back to
 * the same T again and again: a condenser's, a stream's), so that neither is computed nor
 * allocated again at that T.
 */
interface PropertyScratch {
  dep: Departure;
  n: number;
  /** Temperature of h and cp; of s. */
  T: number;
  sT: number;
  h: Float64Array;
  cp: Float64Array;
  s: Float64Array;
}
function scratchFor(eos: Eos): PropertyScratch {
  const n = eos.n;
  return eosWork(eos, 'phaseProperties',
    (): PropertyScratch => ({ dep: newDeparture(), n, T: NaN, sT: NaN, h: new Float64Array(n), cp: new Float64Array(n), s: new Float64Array(n) }),
    (w) => w.n === n);
}

/**
 * H, Cp and (when withEntropy) S of one phase of composition x at T, P on the chosen root,
 * written into out. No data check: the caller has run missingThermoData first (flash-ph.ts
 * does). No arrays are allocated.
 */
export function phasePropertiesInto(
  eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice, withEntropy: boolean, out: PhaseProperties,
): PhaseProperties {
  const w = scratchFor(eos);
  const dep = w.dep;
  departureInto(eos, T, P, x, root, dep);
  const comps = eos.components;
  const n = eos.n;
  const inv = 1 / fractionSum(x, n);
  // Per component at this T, computed on first need (a component with data missing is never
  // asked for: the caller checked the components present).
  if (w.T !== T) {
    w.T = T;
    w.h.fill(NaN);
  }
  if (withEntropy && w.sT !== T) {
    w.sT = T;
    w.s.fill(NaN);
  }
  const hs = w.h;
  const cps = w.cp;
  const ss = w.s;
  let h = 0;
  let cp = 0;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] * inv;
    if (!(xi > 0)) continue;
    if (hs[i] !== hs[i]) {
      const c = comps[i];
      hs[i] = hIG(c, T);
      cps[i] = cpIG(c, T);
    }
    h += xi * hs[i];
    cp += xi * cps[i];
    if (withEntropy) {
      if (ss[i] !== ss[i]) ss[i] = sIG(comps[i], T);
      s += xi * (ss[i] - R * Math.log(xi));
    }
  }
  out.H = h + dep.H;
  out.Cp = cp + dep.Cp;
  out.S = withEntropy ? s - R * Math.log(P / P_STD) + dep.S : NaN;
  out.Z = dep.Z;
  out.root = dep.root;
  return out;
}

/** A property of one phase, or the data that is missing for it. */
export type PhaseValue = { status: 'ok'; value: number; Z: number; root: 'vapor' | 'liquid' } | MissingThermoData;

/**
 * Molar enthalpy of a phase of composition x at T (K), P (Pa) on the chosen root:
 * sum_i x_i h_i^ig(T) + H^R, J/mol on the formation basis.
 */
export function phaseEnthalpy(eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice = 'stable'): PhaseValue {
  fractionSum(x, eos.n);
  const miss = missingThermoData(eos.components, 'enthalpy', x);
  if (miss) return miss;
  const p = phasePropertiesInto(eos, T, P, x, root, false, newPhaseProperties());
  return { status: 'ok', value: p.H, Z: p.Z, root: p.root };
}

/**
 * Molar entropy of a phase of composition x at T (K), P (Pa) on the chosen root:
 * sum_i x_i s_i^ig(T) - R sum_i x_i ln x_i - R ln(P/1 bar) + S^R, J/(mol K) on the formation basis.
 */
export function phaseEntropy(eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice = 'stable'): PhaseValue {
  fractionSum(x, eos.n);
  const miss = missingThermoData(eos.components, 'entropy', x);
  if (miss) return miss;
  const p = phasePropertiesInto(eos, T, P, x, root, true, newPhaseProperties());
  return { status: 'ok', value: p.S, Z: p.Z, root: p.root };
}

/**
 * Isobaric heat capacity of a phase at fixed composition (no phase change), J/(mol K):
 * sum_i x_i cp_i^ig(T) + Cp^R.
 */
export function phaseHeatCapacity(eos: Eos, T: number, P: number, x: ArrayLike<number>, root: RootChoice = 'stable'): PhaseValue {
  fractionSum(x, eos.n);
  const miss = missingThermoData(eos.components, 'enthalpy', x);
  if (miss) return miss;
  const p = phasePropertiesInto(eos, T, P, x, root, false, newPhaseProperties());
  return { status: 'ok', value: p.Cp, Z: p.Z, root: p.root };
}

/** A phase split as the flashes return it. */
export interface SplitLike {
  phase: 'two-phase' | 'vapor' | 'liquid';
  beta: number;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
}

/** Roots used for the two phases of a split (default 'stable' for both, as flashTP uses). */
export interface SplitRoots {
  liquid: RootChoice;
  vapor: RootChoice;
}

/** Enthalpy and entropy of a split and of its phases. */
export interface SplitProperties {
  status: 'ok';
  /** Per mole of stream, J/mol and J/(mol K). */
  H: number;
  S: number;
  /** Present when the split has vapor (beta > 0). */
  vapor?: { H: number; S: number; Z: number };
  /** Present when the split has liquid (beta < 1). */
  liquid?: { H: number; S: number; Z: number };
}

const STABLE_ROOTS: SplitRoots = { liquid: 'stable', vapor: 'stable' };

/** H and S of a split (two-phase or single) at T, P, each phase on its own root. */
function splitPropertiesUnchecked(eos: Eos, T: number, P: number, split: SplitLike, roots: SplitRoots): SplitProperties {
  const p = newPhaseProperties();
  if (split.phase !== 'two-phase') {
    // single phase: x = y = feed; the stable root of the feed, as the flash labels it
    phasePropertiesInto(eos, T, P, split.x, 'stable', true, p);
    const one = { H: p.H, S: p.S, Z: p.Z };
    return split.phase === 'vapor' ? { status: 'ok', H: p.H, S: p.S, vapor: one } : { status: 'ok', H: p.H, S: p.S, liquid: one };
  }
  const b = split.beta;
  phasePropertiesInto(eos, T, P, split.y, roots.vapor, true, p);
  const vapor = { H: p.H, S: p.S, Z: p.Z };
  phasePropertiesInto(eos, T, P, split.x, roots.liquid, true, p);
  const liquid = { H: p.H, S: p.S, Z: p.Z };
  return { status: 'ok', H: b * vapor.H + (1 - b) * liquid.H, S: b * vapor.S + (1 - b) * liquid.S, vapor, liquid };
}

/**
 * Enthalpy and entropy of an already computed split (e.g. a condenser's flashTP result) at T,
 * P. z is the stream's total composition (only its present components are checked for data).
 */
export function splitProperties(
  eos: Eos, T: number, P: number, z: ArrayLike<number>, split: SplitLike, roots: SplitRoots = STABLE_ROOTS,
): SplitProperties | MissingThermoData {
  fractionSum(z, eos.n);
  const miss = missingThermoData(eos.components, 'entropy', z);
  if (miss) return miss;
  return splitPropertiesUnchecked(eos, T, P, split, roots);
}

/** The stable state of a stream at T, P and its molar enthalpy and entropy. */
export interface StreamState {
  /** 'not-converged' when the flash did not converge: the values are then the last iterate's, not a solution. */
  status: 'converged' | 'not-converged';
  T: number;
  P: number;
  phase: 'two-phase' | 'vapor' | 'liquid';
  /** Vapor mole fraction. */
  beta: number;
  x: Float64Array;
  y: Float64Array;
  K: Float64Array;
  /** Molar enthalpy of the stream, J/mol (formation basis). */
  H: number;
  /** Molar entropy of the stream, J/(mol K) (formation basis). */
  S: number;
  vapor?: { H: number; S: number; Z: number };
  liquid?: { H: number; S: number; Z: number };
  /** The isothermal flash that decided the state. */
  flash: FlashResult;
  message?: string;
}

/**
 * Stable state of a stream of total composition z at T (K), P (Pa): single phase when the
 * tangent-plane test finds it stable, else the two-phase split (flashTP), with its molar
 * enthalpy and entropy. Needs cp, hf and gf of every component present.
 */
export function streamState(eos: Eos, T: number, P: number, z: ArrayLike<number>, opts: FlashOptions = {}): StreamState | MissingThermoData {
  fractionSum(z, eos.n);
  const miss = missingThermoData(eos.components, 'entropy', z);
  if (miss) return miss;
  const f = flashTP(eos, T, P, z, opts);
  const p = splitPropertiesUnchecked(eos, T, P, f, STABLE_ROOTS);
  const r: StreamState = {
    status: f.status, T, P, phase: f.phase, beta: f.beta, x: f.x, y: f.y, K: f.K, H: p.H, S: p.S, flash: f,
    ...(p.vapor ? { vapor: p.vapor } : {}), ...(p.liquid ? { liquid: p.liquid } : {}),
  };
  if (f.status !== 'converged') r.message = `the isothermal flash did not converge${f.note ? `: ${f.note}` : ''}`;
  else if (f.note) r.message = f.note;
  return r;
}
