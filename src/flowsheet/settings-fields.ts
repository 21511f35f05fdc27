/**
 * FieldReader over recorded settings (settings.ts): a block reads again, with the same rules,
 * the settings a study has changed. Problems are reported at the position of the value in the
 * file (the value itself came from the study; the message says which).
 */
import { DiagnosticBag, type SourceSpan } from '../diagnostics.js';
import type { ComponentData } from '../thermo/types.js';
import type { Dimension, StandardRef } from '../units/index.js';
import type { ComponentValues, FieldReader, NumberRule, OutletEntry } from './fields.js';
import { isSettingMap, type ParameterSlot, type Setting, type SettingMap } from './settings.js';
import { ruleProblem, type FieldContext, type Recording } from './yaml-fields.js';

export class SettingsFields implements FieldReader {
  readonly componentIds: readonly string[];
  readonly components: readonly ComponentData[];
  readonly elements: readonly Record<string, number>[];

  constructor(
    private readonly settings: SettingMap,
    readonly what: string,
    private readonly ctx: FieldContext,
    /** Slots of the settings before the change: units and rules carry over. */
    private readonly before: ReadonlyMap<string, ParameterSlot>,
    /** Positions in the file, by key path. */
    private readonly spans: ReadonlyMap<string, SourceSpan>,
    private readonly rec: Recording,
    private readonly prefix: readonly string[],
    private readonly bag: DiagnosticBag,
    private readonly ownerSpan?: SourceSpan,
  ) {
    this.componentIds = ctx.ids;
    this.components = ctx.components;
    this.elements = ctx.elements;
  }

  private path(...key: string[]): string[] {
    return [...this.prefix, ...key];
  }

  private spanOf(key: string[]): SourceSpan | undefined {
    return this.spans.get(key.join('.')) ?? this.ownerSpan;
  }

  private keep(key: string[]): SourceSpan | undefined {
    const s = this.spans.get(key.join('.'));
    if (s) this.rec.spans.set(key.join('.'), s);
    return s;
  }

  private slot(key: string[], value: number, rule: NumberRule, extra: Partial<ParameterSlot> = {}): void {
    const old = this.before.get(key.join('.'));
    this.rec.slots.push({ key, dimension: old?.dimension ?? extra.dimension, unit: old?.unit ?? extra.unit ?? '', value, rule, span: this.keep(key), ...extra, ...(old?.reference ? { reference: old.reference } : {}) });
  }

  private get(key: string): Setting | undefined {
    return this.settings.get(key);
  }

  private missing(key: string, example?: string) {
    this.bag.error(`${this.what} has no \`${key}\``, this.ownerSpan, example ? `add \`${key}: ${example}\`` : undefined);
  }

  has(key: string): boolean {
    return this.settings.has(key);
  }

  isMapping(key: string): boolean {
    const v = this.get(key);
    return isSettingMap(v) && !(v.has('value') && v.has('reference'));
  }

  private num(key: string, rule: NumberRule, dim?: Dimension): number | undefined {
    const v = this.get(key);
    if (v === undefined) {
      if (rule.required) this.missing(key, rule.example);
      return undefined;
    }
    if (typeof v !== 'number') return undefined;
    const k = this.path(key);
    const p = ruleProblem(`\`${key}\` of ${this.what}`, v, rule, dim);
    if (p) {
      this.bag.error(p, this.spanOf(k), rule.example ? `for example \`${rule.example}\`` : undefined);
      return undefined;
    }
    this.slot(k, v, rule, { dimension: dim });
    return v;
  }

  quantity(key: string, dimension: Dimension, rule: NumberRule = {}): number | undefined {
    return this.num(key, rule, dimension);
  }

  number(key: string, rule: NumberRule = {}): number | undefined {
    return this.num(key, rule);
  }

  string(key: string, opts: { required?: boolean } = {}): string | undefined {
    const v = this.get(key);
    if (v === undefined && opts.required) this.missing(key);
    if (typeof v === 'string') this.keep(this.path(key));
    return typeof v === 'string' ? v : undefined;
  }

  boolean(key: string): boolean | undefined {
    const v = this.get(key);
    return typeof v === 'boolean' ? v : undefined;
  }

  stream(key: string, opts: { required?: boolean } = {}): string | undefined {
    const v = this.string(key, opts);
    if (v !== undefined) this.keep(this.path(key, '0'));
    return v;
  }

  streams(key: string, opts: { required?: boolean } = {}): string[] | undefined {
    const v = this.get(key);
    if (v === undefined && opts.required) this.missing(key);
    if (!Array.isArray(v)) return undefined;
    v.forEach((_, i) => this.keep(this.path(key, String(i))));
    return (v as string[]).slice();
  }

  component(key: string, opts: { required?: boolean } = {}): number | undefined {
    const v = this.string(key, opts);
    return v === undefined ? undefined : this.ctx.index.get(v);
  }

  componentValues(key: string, opts: { required?: boolean; defaultValue?: number; min?: number; max?: number; dimension?: Dimension } = {}): ComponentValues | undefined {
    const v = this.get(key);
    if (v === undefined) {
      if (opts.required) this.missing(key);
      return undefined;
    }
    if (!isSettingMap(v)) return undefined;
    const n = this.componentIds.length;
    const values = new Float64Array(n);
    if (opts.defaultValue !== undefined) values.fill(opts.defaultValue);
    const given: number[] = [];
    let ok = true;
    const rule: NumberRule = { min: opts.min, max: opts.max };
    for (const [id, x] of v) {
      const i = this.ctx.index.get(id)!;
      const k = this.path(key, id);
      const p = ruleProblem(`the value of \`${id}\` in \`${key}\` of ${this.what}`, x as number, rule, opts.dimension);
      if (p) {
        this.bag.error(p, this.spanOf(k));
        ok = false;
        continue;
      }
      values[i] = x as number;
      given.push(i);
      this.slot(k, x as number, rule, { dimension: opts.dimension });
    }
    this.keep(this.path(key));
    return ok ? { values, given } : undefined;
  }

  outlets(key: string): OutletEntry[] | undefined {
    const v = this.get(key);
    if (!isSettingMap(v)) return undefined;
    this.keep(this.path(key));
    const out: OutletEntry[] = [];
    for (const [stream, x] of v) {
      const k = this.path(key, stream);
      const at = this.spans.get([...k, '@'].join('.')) ?? this.spanOf(k);
      this.keep([...k, '@']);
      const report = (message: string, help?: string) => this.bag.error(message, at, help);
      if (x === 'rest') {
        out.push({ stream, value: 'rest', report });
        this.slot(k, Number.NaN, { min: 0, max: 1 }, { rest: true });
      } else if (typeof x === 'number') {
        if (x < 0 || x > 1) {
          this.bag.error(`the fraction to \`${stream}\` in ${this.what} is ${x}; it must lie between 0 and 1`, this.spanOf(k));
          return undefined;
        }
        out.push({ stream, value: x, report });
        this.slot(k, x, { min: 0, max: 1 });
      } else if (isSettingMap(x)) {
        const dense = new Float64Array(this.componentIds.length).fill(Number.NaN);
        for (const [id, r] of x) {
          const i = this.ctx.index.get(id)!;
          if ((r as number) < 0 || (r as number) > 1) {
            this.bag.error(`the value of \`${id}\` in the recoveries to \`${stream}\` in ${this.what} is ${r}; it must lie between 0 and 1`, this.spanOf([...k, id]));
            return undefined;
          }
          dense[i] = r as number;
          this.slot([...k, id], r as number, { min: 0, max: 1 });
        }
        out.push({ stream, value: dense, report });
      }
    }
    return out;
  }

  standardFlow(key: string): { value: number; reference: StandardRef } | undefined {
    const v = this.get(key);
    if (!isSettingMap(v)) return undefined;
    const value = v.get('value') as number;
    const reference = this.ctx.standards.get(v.get('reference') as string)!;
    const k = this.path(key);
    const p = ruleProblem(`\`${key}\` of ${this.what}`, value, { above: 0 });
    if (p) {
      this.bag.error(p, this.spanOf(k));
      return undefined;
    }
    this.slot(k, value, { above: 0 }, { reference: reference.name });
    this.settings.get(key);
    return { value, reference };
  }

  standardReference(key: string): StandardRef | null | undefined {
    const name = this.string(key);
    return name === undefined ? undefined : this.ctx.standards.get(name);
  }

  sub(key: string): FieldReader | undefined {
    const v = this.get(key);
    if (!isSettingMap(v)) return undefined;
    this.keep(this.path(key));
    return new SettingsFields(v, `\`${key}\` of ${this.what}`, this.ctx, this.before, this.spans, this.rec, this.path(key), this.bag, this.spanOf(this.path(key)));
  }

  items(key: string): FieldReader[] | undefined {
    const v = this.get(key);
    if (!Array.isArray(v)) return undefined;
    return (v as SettingMap[]).map((s, i) => {
      this.keep(this.path(key, String(i)));
      return new SettingsFields(s, `\`${key}.${i}\` of ${this.what}`, this.ctx, this.before, this.spans, this.rec, this.path(key, String(i)), this.bag, this.spanOf(this.path(key, String(i))));
    });
  }

  keys(): string[] {
    return [...this.settings.keys()];
  }

  checkKeys(): void {
    /* the keys were checked when the file was read */
  }

  strayNear(): boolean {
    return false;
  }

  error(key: string | null, message: string, help?: string): void {
    this.bag.error(message, key ? this.spanOf(this.path(key)) : this.ownerSpan, help);
  }

  errorAtKey(key: string, message: string, help?: string): void {
    this.error(key, message, help);
  }

  warning(key: string | null, message: string, help?: string): void {
    this.bag.warning(message, key ? this.spanOf(this.path(key)) : this.ownerSpan, help);
  }
}
