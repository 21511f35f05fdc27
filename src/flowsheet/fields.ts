/**
 * The view of a unit's settings that a block's `read` sees: typed fields with SI values.
 * Blocks never touch YAML; problems they find are reported at the field's position.
 */
import type { Dimension } from '../units/index.js';

export interface NumberRule {
  required?: boolean;
  min?: number;
  max?: number;
  /** Exclusive lower bound. */
  above?: number;
  example?: string;
}

export interface FieldReader {
  /** What this reader describes, e.g. `unit "reactor"` or `reaction 1 of unit "reactor"`. */
  readonly what: string;
  readonly componentIds: readonly string[];
  /** Element counts of each component's formula (for element balances). */
  readonly elements: readonly Record<string, number>[];
  has(key: string): boolean;
  /** A dimensional value in SI. A bare number is an error. */
  quantity(key: string, dimension: Dimension, rule?: NumberRule): number | undefined;
  /** A plain number (fractions, conversions). */
  number(key: string, rule?: NumberRule): number | undefined;
  string(key: string, opts?: { required?: boolean; oneOf?: readonly string[]; example?: string }): string | undefined;
  boolean(key: string): boolean | undefined;
  /** One stream name. */
  stream(key: string, opts?: { required?: boolean }): string | undefined;
  /** One or more stream names (a list, or a single name). */
  streams(key: string, opts?: { required?: boolean }): string[] | undefined;
  /** A component id known to the file; returns its index. */
  component(key: string, opts?: { required?: boolean }): number | undefined;
  /** `{ ID: fraction }` over the file's components; returns a dense array (missing = 0) or undefined. */
  componentFractions(key: string, opts?: { required?: boolean; defaultValue?: number }): Float64Array | undefined;
  /** `{ outlet: fraction | rest | {ID: fraction} }`; outlet names in the order written. */
  outlets(key: string): OutletEntry[] | undefined;
  /** A list of sub-readers (e.g. reactions). */
  items(key: string, opts?: { required?: boolean; what?: string }): FieldReader[] | undefined;
  /** Keys present, in the order written. */
  keys(): string[];
  /** Reports keys not in `allowed`, with a suggestion. */
  checkKeys(allowed: readonly string[]): void;
  /** Reports a problem at a key (or at the unit when the key is absent). */
  error(key: string | null, message: string, help?: string): void;
  warning(key: string | null, message: string, help?: string): void;
}

export interface OutletEntry {
  stream: string;
  /** A fraction, `rest`, or per-component fractions (dense, length n; NaN where not given). */
  value: number | 'rest' | Float64Array;
  /** A reader over the outlet's entry, for reporting. */
  report(message: string, help?: string): void;
}
