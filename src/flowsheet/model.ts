/**
 * The validated model: SI numbers, component indices, resolved streams, the plan of the
 * calculation, and what each block read (its settings and parameters). Built from the parsed
 * document by validate.ts and frozen: nothing changes a model. A study that changes a parameter
 * gets a new model (src/study/parameters.ts), sharing every part it did not change.
 * (Typed arrays inside cannot be frozen by JavaScript; by convention nothing writes to them.)
 */
import type { Diagnostic, SourceSpan } from '../diagnostics.js';
import type { MeterEosName } from '../thermo/meter-eos.js';
import type { ComponentData, EosName } from '../thermo/types.js';
import type { StandardRef } from '../units/index.js';
import type { Plan } from './graph.js';
import type { OwnerSettings } from './settings.js';
import type { InstrumentDecl, ReadingDecl } from '../plant/declarations.js';

export interface ThermoSpec {
  eos: EosName;
  /**
   * The equation for every meter and standard-volume conversion of the feeds (`thermo.meter-eos`);
   * absent: `eos`. The loop's units always use `eos`.
   */
  meterEos?: MeterEosName;
  /** Binary interaction parameters, n*n row-major, symmetric, zero diagonal. */
  kij: Float64Array;
  /** Local atmospheric pressure for gauge readings, Pa. */
  atmosphere: number;
  standards: ReadonlyMap<string, StandardRef>;
}

export interface DisplaySpec {
  flowUnit: string;
  pressureUnit: string;
  temperatureUnit: string;
}

/** What every unit spec has; each block adds its own fields. */
export interface UnitSpecBase {
  name: string;
  type: string;
  inlets: string[];
  outlets: string[];
  span?: SourceSpan;
}

/** How a feed's flow is given. */
export type FeedBasis =
  | { kind: 'meter'; flow: number; T: number; P: number; design?: MeterDesign; uncertainty?: MeterUncertainty }
  | { kind: 'molar-flow'; flow: number }
  | { kind: 'mass-flow'; flow: number }
  | { kind: 'standard-flow'; flow: number; reference: StandardRef; realGas: boolean }
  | { kind: 'flows'; flows: Float64Array };

/** The design basis of a differential-pressure meter (ISO 5167 square-root density correction). */
export interface MeterDesign {
  /** Design density, kg/m3, given or computed from the design state. */
  density?: number;
  T?: number;
  P?: number;
  /** Design mole fractions (defaults to the feed's composition). */
  composition?: Float64Array;
}

/**
 * The instrument uncertainties a metered feed declares (`meter.uncertainty`), as written: each is
 * a standard uncertainty, an expanded one (k = 2) or the half-width of limits (rectangular), as
 * `statedAs` says; standardUncertainty() in src/thermo/meter-budget.ts turns them into standard ones.
 */
export interface MeterUncertainty {
  /** Of the volume flow reading, relative (0.015 for 1.5 %). */
  flow?: number;
  /** Of the line pressure, Pa (a difference). */
  pressure?: number;
  /** Of the line temperature, K (a difference). */
  temperature?: number;
  statedAs: 'standard' | 'expanded' | 'limits';
}

/** A feed: a block with no inlets and one outlet of its own name. */
export interface FeedSpec extends UnitSpecBase {
  type: 'feed';
  /** Mole fractions, length n (for `flows` feeds, the normalized flows). */
  composition: Float64Array;
  basis: FeedBasis;
  /** Temperature (K) and absolute pressure (Pa) of the feed stream. */
  T: number;
  P: number;
}

export interface SolverSpec {
  method: 'direct' | 'wegstein' | 'newton' | 'auto';
  rtol: number;
  maxPasses?: number;
  /** Wegstein's acceleration bounds (default -5 <= q <= 0). */
  qMin?: number;
  qMax?: number;
}

/** A target written in the file (`targets:`), as text; parsed against the model by the study layer. */
export interface TargetDecl {
  output: string;
  value: string;
  by: string;
  within?: string;
  tolerance?: number;
  span?: SourceSpan;
}

export interface Model {
  file: string;
  title?: string;
  components: readonly ComponentData[];
  ids: readonly string[];
  index: ReadonlyMap<string, number>;
  /** Element counts of each component's formula. */
  elements: readonly Record<string, number>[];
  thermo: ThermoSpec;
  display: DisplaySpec;
  feeds: readonly FeedSpec[];
  units: readonly UnitSpecBase[];
  /** Tear streams as the file gives them (the plan has the ones used). */
  tears: readonly string[];
  /** Recycle loops, tears and calculation order: depends on the connections only. */
  plan: Plan;
  solver: SolverSpec;
  targets: readonly TargetDecl[];
  /** Where each stream is made (feed or unit outlet entry), for messages. */
  streamSpans: ReadonlyMap<string, SourceSpan | undefined>;
  /** Where each unit and feed is declared, for messages. */
  unitSpans: ReadonlyMap<string, SourceSpan | undefined>;
  /** What each feed (`feeds.NAME`) and unit (`NAME`) read, by that prefix: the parameter layer. */
  settings: ReadonlyMap<string, OwnerSettings>;
  /** The plant's instruments and its snapshot of readings (`instruments:`, `readings:`; src/plant). */
  instruments: readonly InstrumentDecl[];
  readings: ReadonlyMap<string, ReadingDecl>;
  warnings: readonly Diagnostic[];
  /**
   * True when these values passed the structure checks (every validated model, and withValues's
   * own when it checks); absent after withValues with `structure: false`.
   */
  structureChecked?: boolean;
}

/** A validated file: the model and the text it was read from. */
export interface LoadedFile {
  model: Model;
  /** The file as read. */
  source: { readonly path: string; readonly text: string };
}

/** A read-only Map: set, delete and clear throw, as they would on a frozen object. */
export class FrozenMap<K, V> extends Map<K, V> {
  private sealed = false;
  constructor(entries?: Iterable<readonly [K, V]>) {
    super(entries as Iterable<[K, V]>);
    this.sealed = true;
  }
  override set(key: K, value: V): this {
    if (this.sealed) throw new TypeError('a model is frozen: this map cannot change');
    return super.set(key, value);
  }
  override delete(): boolean {
    throw new TypeError('a model is frozen: this map cannot change');
  }
  override clear(): void {
    throw new TypeError('a model is frozen: this map cannot change');
  }
}

/** Freezes a value and everything it holds (objects, arrays, maps), except typed arrays. */
export function deepFreeze<T>(value: T, seen = new Set<unknown>()): T {
  // A frozen part was frozen whole when it was made (models share their unchanged parts).
  if (value === null || typeof value !== 'object' || seen.has(value) || ArrayBuffer.isView(value) || Object.isFrozen(value)) return value;
  seen.add(value);
  if (value instanceof Map) {
    for (const [k, v] of value) {
      deepFreeze(k, seen);
      deepFreeze(v, seen);
    }
  }
  for (const v of Object.values(value as object)) deepFreeze(v, seen);
  return Object.freeze(value);
}
