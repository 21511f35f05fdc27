/**
 * The view of a unit's (or a feed's) settings that a block's `read` sees: typed fields with SI
 * values. Blocks never touch YAML. Two readers implement it:
 *  - YamlFields (yaml-fields.ts) reads the file, reports problems at file:line:column, and
 *    records what it read as plain settings and numeric parameters;
 *  - SettingsFields (settings-fields.ts) reads those recorded settings again, after a study has
 *    changed a parameter, with the same rules and no YAML at all.
 * Because a block reads through this interface only, a value set by a study is checked by
 * exactly the rules that check it in the file.
 */
import type { SourceSpan } from '../diagnostics.js';
import type { ComponentData } from '../thermo/types.js';
import type { Dimension, StandardRef } from '../units/index.js';

export interface NumberRule {
  required?: boolean;
  min?: number;
  max?: number;
  /** Exclusive lower bound. */
  above?: number;
  example?: string;
  /**
   * A difference (an approach, an uncertainty): a temperature in K, never in a unit with an offset
   * such as degC; a pressure never in a gauge unit (barg, psig add the atmosphere).
   */
  difference?: boolean;
}

export interface FieldReader {
  /** What this reader describes, e.g. `unit "reactor"` or `reactions.0 of unit "reactor"`. */
  readonly what: string;
  readonly componentIds: readonly string[];
  readonly components: readonly ComponentData[];
  /** Element counts of each component's formula (for element balances). */
  readonly elements: readonly Record<string, number>[];
  has(key: string): boolean;
  /** Whether the key holds a mapping (rather than a single value). */
  isMapping(key: string): boolean;
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
  /**
   * `{ ID: number }` over the file's components; a dense array (missing = 0, or defaultValue),
   * with the ids given. With a dimension, each value is a quantity in SI.
   */
  componentValues(key: string, opts?: { required?: boolean; defaultValue?: number; min?: number; max?: number; dimension?: Dimension }): ComponentValues | undefined;
  /** `{ outlet: fraction | rest | {ID: fraction} }`; outlet names in the order written. */
  outlets(key: string): OutletEntry[] | undefined;
  /** A standard volume flow (`2400 Nm3/h`, or a volume flow at a named reference). */
  standardFlow(key: string, reference?: StandardRef): { value: number; reference: StandardRef } | undefined;
  /** A standard reference of the file by name; reports an unknown one at `key`. `null`: a reference whose definition failed (reported already). */
  standardReference(key: string): StandardRef | null | undefined;
  /** A nested mapping as a reader of its own. */
  sub(key: string, opts?: { required?: boolean; example?: string }): FieldReader | undefined;
  /** A list of sub-readers (e.g. reactions). */
  items(key: string, opts?: { required?: boolean }): FieldReader[] | undefined;
  /** Keys present, in the order written. */
  keys(): string[];
  /** Reports keys not in `allowed`, with a suggestion. */
  checkKeys(allowed: readonly string[]): void;
  /** Whether an unknown key that looks like one of these was reported already. */
  strayNear(...keys: string[]): boolean;
  /** Reports a problem at a key's value (or at the owner when the key is absent). */
  error(key: string | null, message: string, help?: string): void;
  /** Reports a problem at a key's name. */
  errorAtKey(key: string, message: string, help?: string): void;
  warning(key: string | null, message: string, help?: string): void;
}

export interface ComponentValues {
  /** Dense, length n. */
  values: Float64Array;
  /** Indices given in the file, in the order written. */
  given: number[];
}

export interface OutletEntry {
  stream: string;
  /** A fraction, `rest`, or per-component fractions (dense, length n; NaN where not given). */
  value: number | 'rest' | Float64Array;
  /** Reports a problem at the outlet's entry. */
  report(message: string, help?: string): void;
}
