/**
 * The validated model: SI numbers, component indices, resolved streams. Built from the parsed
 * document by validate.ts; read by the planner, the blocks and the reporters.
 */
import type { Diagnostic, SourceSpan } from '../diagnostics.js';
import type { ComponentData, EosName } from '../thermo/types.js';
import type { StandardRef } from '../units/index.js';

export interface ThermoSpec {
  eos: EosName;
  /** Binary interaction parameters, n*n row-major, symmetric, zero diagonal. */
  kij: Float64Array;
  /** Local atmospheric pressure for gauge readings, Pa. */
  atmosphere: number;
  standards: Map<string, StandardRef>;
}

export interface DisplaySpec {
  flowUnit: string;
  pressureUnit: string;
  temperatureUnit: string;
}

/** How a feed's flow is given. */
export type FeedBasis =
  | { kind: 'meter'; flow: number; T: number; P: number; design?: MeterDesign }
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

export interface FeedSpec {
  name: string;
  span?: SourceSpan;
  /** Mole fractions, length n (for `flows` feeds, the normalized flows). */
  composition: Float64Array;
  basis: FeedBasis;
  /** Temperature (K) and absolute pressure (Pa) of the feed stream. */
  T: number;
  P: number;
}

/** What every unit spec has; each block adds its own fields. */
export interface UnitSpecBase {
  name: string;
  type: string;
  inlets: string[];
  outlets: string[];
  span?: SourceSpan;
}

export interface SolverSpec {
  method: 'direct' | 'wegstein' | 'newton' | 'auto';
  rtol: number;
  maxPasses?: number;
  /** Wegstein bounds on q (default -5 <= q <= 0). */
  qMin?: number;
  qMax?: number;
}

export interface Model {
  file: string;
  title?: string;
  components: ComponentData[];
  ids: string[];
  index: Map<string, number>;
  /** Element counts of each component's formula. */
  elements: Record<string, number>[];
  thermo: ThermoSpec;
  display: DisplaySpec;
  feeds: FeedSpec[];
  units: UnitSpecBase[];
  tears: string[];
  solver: SolverSpec;
  /** Where each stream is made (feed or unit outlet entry), for messages. */
  streamSpans: Map<string, SourceSpan | undefined>;
  /** Where each unit and feed is declared, for messages. */
  unitSpans: Map<string, SourceSpan | undefined>;
  warnings: Diagnostic[];
}
