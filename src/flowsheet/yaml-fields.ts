/**
 * FieldReader over a YAML mapping of the file: every problem is reported at its position, and
 * what the block reads is recorded (settings.ts) so that a study can change a parameter later
 * without the YAML.
 */
import type { Node } from 'yaml';
import { didYouMean, type SourceSpan } from '../diagnostics.js';
import type { ComponentData } from '../thermo/types.js';
import { parseQuantity, UnitError, type Dimension, type StandardRef } from '../units/index.js';
import type { ComponentValues, FieldReader, NumberRule, OutletEntry } from './fields.js';
import type { ParameterSlot, Setting } from './settings.js';
import type { Entry, Reader } from './source.js';

/** What every reader of one file shares. */
export interface FieldContext {
  ids: readonly string[];
  index: ReadonlyMap<string, number>;
  components: readonly ComponentData[];
  elements: readonly Record<string, number>[];
  atmosphere: number;
  standards: ReadonlyMap<string, StandardRef>;
  /** References whose definition had errors (reported already). */
  failedStandards: ReadonlySet<string>;
}

/** Where the readers of one owner record what they read. */
export interface Recording {
  slots: ParameterSlot[];
  spans: Map<string, SourceSpan>;
}

export function reportUnitError(r: Reader, node: Node | null, what: string, err: unknown): void {
  if (err instanceof UnitError) {
    r.bag.error(`${what}: ${err.message}`, r.at(node), err.help);
  } else throw err;
}

/** The unit text after the number of a quantity as written (`30 barg` -> `barg`). */
export function unitText(written: string): string {
  return written.trim().replace(/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*/, '');
}

/** Whether a unit of this dimension reads a value with an offset (degC, degF): not a difference. */
export function offsetUnit(unit: string, dim: Dimension): boolean {
  if (dim !== 'temperature' || unit === '') return false;
  try {
    return parseQuantity(`0 ${unit}`, dim).value !== 0;
  } catch {
    return false;
  }
}

/**
 * The highest absolute pressure read, Pa (10 000 bar): ten times the highest pressure any gas loop
 * or meter here is checked at, and far past the cubic equations' support; above it (a reading in
 * Pa written with bar, a slip of the exponent) the equations of state have no physical root.
 */
export const MAX_PRESSURE = 1e9;

/** Why a value breaks a rule, or undefined. `dim` words the message for pressures and temperatures. */
export function ruleProblem(what: string, v: number, rule: NumberRule, dim?: Dimension | readonly Dimension[]): string | undefined {
  const abs = dim === 'pressure' && !rule.difference ? ' (absolute, after any gauge conversion)' : dim === 'temperature' && !rule.difference ? ' (absolute)' : '';
  const si = dim === 'pressure' ? `${fmt(v)} Pa` : dim === 'temperature' ? `${fmt(v)} K` : fmt(v);
  if (dim === 'pressure' && !rule.difference && v > MAX_PRESSURE) return `${what} is ${si}${abs}; loopclose computes pressures up to 1e9 Pa (10000 bar)`;
  if (rule.above !== undefined && !(v > rule.above)) return `${what} is ${si}${abs}; it must be above ${rule.above === 0 && dim ? 'zero' : rule.above}`;
  if (rule.min !== undefined && v < rule.min) return `${what} is ${si}; it must be at least ${rule.min}`;
  if (rule.max !== undefined && v > rule.max) return `${what} is ${si}; it must be at most ${rule.max}`;
  return undefined;
}

function checkRule(r: Reader, node: Node | null, what: string, v: number, rule: NumberRule, dim?: Dimension | readonly Dimension[]): boolean {
  const p = ruleProblem(what, v, rule, dim);
  if (p) r.bag.error(p, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
  return p === undefined;
}

/** A dimensional scalar at a node, in SI, with the rule checked. */
export function quantityAt(r: Reader, node: Node | null, dim: Dimension | readonly Dimension[], what: string, rule: NumberRule, ctx: { atmosphere: number; standards?: ReadonlyMap<string, StandardRef> }) {
  const q = parsedQuantityAt(r, node, dim, what, rule, ctx);
  return q?.value;
}

/** quantityAt with what was parsed: the value, its unit and, for a standard volume flow, its reference. */
export function parsedQuantityAt(r: Reader, node: Node | null, dim: Dimension | readonly Dimension[], what: string, rule: NumberRule, ctx: { atmosphere: number; standards?: ReadonlyMap<string, StandardRef> }) {
  const v = r.scalar(node, what);
  if (v === undefined) return undefined;
  if (v === null) {
    r.bag.error(`${what} has no value`, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return undefined;
  }
  if (typeof v === 'boolean') {
    r.bag.error(`${what} must be a value with a unit, not \`${v}\``, r.at(node), rule.example ? `for example \`${rule.example}\`` : undefined);
    return undefined;
  }
  let q;
  try {
    q = parseQuantity(v, dim, { atmosphere: ctx.atmosphere, standards: ctx.standards as Map<string, StandardRef> | undefined });
  } catch (err) {
    if (err instanceof UnitError && err.kind === 'missing-unit' && rule.example) err.help = `write a unit, e.g. \`${rule.example}\``;
    reportUnitError(r, node, what, err);
    return undefined;
  }
  if (rule.difference && offsetUnit(unitText(String(v)), q.dimension)) {
    r.bag.error(`${what} is a temperature difference, but \`${unitText(String(v))}\` reads a temperature (it has an offset)`, r.at(node), `write the difference in K, e.g. ${rule.example ? `\`${rule.example}\`` : '`20 K`'} (a difference of 1 degC is 1 K)`);
    return undefined;
  }
  if (rule.difference && q.gauge) {
    r.bag.error(`${what} is a pressure difference, but \`${unitText(String(v))}\` reads a gauge pressure (it adds the atmosphere)`, r.at(node), `write the difference in bar, kPa or psi, e.g. ${rule.example ? `\`${rule.example}\`` : '`0.1 bar`'}: a gauge unit such as barg or psig adds the atmosphere`);
    return undefined;
  }
  if (!checkRule(r, node, what, q.value, rule, dim)) return undefined;
  return { ...q, unit: unitText(String(v)) };
}

export function requiredQuantity(r: Reader, entries: Entry[], key: string, dim: Dimension | readonly Dimension[], what: string, parent: Node | null, rule: NumberRule, ctx: { atmosphere: number; standards?: ReadonlyMap<string, StandardRef> }) {
  const e = r.find(entries, key);
  if (!e) {
    if (r.strayNear(entries, key)) return undefined;
    r.bag.error(`${what} is missing`, r.at(parent), rule.example ? `add \`${key}: ${rule.example}\`` : undefined);
    return undefined;
  }
  return quantityAt(r, e.value, dim, what, rule, ctx);
}

function fmt(v: number): string {
  return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(6)));
}

/** FieldReader over a YAML mapping, recording what it reads. */
export class YamlFields implements FieldReader {
  readonly componentIds: readonly string[];
  readonly components: readonly ComponentData[];
  readonly elements: readonly Record<string, number>[];

  constructor(
    private readonly r: Reader,
    private readonly entries: Entry[],
    private readonly owner: Node | null,
    readonly what: string,
    private readonly ctx: FieldContext,
    private readonly rec: Recording,
    private readonly prefix: readonly string[],
    /** The settings of this mapping, filled as the block reads. */
    readonly settings: Map<string, Setting>,
  ) {
    this.componentIds = ctx.ids;
    this.components = ctx.components;
    this.elements = ctx.elements;
  }

  private get(key: string) {
    return this.r.find(this.entries, key);
  }

  private path(...key: string[]): string[] {
    return [...this.prefix, ...key];
  }

  private spanAt(key: string[], node: Node | null): SourceSpan | undefined {
    const s = this.r.at(node);
    if (s) this.rec.spans.set(key.join('.'), s);
    return s;
  }

  private missing(key: string, example?: string) {
    if (this.r.strayNear(this.entries, key)) return; // a misspelling of it is reported already
    this.r.bag.error(`${this.what} has no \`${key}\``, this.r.at(this.owner), example ? `add \`${key}: ${example}\`` : undefined);
  }

  has(key: string): boolean {
    return this.get(key) !== undefined;
  }

  isMapping(key: string): boolean {
    const e = this.get(key);
    return e !== undefined && this.r.isMap(this.r.src.peek(e.value));
  }

  quantity(key: string, dimension: Dimension, rule: NumberRule = {}): number | undefined {
    const e = this.get(key);
    if (!e) {
      if (rule.required) this.missing(key, rule.example);
      return undefined;
    }
    const q = parsedQuantityAt(this.r, e.value, dimension, `\`${key}\` of ${this.what}`, rule, this.ctx);
    if (q === undefined) return undefined;
    const k = this.path(key);
    this.rec.slots.push({ key: k, dimension: q.dimension, unit: q.unit, value: q.value, rule, span: this.spanAt(k, e.value) });
    this.settings.set(key, q.value);
    return q.value;
  }

  number(key: string, rule: NumberRule = {}): number | undefined {
    const e = this.get(key);
    if (!e) {
      if (rule.required) this.missing(key, rule.example);
      return undefined;
    }
    const what = `\`${key}\` of ${this.what}`;
    const v = this.r.number(e.value, what, rule.example);
    if (v === undefined) return undefined;
    if (!checkRule(this.r, e.value, what, v, rule)) return undefined;
    const k = this.path(key);
    this.rec.slots.push({ key: k, unit: '', value: v, rule, span: this.spanAt(k, e.value) });
    this.settings.set(key, v);
    return v;
  }

  string(key: string, opts: { required?: boolean; oneOf?: readonly string[]; example?: string } = {}): string | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, opts.example ?? opts.oneOf?.[0]);
      return undefined;
    }
    const v = this.r.string(e.value, `\`${key}\` of ${this.what}`, opts.example);
    if (v !== undefined && opts.oneOf && !opts.oneOf.includes(v)) {
      this.r.bag.error(`\`${key}\` of ${this.what} is \`${v}\``, this.r.at(e.value), didYouMean(v, opts.oneOf) ?? `use one of: ${opts.oneOf.join(', ')}`);
      return undefined;
    }
    if (v !== undefined) {
      this.spanAt(this.path(key), e.value);
      this.settings.set(key, v);
    }
    return v;
  }

  boolean(key: string): boolean | undefined {
    const e = this.get(key);
    if (!e) return undefined;
    const v = this.r.boolean(e.value, `\`${key}\` of ${this.what}`);
    if (v !== undefined) this.settings.set(key, v);
    return v;
  }

  private streamName(node: Node | null, what: string): string | undefined {
    const v = this.r.scalar(node, what);
    if (v === undefined) return undefined;
    if (typeof v !== 'string' || v.trim() === '') {
      this.r.bag.error(`${what} must be a stream name`, this.r.at(node));
      return undefined;
    }
    return v;
  }

  stream(key: string, opts: { required?: boolean } = {}): string | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, 'stream-name');
      return undefined;
    }
    const s = this.streamName(e.value, `\`${key}\` of ${this.what}`);
    if (s !== undefined) {
      this.spanAt(this.path(key, '0'), e.value);
      this.settings.set(key, s);
    }
    return s;
  }

  streams(key: string, opts: { required?: boolean } = {}): string[] | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, '[stream-a, stream-b]');
      return undefined;
    }
    const items = this.r.list(e.value, `\`${key}\` of ${this.what}`, true);
    if (!items) return undefined;
    const out: string[] = [];
    for (const it of items) {
      const s = this.streamName(it, `a stream in \`${key}\` of ${this.what}`);
      if (s === undefined) return undefined;
      if (out.includes(s)) {
        this.r.bag.error(`stream \`${s}\` is listed twice in \`${key}\` of ${this.what}`, this.r.at(it));
        return undefined;
      }
      this.spanAt(this.path(key, String(out.length)), it);
      out.push(s);
    }
    if (out.length === 0) {
      this.r.bag.error(`\`${key}\` of ${this.what} is empty`, this.r.at(e.keyNode));
      return undefined;
    }
    this.settings.set(key, out);
    return out;
  }

  component(key: string, opts: { required?: boolean } = {}): number | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, this.componentIds[0]);
      return undefined;
    }
    const v = this.r.string(e.value, `\`${key}\` of ${this.what}`);
    if (v === undefined) return undefined;
    const i = this.ctx.index.get(v);
    if (i === undefined) {
      this.r.bag.error(`\`${v}\` (\`${key}\` of ${this.what}) is not a component of this file`, this.r.at(e.value),
        didYouMean(v, this.componentIds) ?? `use one of: ${this.componentIds.join(', ')}`);
      return undefined;
    }
    this.spanAt(this.path(key), e.value);
    this.settings.set(key, v);
    return i;
  }

  componentValues(key: string, opts: { required?: boolean; defaultValue?: number; min?: number; max?: number; dimension?: Dimension } = {}): ComponentValues | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, `{ ${this.componentIds[0]}: 0.5 }`);
      return undefined;
    }
    const what = `\`${key}\` of ${this.what}`;
    const f = this.r.entries(e.value, what, e.keyNode);
    if (!f) return undefined;
    const n = this.componentIds.length;
    const values = new Float64Array(n);
    if (opts.defaultValue !== undefined) values.fill(opts.defaultValue);
    const given: number[] = [];
    const map = new Map<string, Setting>();
    let ok = true;
    for (const c of f) {
      const i = this.ctx.index.get(c.key);
      if (i === undefined) {
        this.r.bag.error(`\`${c.key}\` in ${what} is not a component of this file`, this.r.at(c.keyNode),
          didYouMean(c.key, this.componentIds) ?? `add it under \`components:\` or use one of: ${this.componentIds.join(', ')}`);
        ok = false;
        continue;
      }
      const rule: NumberRule = { min: opts.min, max: opts.max, example: opts.dimension ? '1.2 kmol/h' : '0.5' };
      let v: number | undefined;
      let unit = '';
      let dimension: Dimension | undefined;
      if (opts.dimension) {
        const q = parsedQuantityAt(this.r, c.value, opts.dimension, `the ${opts.dimension === 'molarFlow' ? 'flow' : 'value'} of \`${c.key}\` in ${what}`, rule, this.ctx);
        v = q?.value;
        unit = q?.unit ?? '';
        dimension = q?.dimension;
      } else {
        v = this.r.number(c.value, `the value of \`${c.key}\` in ${what}`, '0.5');
        if (v !== undefined && ((opts.min !== undefined && v < opts.min) || (opts.max !== undefined && v > opts.max))) {
          const range = opts.min !== undefined && opts.max !== undefined ? `lie between ${opts.min} and ${opts.max}` : opts.min !== undefined ? `be at least ${opts.min}` : `be at most ${opts.max}`;
          this.r.bag.error(`the value of \`${c.key}\` in ${what} is ${v}; it must ${range}`, this.r.at(c.value));
          v = undefined;
        }
      }
      if (v === undefined) {
        ok = false;
        continue;
      }
      values[i] = v;
      given.push(i);
      map.set(c.key, v);
      const k = this.path(key, c.key);
      this.rec.slots.push({ key: k, dimension, unit, value: v, rule, span: this.spanAt(k, c.value) });
    }
    if (!ok) return undefined;
    this.spanAt(this.path(key), e.value);
    this.settings.set(key, map);
    return { values, given };
  }

  outlets(key: string): OutletEntry[] | undefined {
    const e = this.get(key);
    if (!e) {
      this.missing(key, '{ recycle: 0.97, purge: rest }');
      return undefined;
    }
    const list = this.r.entries(e.value, `\`${key}\` of ${this.what}`, e.keyNode);
    if (!list) return undefined;
    const out: OutletEntry[] = [];
    const map = new Map<string, Setting>();
    let bad = false;
    for (const o of list) {
      const report = (message: string, help?: string) => this.r.bag.error(message, this.r.at(o.keyNode), help);
      const v = o.value;
      const k = this.path(key, o.key);
      this.spanAt([...k, '@'], o.keyNode);
      if (this.r.isScalar(v) && v.value === 'rest') {
        out.push({ stream: o.key, value: 'rest', report });
        map.set(o.key, 'rest');
        this.rec.slots.push({ key: k, unit: '', value: Number.NaN, rule: { min: 0, max: 1 }, span: this.spanAt(k, v), rest: true });
      } else if (this.r.isScalar(v)) {
        const num = this.r.number(v, `the fraction to \`${o.key}\` in ${this.what}`, '0.97');
        if (num === undefined) {
          bad = true;
          continue;
        }
        if (num < 0 || num > 1) {
          this.r.bag.error(`the fraction to \`${o.key}\` in ${this.what} is ${num}; it must lie between 0 and 1`, this.r.at(v), 'write the share of the inlet this outlet takes, e.g. `0.03`, and `rest` for one outlet');
          bad = true;
          continue;
        }
        out.push({ stream: o.key, value: num, report });
        map.set(o.key, num);
        this.rec.slots.push({ key: k, unit: '', value: num, rule: { min: 0, max: 1 }, span: this.spanAt(k, v) });
      } else if (this.r.isMap(v)) {
        const arr = this.recoveries(v, o, k);
        if (!arr) {
          bad = true;
          continue;
        }
        out.push({ stream: o.key, value: arr.dense, report });
        map.set(o.key, arr.map);
      } else {
        this.r.bag.error(`the outlet \`${o.key}\` of ${this.what} needs a fraction, \`rest\` or per-component recoveries`, this.r.at(o.keyNode));
        bad = true;
      }
    }
    if (bad) return undefined;
    this.spanAt(this.path(key), e.value);
    this.settings.set(key, map);
    return out;
  }

  /** Per-component recoveries of one outlet: dense with NaN where not given, and the settings map. */
  private recoveries(v: Node, o: Entry, k: string[]): { dense: Float64Array; map: Map<string, Setting> } | undefined {
    const what = `the recoveries to \`${o.key}\` in ${this.what}`;
    const f = this.r.entries(v, what, o.keyNode);
    if (!f) return undefined;
    const dense = new Float64Array(this.componentIds.length).fill(Number.NaN);
    const map = new Map<string, Setting>();
    let ok = true;
    for (const c of f) {
      const i = this.ctx.index.get(c.key);
      if (i === undefined) {
        this.r.bag.error(`\`${c.key}\` in ${what} is not a component of this file`, this.r.at(c.keyNode),
          didYouMean(c.key, this.componentIds) ?? `use one of: ${this.componentIds.join(', ')}`);
        ok = false;
        continue;
      }
      const num = this.r.number(c.value, `the value of \`${c.key}\` in ${what}`, '0.5');
      if (num === undefined) {
        ok = false;
        continue;
      }
      if (num < 0 || num > 1) {
        this.r.bag.error(`the value of \`${c.key}\` in ${what} is ${num}; it must lie between 0 and 1`, this.r.at(c.value));
        ok = false;
        continue;
      }
      dense[i] = num;
      map.set(c.key, num);
      const kk = [...k, c.key];
      this.rec.slots.push({ key: kk, unit: '', value: num, rule: { min: 0, max: 1 }, span: this.spanAt(kk, c.value) });
    }
    return ok ? { dense, map } : undefined;
  }

  standardFlow(key: string, reference?: StandardRef): { value: number; reference: StandardRef } | undefined {
    const e = this.get(key);
    if (!e) {
      this.missing(key, '2400 Nm3/h');
      return undefined;
    }
    const what = `\`${key}\` of ${this.what}`;
    const q = parsedQuantityAt(this.r, e.value, reference ? 'volumeFlow' : 'standardFlow', what, { above: 0, example: '2400 Nm3/h' }, this.ctx);
    if (!q) return undefined;
    const ref = reference ?? q.standard!;
    const k = this.path(key);
    this.rec.slots.push({ key: k, dimension: q.dimension, unit: q.unit, value: q.value, rule: { above: 0 }, span: this.spanAt(k, e.value), reference: ref.name });
    this.settings.set(key, new Map<string, Setting>([['value', q.value], ['reference', ref.name]]));
    return { value: q.value, reference: ref };
  }

  standardReference(key: string): StandardRef | null | undefined {
    const name = this.string(key);
    if (name === undefined) return undefined;
    const ref = this.ctx.standards.get(name);
    if (ref) return ref;
    if (this.ctx.failedStandards.has(name)) return null;
    const e = this.get(key)!;
    this.r.bag.error(`unknown standard reference \`${name}\``, this.r.at(e.value),
      didYouMean(name, this.ctx.standards.keys()) ?? `define it under \`thermo.standards\`, or use one of: ${[...this.ctx.standards.keys()].join(', ')}`);
    return undefined;
  }

  sub(key: string, opts: { required?: boolean; example?: string } = {}): FieldReader | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, opts.example);
      return undefined;
    }
    const what = `\`${key}\` of ${this.what}`;
    const entries = this.r.entries(e.value, what, e.keyNode);
    if (!entries) return undefined;
    const settings = new Map<string, Setting>();
    this.settings.set(key, settings);
    this.spanAt(this.path(key), e.keyNode);
    return new YamlFields(this.r, entries, e.keyNode, what, this.ctx, this.rec, this.path(key), settings);
  }

  items(key: string, opts: { required?: boolean } = {}): FieldReader[] | undefined {
    const e = this.get(key);
    if (!e) {
      if (opts.required) this.missing(key, '[ ... ]');
      return undefined;
    }
    const list = this.r.list(e.value, `\`${key}\` of ${this.what}`);
    if (!list) return undefined;
    if (list.length === 0) {
      this.r.bag.error(`\`${key}\` of ${this.what} is empty`, this.r.at(e.keyNode));
      return undefined;
    }
    const out: FieldReader[] = [];
    const settings: Map<string, Setting>[] = [];
    list.forEach((node, i) => {
      const w = `\`${key}.${i}\` of ${this.what}`;
      const sub = this.r.entries(node, w, e.keyNode);
      const s = new Map<string, Setting>();
      settings.push(s);
      this.spanAt(this.path(key, String(i)), node);
      if (sub) out.push(new YamlFields(this.r, sub, node, w, this.ctx, this.rec, this.path(key, String(i)), s));
    });
    this.settings.set(key, settings);
    return out;
  }

  keys(): string[] {
    return this.entries.map((e) => e.key);
  }

  checkKeys(allowed: readonly string[]): void {
    this.r.checkKeys(this.entries, allowed, this.what);
  }

  strayNear(...keys: string[]): boolean {
    return this.r.strayNear(this.entries, ...keys);
  }

  error(key: string | null, message: string, help?: string): void {
    const e = key ? this.get(key) : undefined;
    this.r.bag.error(message, this.r.at(e ? e.value ?? e.keyNode : this.owner), help);
  }

  errorAtKey(key: string, message: string, help?: string): void {
    const e = this.get(key);
    this.r.bag.error(message, this.r.at(e ? e.keyNode : this.owner), help);
  }

  warning(key: string | null, message: string, help?: string): void {
    const e = key ? this.get(key) : undefined;
    this.r.bag.warning(message, this.r.at(e ? e.value ?? e.keyNode : this.owner), help);
  }
}
