/**
 * The plant's instruments and readings as a flowsheet file declares them (`instruments:` and
 * `readings:`), in SI, with their positions: plain data, frozen with the model. Read by read.ts;
 * used by the reconciliation of plant data (plant.ts) and the historian rows (historian.ts).
 *
 * Kinds of instrument:
 *   meter        actual volume flow at line pressure and temperature (two other instruments of
 *                kind pressure and temperature, named by tag), converted to a molar flow with the
 *                file's equation of state as a feed meter is (a differential-pressure meter's
 *                design density correction included)
 *   mass         mass flow
 *   molar        molar flow
 *   standard     standard volume flow at a stated reference
 *   analyzer     mole fractions of the listed components; by default normalized over the listed
 *                components (the rest of the stream, such as ammonia taken out before the cell,
 *                is not read), or of the whole stream with `normalized: false`
 *   pressure, temperature   line conditions of meters (they take no part in the balances)
 * Every uncertainty is the expanded uncertainty at 95 % (coverage factor k = 2) as a data sheet
 * states it: relative (`1.5 %`, of the reading) or absolute (a value in the reading's dimension;
 * for an analyzer a mole fraction); the standard uncertainty is U / 2.
 */
import type { SourceSpan } from '../diagnostics.js';
import type { MeterDesign } from '../flowsheet/model.js';
import type { Dimension, StandardRef } from '../units/index.js';

export const FLOW_KINDS = ['meter', 'mass', 'molar', 'standard'] as const;
export const INSTRUMENT_KINDS = [...FLOW_KINDS, 'analyzer', 'pressure', 'temperature'] as const;
export type FlowKind = (typeof FLOW_KINDS)[number];
export type InstrumentKind = (typeof INSTRUMENT_KINDS)[number];

/** Coverage factor of every stated uncertainty (JCGM 100:2008, Sec. 6.3: about 95 % for a normal distribution). */
export const COVERAGE = 2;

/**
 * An expanded uncertainty as written: relative to the reading, or absolute in SI. An absolute
 * standard volume flow keeps the reference its unit named (`20 Nm3/h`): it is m3/s at that
 * reference, which need not be the reading's.
 */
export type Expanded = { relative: number } | { absolute: number; reference?: StandardRef };

/** The dimension of an instrument's reading. */
export function readingDimension(kind: InstrumentKind): Dimension {
  switch (kind) {
    case 'meter':
      return 'volumeFlow';
    case 'mass':
      return 'massFlow';
    case 'molar':
      return 'molarFlow';
    case 'standard':
      return 'standardFlow';
    case 'pressure':
      return 'pressure';
    case 'temperature':
      return 'temperature';
    case 'analyzer':
      return 'dimensionless';
  }
}

export interface InstrumentDecl {
  tag: string;
  stream: string;
  kind: InstrumentKind;
  /** Flows, pressure, temperature: the expanded uncertainty (U, k = 2). */
  uncertainty?: Expanded;
  /** Analyzer: component indices read, in the order written, and U of each (same order). */
  components?: number[];
  componentUncertainty?: Expanded[];
  /** Analyzer: fractions normalized over the listed components (default) or of the whole stream. */
  normalized?: boolean;
  /** Meter: the tags of its line pressure and temperature instruments. */
  pressure?: string;
  temperature?: string;
  /** Meter: design basis of a differential-pressure meter (square-root density correction). */
  design?: MeterDesign;
  /** Standard: the reference and whether the volume is the real-gas one (default) or ideal. */
  reference?: StandardRef;
  realGas?: boolean;
  /** The unit of its column in a historian export when the export has no unit row. */
  unit?: string;
  /** Readings outside [min, max] (SI) are left out of a row as out of range; a standard volume
   * flow's range is at `reference` (its unit's), which need not be the reading's. */
  range?: { min?: number; max?: number; reference?: StandardRef };
  span?: SourceSpan;
}

/** One reading of the file's snapshot (`readings:`), SI. */
export interface ReadingDecl {
  tag: string;
  /** Single-valued instruments. */
  value?: number;
  /** Analyzer: mole fractions by component index (NaN where not given). */
  fractions?: Float64Array;
  /** A standard reading's reference, when its unit named one. */
  reference?: StandardRef;
  span?: SourceSpan;
}

/**
 * Standard uncertainty (U / k) of a reading. For a standard volume flow read at reference `at`,
 * an absolute uncertainty stated at another reference is first taken to `at`: the same amount of
 * gas, Q_at = Q_u (P_u T_at) / (T_u P_at) (ideal molar volumes; the real-gas ratio differs by
 * the compressibility's change between the references, a few parts in 10^4 at most for gases
 * near 1 atm, negligible in an uncertainty).
 */
export function standardUncertainty(u: Expanded, reading: number, at?: StandardRef): number {
  if ('relative' in u) return (u.relative * Math.abs(reading)) / COVERAGE;
  return atReference(u.absolute, u.reference, at) / COVERAGE;
}

/** A standard volume (flow) at reference `from` as the same amount of gas at `to` (ideal molar volumes); unchanged when either is not known. */
export function atReference(v: number, from: StandardRef | undefined, to: StandardRef | undefined): number {
  return from && to && from.name !== to.name ? (v * from.P * to.T) / (from.T * to.P) : v;
}
