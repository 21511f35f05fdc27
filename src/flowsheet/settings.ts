/**
 * What a block read from the file, kept as plain data: the settings of one unit or feed (SI
 * numbers, names, flags; mappings as ordered maps) and the numeric parameters among them with
 * their unit, rule and position. A study changes a parameter by editing a copy of these settings
 * and letting the block read them again (settings-fields.ts): no YAML, no re-validation of the
 * document, the same rules.
 */
import type { SourceSpan } from '../diagnostics.js';
import type { Dimension } from '../units/index.js';
import type { NumberRule } from './fields.js';

export type Setting = number | string | boolean | readonly Setting[] | SettingMap;
export type SettingMap = ReadonlyMap<string, Setting>;

/** One numeric value a block read: a parameter that studies can set. */
export interface ParameterSlot {
  /** Keys from the owner's settings down to the value, e.g. ['reactions', '0', 'conversion']. */
  key: readonly string[];
  /** The value's dimension; undefined for a plain number (fraction, conversion). */
  dimension?: Dimension;
  /** The unit the file writes it in ('' for a plain number). */
  unit: string;
  /** SI value. */
  value: number;
  /** The rule the block reads it with (bounds). */
  rule: NumberRule;
  span?: SourceSpan;
  /** The outlet is written `rest` in the file (its value is what the others leave). */
  rest?: boolean;
  /** A standard volume flow: the name of its reference. */
  reference?: string;
}

/** The recorded settings of one unit or feed. */
export interface OwnerSettings {
  kind: 'unit' | 'feed';
  name: string;
  /** The block type (`feed` for feeds). */
  type: string;
  /** The path prefix of its parameters: the unit name, or `feeds.NAME`. */
  prefix: string;
  settings: SettingMap;
  slots: readonly ParameterSlot[];
  /** Positions of the values read, by key path joined with dots. */
  spans: ReadonlyMap<string, SourceSpan>;
  /** Position of the owner's name. */
  span?: SourceSpan;
}

export function isSettingMap(v: Setting | undefined): v is SettingMap {
  return v instanceof Map;
}

/** The settings with the value at `key` replaced (copies along the path; the input is unchanged). */
export function setIn(s: SettingMap, key: readonly string[], value: Setting): SettingMap {
  const [head, ...rest] = key;
  const out = new Map(s);
  if (rest.length === 0) {
    out.set(head, value);
    return out;
  }
  const child = s.get(head);
  if (Array.isArray(child)) {
    const k = Number(rest[0]);
    const list = child.slice();
    const item = list[k];
    list[k] = rest.length === 1 ? value : setIn(item as SettingMap, rest.slice(1), value);
    out.set(head, list);
  } else if (isSettingMap(child)) {
    out.set(head, setIn(child, rest, value));
  } else {
    throw new Error(`settings: no mapping at ${key.join('.')}`);
  }
  return out;
}

/** The value at `key`, or undefined. */
export function getIn(s: SettingMap, key: readonly string[]): Setting | undefined {
  let cur: Setting | undefined = s;
  for (const k of key) {
    if (Array.isArray(cur)) cur = (cur as readonly Setting[])[Number(k)];
    else if (isSettingMap(cur)) cur = cur.get(k);
    else return undefined;
  }
  return cur;
}
