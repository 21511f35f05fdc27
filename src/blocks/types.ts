/**
 * What a unit block is: how it reads its settings, how it computes its outlets, and what it
 * declares to the rest of the program (report paths, how components can pass through it for
 * the structure checks, how a study edits its parameters). Nothing outside src/blocks switches
 * on a block's type: adding a block is one file here and one line in registry.ts.
 */
import type { FieldReader } from '../flowsheet/fields.js';
import type { Model, UnitSpecBase } from '../flowsheet/model.js';
import type { SettingMap } from '../flowsheet/settings.js';
import type { EvaluationFailure } from '../solve/types.js';
import type { MeterEos } from '../thermo/meter-eos.js';
import type { Eos } from '../thermo/types.js';
import type { Dimension } from '../units/index.js';

/** The state of one stream inside a solve: SI, component flows in mol/s. */
export interface Stream {
  flows: Float64Array;
  /** K */
  T: number;
  /** Pa, absolute */
  P: number;
  /** Vapor mole fraction, NaN where not computed. */
  vf: number;
  /**
   * Molar enthalpy, J/mol on the formation basis of src/thermo/enthalpy.ts, set by the block
   * that makes the stream from its own state (its flash, or an enthalpy balance); NaN when the
   * file's components lack the data (the energy balance is then off for the whole file).
   */
  h: number;
  /**
   * How h follows from T, P and the flows, so that a tear guess (which carries flows, T and P
   * only) gets its enthalpy back exactly as the maker made it: 'flash' (the equilibrium state
   * at T and P), or one phase on the named root with no flash (a condenser's outlets, whose
   * phases the split decides).
   */
  hRule: EnthalpyRule;
  /**
   * Whether T is a stand-in: a temperature only the energy balance decides, in a pass that
   * leaves it out (PhaseChecks.skipEnergy), or one carried on from such a stream (a splitter's
   * outlets, a mixer's mean). Read only in those passes: the tear problem holds such a tear's T
   * at its guess, and lets every other tear's T iterate with the flows.
   */
  standIn: boolean;
}

export type EnthalpyRule = 'flash' | 'stable' | 'vapor' | 'liquid';

export function newStream(n: number): Stream {
  return { flows: new Float64Array(n), T: Number.NaN, P: Number.NaN, vf: Number.NaN, h: Number.NaN, hRule: 'flash', standIn: false };
}

export interface BuildContext {
  model: Model;
  eos: Eos;
  /** The runtime's meter equation of state (feeds); a feed makes its own when it is absent. */
  meter?: MeterEos;
  /**
   * Whether every component of the file has the data an enthalpy needs (cp and hf): the
   * energy balance is on for the whole file, or off for the whole file.
   */
  energy: boolean;
  /** How thoroughly the blocks check phases in the current pass (owned by the runtime). */
  checks?: PhaseChecks;
}

/**
 * `thorough: false` lets a block take a single phase it verified (flash with stability test) at
 * a nearby state as still single, without a new stability test: the passes of an iteration. The
 * runtime keeps it `true` for every other pass (the final pass of a solve above all), where each
 * state is checked in full.
 */
export interface PhaseChecks {
  thorough: boolean;
  /**
   * `true` in the passes of an iteration whose outlet flows nowhere depend on an enthalpy (no
   * unit declares `needsEnergyEveryPass`): the blocks leave out enthalpies, duties and powers,
   * and a temperature that only the energy balance decides is held at a stand-in (the inlet's).
   * The final pass of a solve computes them all from the converged flows (closure.ts), and goes
   * on iterating with the energy balance in every pass if that moves a tear. Read it through
   * `energyThisPass`.
   */
  skipEnergy: boolean;
}

/** Whether a block with the energy balance on (`ctx.energy`) computes it in the current pass. */
export function energyThisPass(ctx: BuildContext): boolean {
  return ctx.energy && !(ctx.checks?.skipEnergy ?? false);
}

/** A figure a unit reports after the solve (extent, conversion, vapor fraction...). */
export interface UnitFigure {
  label: string;
  /** SI value (mol/s, fraction, K, Pa) */
  value: number;
  kind: 'molarFlow' | 'fraction' | 'temperature' | 'pressure' | 'count' | 'power' | 'number';
  /** JSON key */
  key: string;
}

/** A reaction as a reactor reports it. */
export interface ReactionFigures {
  equation: string;
  key: string;
  /** mol/s */
  extent: number;
  /** Conversion of the key by this reaction, per pass (extent times the key's coefficient over the key's inlet flow). */
  conversion: number;
  requested?: number;
  /**
   * Heat of reaction at the reactor's outlet temperature, J per mol of extent: the ideal-gas
   * value sum_i nu_i h_i^ig(T) (the real-gas mixing terms are in the duty, not here).
   */
  heatOfReaction?: number;
  /** Held at chemical equilibrium (the extent follows from K). */
  equilibrium?: boolean;
  /** K of the reaction at its equilibrium temperature (1 bar standard state, dimensionless). */
  equilibriumConstant?: number;
  /** Temperature whose equilibrium the reaction reaches, K: the outlet T, plus the approach when exothermic, less it when endothermic. */
  equilibriumTemperature?: number;
  /** Approach to equilibrium as given, K (0 without one). */
  approach?: number;
}

export interface UnitSummary {
  figures: UnitFigure[];
  notes: string[];
  reactions?: ReactionFigures[];
  /**
   * Single-pass conversion of each key component, from the unit's inlet and outlet flows
   * ((in - out) / in), for the loop figures and `UNIT.conversion.ID`.
   */
  conversions?: Record<string, number>;
}

export interface BlockRuntime {
  readonly spec: UnitSpecBase;
  /**
   * Outlets from inlets (in the order of spec.inlets and spec.outlets). Returns the condition
   * that makes this evaluation no true solution (a reactant that would go negative, a flash that
   * did not converge), or null. Pure in its inputs, apart from warm-start caches.
   */
  compute(ins: readonly Stream[], outs: Stream[]): EvaluationFailure | null;
  /** Net generation of each component (mol/s) in the last compute; reactors only. */
  generation?(): Float64Array;
  /**
   * Heat (duty) and shaft work (power) put into the unit's material in the last compute, W;
   * negative when removed. Absent for a unit that exchanges neither (splitter).
   */
  energy?(): { duty: number; power: number };
  /** The unit may raise the pressure (a compressor); any other unit whose outlet P exceeds its inlets' is warned about. */
  readonly raisesPressure?: boolean;
  /** Figures for the unit line of the report, from the last compute. */
  summary(ins: readonly Stream[], outs: readonly Stream[]): UnitSummary;
  /** Resets any warm-start cache (so that a solve does not depend on the previous one). */
  reset?(): void;
}

/** A report path a unit offers, relative to the unit: `conversion.CO2`, `extent.0`, `vapor-fraction`. */
export interface OutputDecl {
  name: string;
  dimension: Dimension | 'dimensionless';
  read(u: UnitSummary): number;
}

/** How components can pass through a unit, for the structure checks (structure.ts). */
export interface StructureRules {
  /** Whether the unit can send component i to its k-th outlet. */
  passes(k: number, i: number): boolean;
  /** What the outlets can carry given what reaches the inlets (reactors); default: the inlets. */
  transform?(inlet: Uint8Array): { out: Uint8Array; consumed: Uint8Array; formed: Uint8Array };
  /** What to change so that component `id` can leave through outlet k (a trapped component). */
  openOutlet?(k: number, id: string): string;
  /** Problems of this unit given what reaches its inlets (a reactant that never arrives). */
  check?(inlet: Uint8Array, report: (message: string, help: string) => void): void;
}

/**
 * What a unit conserves, for the reconciliation of plant data (src/plant/network.ts). A unit's
 * specifications (a conversion, a split, a recovery) are not used there: the data decide them,
 * and the unit names the figures they decide by their paths.
 */
export interface BalanceDecl {
  /**
   * components: each component's flow in equals its flow out (mixer, condenser, separator);
   * elements: each element's flow in equals its flow out, with the reactions' extents free
   *   (reactor); `reactions` are the extents the file writes (other element-balanced changes,
   *   if the elements allow any, get free extents of their own);
   * split: as components, and every outlet has the inlet's composition (splitter).
   */
  law: 'components' | 'elements' | 'split';
  reactions?: readonly { nu: Float64Array; label: string }[];
  /** Figures the data decide, by path (a parameter of the file where the path is one). */
  figures?: readonly BalanceFigure[];
}

/** The reconciled flows around one unit, as a figure reads them (mol/s). */
export interface BalanceView {
  /** Flow of component i into the unit (all inlets), or the total when i is undefined. */
  inlet(i?: number): number;
  /** Flow of component i in outlet k, or its total. */
  outlet(k: number, i?: number): number;
  /** Extent of the unit's reaction r (law elements). */
  extent(r: number): number;
}

export interface BalanceFigure {
  /** `converter.reactions.0.conversion`, `purge-split.out.purge`, `chiller.split.NH3`. */
  path: string;
  value(v: BalanceView): number;
}

/** A study's edit of one parameter in a block's settings. */
export type ParameterEdit = SettingMap | { error: string; help?: string };

export interface BlockDef<S extends UnitSpecBase = UnitSpecBase> {
  /** The `type:` value in the file. */
  type: string;
  /** One line for help texts. */
  description: string;
  /** Keys allowed besides `type`. */
  keys: readonly string[];
  read(name: string, f: FieldReader): S | undefined;
  build(spec: S, ctx: BuildContext): BlockRuntime;
  /** The report paths of a unit of this block (default: none). */
  outputs?(spec: S, model: Model): OutputDecl[];
  /** How components pass (default: every inlet component to every outlet). */
  structure?(spec: S, model: Model): StructureRules;
  /**
   * A text equal for two specs of one unit (the same file, other values) whose structure rules
   * answer every question alike: what `structure` depends on (which values are zero, which
   * reactions run), so that a sweep's next value is not checked again when its key is the
   * same. Absent, or undefined: every change of value is checked again.
   */
  structureKey?(spec: S, model: Model): string | undefined;
  /**
   * Sets a parameter (key within the unit's settings) to an SI value, where setting it alone
   * is not the whole story (a splitter's other outlet); default: the value is set as it is.
   */
  edit?(name: string, settings: SettingMap, key: readonly string[], value: number): ParameterEdit;
  /**
   * Whether the unit's outlet flows depend on an enthalpy or on an inlet temperature (an
   * equilibrium at a temperature the energy balance finds, or at the inlet's): such a unit keeps
   * the energy balance in every pass of the solve. Default: false, the outlet flows follow from
   * the inlet flows, the pressures and the unit's settings alone, so the energy balance of a
   * flowsheet of such units is solved once on the converged flows (PhaseChecks.skipEnergy).
   */
  needsEnergyEveryPass?(spec: S): boolean;
  /** What the unit conserves, for plant-data reconciliation (default: none: the unit cannot be reconciled). */
  balances?(spec: S, model: Model): BalanceDecl;
}
