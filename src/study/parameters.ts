/**
 * The parameter layer: every number a block read from the file (a conversion, a split, a meter
 * flow, a condenser temperature) is a typed parameter with a path, an SI value, the unit the file
 * writes it in and the bounds the block reads it with. Sweeps, targets and reconciliation move
 * parameters through this one layer:
 *
 *   parameter(model, 'purge-split.out.purge')          -> Parameter
 *   withValues(model, [{ parameter, value }])           -> a new Model (the old one unchanged)
 *
 * A new value is applied by editing a copy of the block's recorded settings (src/flowsheet/
 * settings.ts) and letting the block read them again (settings-fields.ts): the same rules as
 * the file, no YAML, no re-validation of the document. Blocks that are not touched keep their
 * specs, so a runtime switched to the new model (Runtime.load) rebuilds only what changed.
 * Paths: a unit's own (`reactor.reactions.0.conversion`, `cooler.T`, `purge-split.out.purge`)
 * or a feed's (`feeds.hydrogen.meter.flow`, `feeds.makeup.composition.Ar`).
 */
import { DiagnosticBag, InputError, didYouMean, type Diagnostic, type SourceSpan } from '../diagnostics.js';
import { blockOf } from '../blocks/registry.js';
import type { UnitSpecBase } from '../flowsheet/model.js';
import { deepFreeze, type FeedSpec, type Model } from '../flowsheet/model.js';
import { getIn, isSettingMap, setIn, type OwnerSettings, type ParameterSlot, type SettingMap } from '../flowsheet/settings.js';
import { SettingsFields } from '../flowsheet/settings-fields.js';
import { checkStructure } from '../flowsheet/structure.js';
import { frozenSettings } from '../flowsheet/validate.js';
import { offsetUnit, ruleProblem, type FieldContext, type Recording } from '../flowsheet/yaml-fields.js';
import { parseQuantity, UnitError, type Dimension } from '../units/index.js';
import { FrozenMap } from '../flowsheet/model.js';

export interface Parameter {
  /** As a study writes it: `reactor.reactions.0.conversion`, `feeds.hydrogen.meter.flow`. */
  path: string;
  /** The settings prefix of its unit or feed (`reactor`, `feeds.hydrogen`). */
  owner: string;
  /** Keys within the owner's settings. */
  key: readonly string[];
  /** The dimension of the value; undefined for a plain number (fraction, conversion). */
  dimension?: Dimension;
  /** The unit the file writes it in ('' for a plain number). */
  unit: string;
  /** SI value in the model (for an outlet written `rest`, what the others leave). */
  value: number;
  /** The bounds the block reads it with. */
  bounds: { min?: number; max?: number; above?: number; difference?: boolean };
  span?: SourceSpan;
  /** A standard volume flow: its reference (a value must be given at the same reference). */
  reference?: string;
  /** Written `rest` in the file. */
  rest?: boolean;
}

export interface ParameterValue {
  parameter: Parameter;
  /** SI */
  value: number;
}

function fail(message: string, help?: string, span?: SourceSpan): InputError {
  return new InputError([{ severity: 'error', message, help, span }]);
}

function toParameter(own: OwnerSettings, slot: ParameterSlot): Parameter {
  let value = slot.value;
  if (slot.rest) {
    // What the others leave: 1 - the sum of the numbers beside it.
    const outs = getIn(own.settings, slot.key.slice(0, -1));
    let sum = 0;
    if (isSettingMap(outs)) for (const [k, v] of outs) if (k !== slot.key[slot.key.length - 1] && typeof v === 'number') sum += v;
    value = Math.max(0, 1 - sum);
  }
  const { required: _r, example: _e, ...bounds } = slot.rule;
  return {
    path: `${own.prefix}.${slot.key.join('.')}`, owner: own.prefix, key: slot.key, dimension: slot.dimension, unit: slot.unit, value,
    bounds, span: slot.span, reference: slot.reference, rest: slot.rest,
  };
}

/**
 * Whether an outlet written `rest` is one number: what the others leave when each of them is a
 * fraction. Beside per-component recoveries (a separator) the rest differs by component.
 */
function restIsNumber(own: OwnerSettings, slot: ParameterSlot): boolean {
  const outs = getIn(own.settings, slot.key.slice(0, -1));
  if (!isSettingMap(outs)) return false;
  for (const [k, v] of outs) if (k !== slot.key[slot.key.length - 1] && typeof v !== 'number') return false;
  return true;
}

/** Every parameter of a model, in file order. */
export function parameters(model: Model): Parameter[] {
  return [...model.settings.values()].flatMap((own) => own.slots.filter((s) => !s.rest || restIsNumber(own, s)).map((s) => toParameter(own, s)));
}

/** The parameter at a path; throws InputError naming what exists nearby. */
export function parameter(model: Model, path: string): Parameter {
  const parts = path.split('.').map((p) => p.trim());
  if (parts.some((p) => p === '')) throw fail(`input path \`${path}\` has an empty part`, 'write it as `unit.key` or `feeds.name.key`, e.g. `reactor.reactions.0.conversion`');
  const feed = parts[0] === 'feeds';
  const prefix = feed ? `feeds.${parts[1] ?? ''}` : parts[0];
  const own = model.settings.get(prefix);
  if (!own) {
    if (['thermo', 'solver', 'components', 'display', 'tears', 'targets', 'title'].includes(parts[0])) {
      throw fail(`input path \`${path}\`: \`${parts[0]}\` settings cannot be varied by a study`,
        'vary a number of a unit or a feed (a conversion, a split, a flow, a temperature or a pressure); for another equation of state or other constants, write a second file');
    }
    const names = [...model.settings.values()].map((o) => (o.kind === 'feed' ? `feeds.${o.name}` : o.name));
    throw fail(`input path \`${path}\`: there is no unit or feed \`${feed ? prefix : parts[0]}\``, didYouMean(feed ? prefix : parts[0], names) ?? `the units and feeds are: ${names.join(', ')}`);
  }
  const key = parts.slice(feed ? 2 : 1);
  const slot = own.slots.find((s) => s.key.length === key.length && s.key.every((k, i) => k === key[i]));
  if (!slot) {
    const here = own.slots.map((s) => `${prefix}.${s.key.join('.')}`);
    const written = getIn(own.settings, key);
    if (written !== undefined && typeof written !== 'number') {
      throw fail(`input path \`${path}\` leads to ${typeof written === 'string' ? `\`${written}\`` : 'a group of settings'}, not a number`, `the numbers of \`${prefix}\` are: ${here.join(', ')}`);
    }
    throw fail(`input path \`${path}\`: \`${prefix}\` has no number \`${key.join('.')}\``, didYouMean(path, here) ?? `the numbers of \`${prefix}\` are: ${here.join(', ') || 'none'}`);
  }
  if (slot.rest && !restIsNumber(own, slot)) {
    const other = own.slots.find((s) => s.key.length > slot.key.length && s.key[0] === slot.key[0]);
    throw fail(`input path \`${path}\`: the outlet is written \`rest\` beside per-component recoveries, so what it takes differs by component; it is no single number to vary`,
      `vary the recoveries of the other outlets${other ? `, e.g. \`${prefix}.${other.key.join('.')}\`` : ''}`, slot.span);
  }
  return toParameter(own, slot);
}

/**
 * Refuses, before anything is solved, a parameter that cannot change on its own whatever its
 * value (one of three splitter outlets when none is written `rest`). Throws InputError.
 */
export function assertVariable(model: Model, p: Parameter): void {
  const own = model.settings.get(p.owner)!;
  const def = blockOf(own);
  if (!def.edit) return;
  const e = def.edit(own.name, own.settings, p.key, p.rest ? 0.5 : p.value);
  if (!isSettingMap(e as SettingMap)) {
    const r = e as { error: string; help?: string };
    throw new InputError([{ severity: 'error', message: r.error, help: r.help, span: p.span }]);
  }
}

/** Why a value is outside the parameter's bounds, or undefined. */
export function checkValue(p: Parameter, value: number): string | undefined {
  if (!Number.isFinite(value)) return `\`${p.path}\` must be a finite number, not ${value}`;
  return ruleProblem(`\`${p.path}\``, value, p.bounds, p.dimension);
}

/** The SI value of `value [unit]` for a parameter; a unit is required where the file writes one. */
export function toSI(model: Model, p: Parameter, value: number, unit?: string): number {
  if (p.dimension === undefined) {
    if (unit !== undefined && unit !== '') throw fail(`\`${p.path}\` is a plain number in the file; it takes no unit (\`${unit}\` given)`);
    return value;
  }
  const u = unit ?? p.unit;
  if (p.bounds.difference && offsetUnit(u, p.dimension)) {
    throw fail(`\`${p.path}\` is a temperature difference; \`${u}\` reads a temperature (it has an offset)`, 'give the values in K (a difference of 1 degC is 1 K)');
  }
  try {
    const q = parseQuantity(`${value} ${u}`, p.dimension, { atmosphere: model.thermo.atmosphere, standards: model.thermo.standards as Map<string, never> });
    if (p.bounds.difference && q.gauge) {
      throw fail(`\`${p.path}\` is a pressure difference; \`${u}\` reads a gauge pressure (it adds the atmosphere)`, 'give the values in bar, kPa or psi');
    }
    if (p.reference && q.standard && q.standard.name !== p.reference) {
      throw fail(`\`${p.path}\` is a standard volume flow at reference \`${p.reference}\` in the file; give values at the same reference, not at \`${q.standard.name}\``, `write the values in ${p.unit}`);
    }
    return q.value;
  } catch (e) {
    if (e instanceof UnitError) throw fail(`the unit of \`${p.path}\`: ${e.message}`, e.help);
    throw e;
  }
}

/** Checks that a unit suits a parameter (throws InputError). */
export function checkUnit(model: Model, p: Parameter, unit: string): void {
  toSI(model, p, 1, unit);
}

/** The value of a parameter in a given unit (the file's unit when none), from SI. */
export function fromSI(model: Model, p: Parameter, si: number, unit?: string): number {
  if (p.dimension === undefined) return si;
  const one = toSI(model, p, 1, unit);
  const zero = p.dimension === 'temperature' || p.dimension === 'pressure' ? toSI(model, p, 0, unit) : 0;
  return (si - zero) / (one - zero);
}

function fieldContext(model: Model): FieldContext {
  return {
    ids: model.ids, index: model.index, components: model.components, elements: model.elements,
    atmosphere: model.thermo.atmosphere, standards: model.thermo.standards, failedStandards: new Set(),
  };
}

/**
 * A new model with the parameters set (SI values). Throws InputError with one message per
 * problem (a value outside its bounds, a combination the block refuses, a structure with no
 * steady state). `structure: false` skips the structure checks (inside a target's Newton
 * iteration, where a bound is checked up front).
 */
export function withValues(model: Model, values: readonly ParameterValue[], opts: { structure?: boolean } = {}): Model {
  if (values.length === 0) return model;
  const diags: Diagnostic[] = [];
  const byOwner = new Map<string, ParameterValue[]>();
  for (const v of values) {
    const bad = v.parameter.rest ? undefined : checkValue(v.parameter, v.value);
    if (bad) {
      diags.push({ severity: 'error', message: bad, span: v.parameter.span, help: boundsHelp(v.parameter) });
      continue;
    }
    const list = byOwner.get(v.parameter.owner) ?? [];
    list.push(v);
    byOwner.set(v.parameter.owner, list);
  }
  const units = model.units.slice();
  const feeds = model.feeds.slice();
  const settings = new Map(model.settings);
  const ctx = fieldContext(model);
  for (const [prefix, list] of byOwner) {
    const own = model.settings.get(prefix)!;
    const def = blockOf(own);
    let s: SettingMap = own.settings;
    let ok = true;
    for (const { parameter: p, value } of list) {
      // A standard volume flow is kept with its reference: the value is its `value`.
      const key = p.reference !== undefined ? [...p.key, 'value'] : p.key;
      const e = def.edit ? def.edit(own.name, s, key, value) : setIn(s, key, value);
      if (!isSettingMap(e as SettingMap)) {
        const r = e as { error: string; help?: string };
        diags.push({ severity: 'error', message: r.error, help: r.help, span: p.span });
        ok = false;
      } else s = e as SettingMap;
    }
    if (!ok) continue;
    const bag = new DiagnosticBag();
    const rec: Recording = { slots: [], spans: new Map() };
    const before = new Map(own.slots.map((x) => [x.key.join('.'), x] as const));
    const what = `${own.kind} \`${own.name}\``;
    const spec = def.read(own.name, new SettingsFields(s, what, ctx, before, own.spans, rec, [], bag, own.span));
    if (!spec || bag.hasErrors) {
      const set = list.map((v) => `\`${v.parameter.path}\` = ${fmt(v.value)}`).join(', ');
      for (const d of bag.errors()) diags.push({ ...d, message: `with ${set}: ${d.message}` });
      if (!bag.hasErrors) diags.push({ severity: 'error', message: `with ${set}: ${what} cannot be read`, span: own.span });
      continue;
    }
    if (own.kind === 'feed') {
      const k = feeds.findIndex((f) => f.name === own.name);
      spec.span = feeds[k].span;
      feeds[k] = spec as FeedSpec;
    } else {
      const k = units.findIndex((u) => u.name === own.name);
      spec.span = units[k].span;
      units[k] = spec as UnitSpecBase;
    }
    settings.set(prefix, { ...own, settings: frozenSettings(s), slots: rec.slots });
  }
  if (diags.length) throw new InputError(diags);
  const next: Model = { ...model, units, feeds, settings: new FrozenMap(settings) };
  delete next.structureChecked;
  if (opts.structure === false) return deepFreeze(next);
  next.structureChecked = true;
  if (!sameStructure(model, next, [...byOwner.keys()])) {
    const bag = new DiagnosticBag();
    checkStructure(next, bag);
    if (bag.hasErrors) {
      const set = values.map((v) => `\`${v.parameter.path}\` = ${fmt(v.value)}`).join(', ');
      throw new InputError(bag.errors().map((d) => ({ ...d, message: `with ${set}: ${d.message}` })));
    }
  }
  return deepFreeze(next);
}

/** Whether a model passes the structure checks: said by the model when it was checked, else checked now. */
function passesStructure(model: Model): boolean {
  if (model.structureChecked) return true;
  const bag = new DiagnosticBag();
  checkStructure(model, bag);
  return !bag.hasErrors;
}

/**
 * Whether `next` (model with the owners `changed` read again with other values) passes the
 * structure checks because model does and nothing they read differs: the checks read the
 * topology and feed names (which values do not change), which components each feed carries,
 * and each unit's structure rules, which depend on its values only through its block's
 * structureKey. False when that cannot be told: the checks then run.
 */
function sameStructure(model: Model, next: Model, changed: readonly string[]): boolean {
  for (const prefix of changed) {
    const own = model.settings.get(prefix);
    if (own === undefined) return false;
    if (own.kind === 'feed') {
      const a = model.feeds.find((f) => f.name === own.name);
      const b = next.feeds.find((f) => f.name === own.name);
      if (!a || !b || a.composition.length !== b.composition.length) return false;
      for (let i = 0; i < a.composition.length; i++) if (a.composition[i] > 0 !== b.composition[i] > 0) return false;
    } else {
      const a = model.units.find((u) => u.name === own.name);
      const b = next.units.find((u) => u.name === own.name);
      if (!a || !b || a.type !== b.type) return false;
      const def = blockOf(b);
      if (def.structure === undefined) continue; // no rules: everything everywhere, whatever the values
      const ka = def.structureKey?.(a, model);
      if (ka === undefined || ka !== def.structureKey!(b, next)) return false;
    }
  }
  return passesStructure(model);
}

function boundsHelp(p: Parameter): string | undefined {
  const b = p.bounds;
  const parts: string[] = [];
  if (b.above !== undefined) parts.push(`above ${b.above}`);
  if (b.min !== undefined) parts.push(`at least ${b.min}`);
  if (b.max !== undefined) parts.push(`at most ${b.max}`);
  return parts.length ? `keep \`${p.path}\` ${parts.join(' and ')}${p.dimension ? ' (SI)' : ''}, as the file's rules require` : undefined;
}

function fmt(v: number): string {
  return Number(v.toPrecision(10)).toString();
}

/** A number of an owner's settings as the block reads it (an outlet written `rest`: what the others leave). */
function effectiveAt(settings: SettingMap, key: readonly string[]): number | undefined {
  const v = getIn(settings, key);
  if (typeof v === 'number') return v;
  if (v !== 'rest') return undefined;
  const outs = getIn(settings, key.slice(0, -1));
  let sum = 0;
  if (isSettingMap(outs)) for (const [k, x] of outs) if (k !== key[key.length - 1] && typeof x === 'number') sum += x;
  return 1 - sum;
}

/** Whether setting `a` moves `b` (by the block's own edit), tried with one value of `a`. */
function moves(model: Model, a: Parameter, b: Parameter): boolean {
  const own = model.settings.get(a.owner);
  if (!own) return false;
  const def = blockOf(own);
  if (!def.edit) return false;
  const fraction = a.dimension === undefined && a.value >= 0 && a.value <= 1;
  const trial = fraction ? (Math.abs(a.value - 0.5) > 0.1 ? 0.5 : 0.25) : a.value * 1.1 + 1;
  const key = a.reference !== undefined ? [...a.key, 'value'] : a.key;
  const e = def.edit(own.name, own.settings, key, trial);
  if (!isSettingMap(e as SettingMap)) return false;
  return effectiveAt(e as SettingMap, b.key) !== effectiveAt(own.settings, b.key);
}

/**
 * Whether two inputs are one: setting either moves the other (the two outlets of a two-outlet
 * splitter, an outlet and the one written `rest`, two fractions of one feed's composition). A
 * study cannot sweep one and adjust the other: the last value set would win, unseen.
 */
export function coupled(model: Model, a: Parameter, b: Parameter): boolean {
  if (a.path === b.path) return true;
  if (a.owner !== b.owner) return false;
  return moves(model, a, b) || moves(model, b, a);
}
