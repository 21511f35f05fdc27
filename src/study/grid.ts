/**
 * The grid of a sweep: one axis per `--grid PATH=START:STOP:N [UNIT]` or
 * `--values PATH=a,b,c [UNIT]`, in the order given on the command line.
 *
 * Point numbers are the grid's own: 1-based, row-major, the first axis varying slowest.
 * They do not depend on the walk order, on --jobs or on --shard.
 *
 * The walk visits the points so that each follows a neighbour (boustrophedon): the last
 * axis runs forward, then backward on the next step of the axis before it, and so on for
 * every axis. Consecutive points in the walk differ by one step along exactly one axis.
 */
import { InputError, type Diagnostic } from '../diagnostics.js';
import type { Model } from '../flowsheet/model.js';
import { assertVariable, checkUnit, coupled, parameter, toSI, type Parameter } from './parameters.js';

export interface AxisSpec {
  kind: 'grid' | 'values';
  /** The option's text as given, e.g. `feeds.hydrogen.meter.flow=10:14:9 m3/h`. */
  text: string;
}

export interface Axis {
  spec: AxisSpec;
  path: string;
  parameter: Parameter;
  /** The unit the values are written in ('' for a plain number). */
  unit: string;
  /** As written (in `unit`). */
  values: number[];
  /** The same values in SI. */
  si: number[];
}

/** Most points a sweep accepts (the walk order is held in memory). */
export const MAX_POINTS = 10_000_000;

const NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

function fail(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, help }]);
}

function parseNumber(s: string, what: string, option: string): number {
  const t = s.trim();
  if (!NUMBER.test(t)) throw fail(`${option} \`${what}\`: \`${t}\` is not a number`, 'write plain numbers and one unit at the end, e.g. `feeds.hydrogen.meter.flow=10:14:9 m3/h`');
  return Number(t);
}

/** Splits `PATH=BODY [UNIT]` and resolves PATH in the flowsheet. */
function splitSpec(model: Model, spec: AxisSpec): { path: string; ref: Parameter; body: string; unit: string } {
  const option = spec.kind === 'grid' ? '--grid' : '--values';
  const example = spec.kind === 'grid' ? '`reactor.reactions.0.conversion=0.15:0.35:21`' : '`reactor.reactions.0.conversion=0.2,0.25,0.3`';
  const eq = spec.text.indexOf('=');
  if (eq < 0) throw fail(`${option} \`${spec.text}\` has no \`=\``, `write PATH=${spec.kind === 'grid' ? 'START:STOP:N' : 'a,b,c'} with a unit where the input has one, e.g. ${example}`);
  const path = spec.text.slice(0, eq).trim();
  const rest = spec.text.slice(eq + 1).trim();
  const ref = parameter(model, path);
  assertVariable(model, ref);
  // The unit is whatever follows the numbers, after the first space.
  const m = /^(\S+)(?:\s+(.+))?$/.exec(rest);
  if (!m) throw fail(`${option} \`${spec.text}\` gives no values`, `e.g. ${example}`);
  const body = m[1];
  const unit = (m[2] ?? '').trim();
  if (ref.dimension !== undefined && unit === '') {
    throw fail(`${option} \`${spec.text}\`: \`${path}\` is a ${dimensionName(ref.dimension)} (the file writes it in ${ref.unit}); give the unit of the values`,
      `add the unit after the values, e.g. \`${path}=${body} ${ref.unit}\``);
  }
  if (unit !== '') checkUnit(model, ref, unit);
  return { path, ref, body, unit };
}

function dimensionName(d: string): string {
  return d.replace(/[A-Z]/g, (c) => ` ${c.toLowerCase()}`);
}

/** `PATH=START:STOP:N [UNIT]`: N evenly spaced values from START to STOP, both included. */
export function parseGridAxis(model: Model, text: string): Axis {
  const spec: AxisSpec = { kind: 'grid', text: text.trim() };
  const { path, ref, body, unit } = splitSpec(model, spec);
  const parts = body.split(':');
  if (parts.length !== 3) throw fail(`--grid \`${text}\`: \`${body}\` is not START:STOP:N`, `e.g. \`${path}=${parts[0] || '0.15'}:${parts[1] || '0.35'}:21${unit ? ` ${unit}` : ''}\``);
  const start = parseNumber(parts[0], text, '--grid');
  const stop = parseNumber(parts[1], text, '--grid');
  const n = Number(parts[2]);
  if (!Number.isInteger(n) || n < 1 || !/^\d+$/.test(parts[2].trim())) throw fail(`--grid \`${text}\`: the number of points \`${parts[2]}\` must be a whole number >= 2`);
  if (n === 1 && start !== stop) throw fail(`--grid \`${text}\`: one point cannot span ${start} to ${stop}`, 'give N >= 2, or use --values for single values');
  if (n >= 2 && start === stop) throw fail(`--grid \`${text}\`: START and STOP are equal`, 'give two different ends, or use --values for one value');
  const values: number[] = [];
  // Interior values are rounded to 15 significant digits, so that 0.15:0.35:5 gives 0.2, not
  // 0.19999999999999998 (a change of at most 5e-16 relative, far below any solver tolerance).
  for (let k = 0; k < n; k++) values.push(k === n - 1 ? stop : k === 0 ? start : Number((start + ((stop - start) * k) / (n - 1)).toPrecision(15)));
  return { spec, path, parameter: ref, unit, values, si: values.map((v) => toSI(model, ref, v, unit || undefined)) };
}

/** `PATH=a,b,c [UNIT]`: the values as listed. */
export function parseValuesAxis(model: Model, text: string): Axis {
  const spec: AxisSpec = { kind: 'values', text: text.trim() };
  const { path, ref, body, unit } = splitSpec(model, spec);
  const values = body.split(',').map((s) => parseNumber(s, text, '--values'));
  const seen = new Set<number>();
  for (const v of values) {
    if (seen.has(v)) throw fail(`--values \`${text}\`: ${v} is listed twice`, 'each value once: a repeated point would be solved twice');
    seen.add(v);
  }
  return { spec, path, parameter: ref, unit, values, si: values.map((v) => toSI(model, ref, v, unit || undefined)) };
}

export function parseAxis(model: Model, spec: AxisSpec): Axis {
  return spec.kind === 'grid' ? parseGridAxis(model, spec.text) : parseValuesAxis(model, spec.text);
}

/** Every axis, each problem reported once; an input may be swept by one axis only. */
export function parseAxes(model: Model, specs: readonly AxisSpec[]): Axis[] {
  const diags: Diagnostic[] = [];
  const axes: Axis[] = [];
  for (const s of specs) {
    try {
      const a = parseAxis(model, s);
      const dup = axes.find((b) => coupled(model, b.parameter, a.parameter));
      if (dup && dup.parameter.path === a.parameter.path) diags.push({ severity: 'error', message: `\`${a.path}\` is swept twice (\`${dup.spec.text}\` and \`${a.spec.text}\`)`, help: 'give each input one --grid or --values' });
      else if (dup) diags.push({ severity: 'error', message: `\`${dup.parameter.path}\` and \`${a.parameter.path}\` are one input (setting either sets the other): swept twice (\`${dup.spec.text}\` and \`${a.spec.text}\`)`, help: 'sweep one of them' });
      else axes.push(a);
    } catch (e) {
      if (e instanceof InputError) diags.push(...e.diagnostics);
      else throw e;
    }
  }
  if (specs.length === 0) diags.push({ severity: 'error', message: 'a sweep needs at least one --grid or --values', help: 'e.g. --grid reactor.reactions.0.conversion=0.15:0.35:21' });
  if (diags.length) throw new InputError(diags);
  const total = axes.reduce((a, x) => a * x.values.length, 1);
  if (total > MAX_POINTS) throw fail(`the grid has ${total} points; a sweep takes at most ${MAX_POINTS}`, 'use fewer points, or split the study into several sweeps');
  return axes;
}

/** Sizes of the axes and the walk over them; needs no flowsheet (merge uses it too). */
export class GridShape {
  readonly size: number;
  private readonly strides: number[];

  constructor(readonly dims: readonly number[]) {
    this.size = dims.reduce((a, b) => a * b, 1);
    this.strides = dims.map((_, k) => dims.slice(k + 1).reduce((a, b) => a * b, 1));
  }

  /** Point number (1-based) of an index tuple. */
  point(index: readonly number[]): number {
    let p = 0;
    for (let k = 0; k < this.dims.length; k++) p += index[k] * this.strides[k];
    return p + 1;
  }

  /** Index tuple of a point number. */
  index(point: number): number[] {
    let r = point - 1;
    return this.strides.map((s) => {
      const i = Math.floor(r / s);
      r -= i * s;
      return i;
    });
  }

  /** Point numbers in walk order (boustrophedon over every axis). */
  walk(): Int32Array {
    const out = new Int32Array(this.size);
    const D = this.dims.length;
    const idx = new Array<number>(D).fill(0);
    const dir = new Array<number>(D).fill(1);
    for (let w = 0; w < this.size; w++) {
      out[w] = this.point(idx);
      // Advance the odometer from the last axis; an axis that reaches its end turns round.
      for (let k = D - 1; k >= 0; k--) {
        const next = idx[k] + dir[k];
        if (next >= 0 && next < this.dims[k]) {
          idx[k] = next;
          break;
        }
        dir[k] = -dir[k];
      }
    }
    return out;
  }

  /** Squared distance between two points, counted in grid steps. */
  distance2(a: number, b: number): number {
    const ia = this.index(a);
    const ib = this.index(b);
    let d = 0;
    for (let k = 0; k < ia.length; k++) d += (ia[k] - ib[k]) ** 2;
    return d;
  }
}

/** The blocks of a sweep: the walk cut into runs of `blockSize` points (the last may be shorter). */
export function blocksOf(shape: GridShape, blockSize: number): Int32Array[] {
  const walk = shape.walk();
  const blocks: Int32Array[] = [];
  for (let s = 0; s < walk.length; s += blockSize) blocks.push(walk.subarray(s, Math.min(walk.length, s + blockSize)));
  return blocks;
}
