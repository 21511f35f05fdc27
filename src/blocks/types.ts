/** What a unit block is: how it reads its settings, and how it computes its outlets. */
import type { FieldReader } from '../flowsheet/fields.js';
import type { Model, UnitSpecBase } from '../flowsheet/model.js';
import type { EvaluationFailure } from '../solve/types.js';
import type { Eos } from '../thermo/types.js';

/** The state of one stream inside a solve: SI, component flows in mol/s. */
export interface Stream {
  flows: Float64Array;
  /** K */
  T: number;
  /** Pa, absolute */
  P: number;
  /** Vapour mole fraction, NaN where not computed (a mixer outlet, a feed given by mass). */
  vf: number;
}

export function newStream(n: number): Stream {
  return { flows: new Float64Array(n), T: Number.NaN, P: Number.NaN, vf: Number.NaN };
}

export function copyStream(from: Stream, to: Stream): void {
  to.flows.set(from.flows);
  to.T = from.T;
  to.P = from.P;
  to.vf = from.vf;
}

export interface BuildContext {
  model: Model;
  eos: Eos;
}

/** A figure a unit reports after the solve (extent, conversion, vapour fraction...). */
export interface UnitFigure {
  label: string;
  /** SI value (mol/s, fraction, K, Pa) */
  value: number;
  kind: 'molarFlow' | 'fraction' | 'temperature' | 'pressure' | 'count';
  /** JSON key */
  key: string;
}

export interface UnitSummary {
  figures: UnitFigure[];
  notes: string[];
  /** Reactions (reactors): extent in mol/s, and conversion of its key per pass. */
  reactions?: { equation: string; key: string; extent: number; conversion: number; requested?: number }[];
}

export interface BlockRuntime {
  readonly spec: UnitSpecBase;
  /** Outlets from inlets (in the order of spec.inlets and spec.outlets). Pure in its inputs, apart from warm-start caches. */
  compute(ins: readonly Stream[], outs: Stream[]): void;
  /**
   * A condition of the last compute that makes it no true solution (a reactant that would go
   * negative, a flash that did not converge); null when there is none.
   */
  issue(): EvaluationFailure | null;
  /** Net generation of each component (mol/s) in the last compute; reactors only. */
  generation?(): Float64Array;
  /** Figures for the unit line of the report. */
  summary(ins: readonly Stream[], outs: readonly Stream[]): UnitSummary;
  /** Resets any warm-start cache (so that a solve does not depend on the previous one). */
  reset?(): void;
}

export interface BlockDef<S extends UnitSpecBase = UnitSpecBase> {
  /** The `type:` value in the file. */
  type: string;
  /** One line for help texts. */
  description: string;
  /** Keys allowed besides `type`. */
  keys: readonly string[];
  read(name: string, f: FieldReader): S | undefined;
  build(spec: S, ctx: BuildContext): BlockRuntime;
}
