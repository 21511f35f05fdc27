/**
 * The sweep engine: the points of a grid solved block by block with continuation.
 *
 * The rule that makes a sweep reproducible (the same rows, to the last digit, serial or on
 * worker threads, whole or in shards, interrupted and resumed):
 *   - the walk (boustrophedon, see grid.ts) is cut into blocks of `block` points;
 *   - the first point of a block starts cold, from the file's own starting values;
 *   - every other point starts from the converged values (and, for Newton, the last tear
 *     Jacobian, used as a chord until a step fails) of the nearest point solved before
 *     it in the same block (distance in grid steps; the later one on a tie). A point that
 *     fails gives no start; the next one starts from its nearest good neighbour.
 * So a block is always solved as the same sequence of solves, whoever runs it.
 *
 * The plan of a sweep (SweepSpec) is plain data that a worker thread receives and prepares
 * again for itself.
 */
import { InputError, type Diagnostic } from '../diagnostics.js';
import type { MethodName, Status } from '../solve/types.js';
import { validateText } from '../flowsheet/validate.js';
import type { Model } from '../flowsheet/model.js';
import { createRuntime, type Runtime } from '../flowsheet/runtime.js';
import { fileTargets } from './file-targets.js';
import { blocksOf, GridShape, parseAxes, type Axis, type AxisSpec } from './grid.js';
import { outputValue, parseOutput, type OutputRef } from './outputs.js';
import { coupled, withValues, type ParameterValue } from './parameters.js';
import { parseTarget, solvePoint, type TargetSpec } from './point.js';

/** Points per block when --block is not given. */
export const DEFAULT_BLOCK = 50;

export interface TargetOption {
  text: string;
  by: string;
  within?: string;
}

/** Everything that decides the rows of a sweep; serializable (sent to worker threads). */
export interface SweepSpec {
  file: string;
  /** The flowsheet text, read once by the main thread. */
  text: string;
  axes: AxisSpec[];
  /** Output paths, each with an optional display unit in brackets. */
  report: string[];
  targets: TargetOption[];
  /** The method for every point; undefined: the file's method cold, Newton from a neighbour. */
  method?: MethodName;
  maxPasses?: number;
  block: number;
  /** false: every point starts cold (for comparison). */
  continuation: boolean;
  /** Relative tolerance of the tears (default: the file's). */
  rtol?: number;
}

export interface SweepContext {
  spec: SweepSpec;
  model: Model;
  /** The runtime this thread solves its points on. */
  runtime: Runtime;
  axes: Axis[];
  shape: GridShape;
  outputs: OutputRef[];
  targets: TargetSpec[];
  blocks: Int32Array[];
}

/** One solved point, as the engine hands it to the writer. */
export interface PointRow {
  point: number;
  status: Status;
  message?: string;
  /** Outputs in their display unit (SI when none was asked for); absent unless converged. */
  outputs?: number[];
  /** The inputs adjusted by targets, SI; absent when the point was not solved. */
  adjusted?: number[];
}

/**
 * Builds the context; every problem with the options is reported at once. `checked`: the spec
 * was prepared before (a worker thread's copy of the main thread's): each axis value is not
 * tried on the file again (for a long axis that check costs as much as solving).
 */
export function prepareSweep(spec: SweepSpec, opts: { checked?: boolean } = {}): SweepContext {
  const model = validateText(spec.file, spec.text).model;
  const diags: Diagnostic[] = [];
  const collect = <T>(f: () => T): T | undefined => {
    try {
      return f();
    } catch (e) {
      if (e instanceof InputError) {
        diags.push(...e.diagnostics);
        return undefined;
      }
      throw e;
    }
  };
  const axes = collect(() => parseAxes(model, spec.axes)) ?? [];
  const outputs: OutputRef[] = [];
  for (const text of spec.report) {
    const o = collect(() => parseOutput(text, model));
    if (!o) continue;
    if (outputs.some((x) => x.path === o.path)) diags.push({ severity: 'error', message: `--report names \`${o.path}\` twice`, help: 'name each output once, in one unit' });
    else outputs.push(o);
  }
  const targets: TargetSpec[] = collect(() => fileTargets(model)) ?? [];
  for (const t of spec.targets) {
    const ts = collect(() => parseTarget(model, t.text, t.by, t.within));
    if (ts) targets.push(ts);
  }
  for (const t of targets) {
    const a = axes.find((x) => coupled(model, x.parameter, t.by));
    if (a && a.parameter.path === t.by.path) diags.push({ severity: 'error', message: `\`${t.by.path}\` is swept by \`${a.spec.text}\` and adjusted by target \`${t.text}\``, help: 'a target must adjust an input that the sweep leaves free' });
    else if (a) diags.push({ severity: 'error', message: `\`${t.by.path}\`, adjusted by target \`${t.text}\`, and \`${a.parameter.path}\`, swept by \`${a.spec.text}\`, are one input: setting either sets the other`, help: 'a target must adjust an input that the sweep leaves free' });
  }
  const seen: TargetSpec[] = [];
  for (const t of targets) {
    const o = seen.find((x) => coupled(model, x.by, t.by));
    if (o && o.by.path === t.by.path) diags.push({ severity: 'error', message: `two targets adjust \`${t.by.path}\``, help: 'each target needs an input of its own' });
    else if (o) diags.push({ severity: 'error', message: `two targets adjust one input: \`${o.by.path}\` and \`${t.by.path}\` set each other`, help: 'each target needs an input of its own' });
    seen.push(t);
  }
  if (!Number.isInteger(spec.block) || spec.block < 1) diags.push({ severity: 'error', message: `--block must be a whole number >= 1, not ${spec.block}` });
  if (diags.length) throw new InputError(diags);
  // Every value of every axis, each on its own (the others at the file's values), must make a
  // valid file: a grid that runs out of range is a mistake in the command, found before
  // anything is solved. (A combination that is invalid is a row of status invalid.)
  for (const a of opts.checked ? [] : axes) {
    for (let k = 0; k < a.values.length; k++) {
      try {
        withValues(model, [{ parameter: a.parameter, value: a.si[k] }]);
      } catch (e) {
        if (!(e instanceof InputError)) throw e;
        for (const d of e.diagnostics) {
          if (d.severity === 'error') diags.push({ ...d, message: `with \`${a.path}\` = ${a.values[k]}${a.unit ? ` ${a.unit}` : ''} (from \`${a.spec.text}\`): ${d.message.replace(/^with [^:]*: /, '')}`, help: d.help ?? 'keep the grid inside the range the file accepts' });
        }
      }
    }
  }
  if (diags.length) throw new InputError(dedupe(diags));
  const shape = new GridShape(axes.map((a) => a.values.length));
  return { spec, model, runtime: createRuntime(model), axes, shape, outputs, targets, blocks: blocksOf(shape, spec.block) };
}

function dedupe(ds: Diagnostic[]): Diagnostic[] {
  const seen = new Set<string>();
  return ds.filter((d) => {
    const k = `${d.message}|${d.span?.line}:${d.span?.col}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

/** The input values of a point, in the axes' units. */
export function pointInputs(ctx: Pick<SweepContext, 'axes' | 'shape'>, point: number): number[] {
  const idx = ctx.shape.index(point);
  return ctx.axes.map((a, k) => a.values[idx[k]]);
}

/** Solves one point from a start (or cold); a neighbour's Jacobian, when given, starts Newton. */
export function solveOne(ctx: SweepContext, point: number, start: Float64Array | undefined, jacobian?: Float64Array): { row: PointRow; start?: Float64Array; jacobian?: Float64Array } {
  const idx = ctx.shape.index(point);
  const values: ParameterValue[] = ctx.axes.map((a, k) => ({ parameter: a.parameter, value: a.si[idx[k]] }));
  const method = ctx.spec.method ?? (start ? 'newton' : undefined);
  const r = solvePoint(ctx.model, values, { targets: ctx.targets, start, jacobian, method, maxPasses: ctx.spec.maxPasses, rtol: ctx.spec.rtol, runtime: ctx.runtime });
  const row: PointRow = { point, status: r.status };
  if (r.status === 'converged' && r.result) {
    const res = r.result;
    row.outputs = ctx.outputs.map((o) => outputValue(o, res));
  } else {
    row.message = oneLine(r.message ?? r.result?.message ?? r.status);
  }
  if (ctx.targets.length && r.targets) row.adjusted = r.targets.map((t) => t.input);
  return { row, start: r.status === 'converged' ? r.start : undefined, jacobian: r.status === 'converged' ? r.jacobian : undefined };
}

function oneLine(s: string): string {
  return s.replace(/\s+/g, ' ').trim();
}

/**
 * The rows of one block, in walk order. `skip` leading points are solved (their starts are
 * needed by the rest) but not yielded: a resumed block continues exactly as it began.
 */
export function* blockRows(ctx: SweepContext, blockIndex: number, skip = 0): Generator<PointRow> {
  const block = ctx.blocks[blockIndex];
  const solved: Solved[] = [];
  const byPoint = new Map<number, Solved>();
  for (let w = 0; w < block.length; w++) {
    const point = block[w];
    let start: Float64Array | undefined;
    let jacobian: Float64Array | undefined;
    if (ctx.spec.continuation) {
      let best = Infinity;
      let near: Solved | undefined;
      for (const s of solved) {
        const d = ctx.shape.distance2(point, s.point);
        if (d <= best) {
          best = d;
          near = s;
        }
      }
      if (near) {
        start = lineStart(ctx, point, near, byPoint) ?? near.start;
        jacobian = near.jacobian;
      }
    }
    const { row, start: next, jacobian: nextJ } = solveOne(ctx, point, start, jacobian);
    if (next && ctx.spec.continuation) {
      const s = { point, start: Float64Array.from(next), jacobian: nextJ };
      solved.push(s);
      byPoint.set(point, s);
    }
    if (w >= skip) yield row;
  }
}

export interface Solved {
  point: number;
  start: Float64Array;
  jacobian?: Float64Array;
}

/**
 * A start extrapolated along a line of the grid: where `point` differs from its nearest solved
 * neighbour s1 on one axis only, and the point one step before s1 on that axis (s0, as many
 * grid steps from s1 as the point is) is solved too in this block, the tears are
 * s1 + t (s1 - s0), t the ratio of the axis values' steps. A neighbour's solution is a start
 * whose error is first order in the step; the line's is second order, which saves Newton
 * iterations at every point of a smooth sweep. A tear value the line would make negative or not
 * finite keeps s1's value. Not with targets (their adjusted inputs keep to their bounds).
 */
export function lineStart(ctx: SweepContext, point: number, s1: Solved, byPoint: Map<number, Solved>): Float64Array | undefined {
  if (ctx.targets.length > 0) return undefined;
  const ip = ctx.shape.index(point);
  const i1 = ctx.shape.index(s1.point);
  let axis = -1;
  for (let k = 0; k < ip.length; k++) {
    if (ip[k] === i1[k]) continue;
    if (axis >= 0) return undefined;
    axis = k;
  }
  if (axis < 0) return undefined;
  const i0 = i1.slice();
  i0[axis] = 2 * i1[axis] - ip[axis];
  if (i0[axis] < 0 || i0[axis] >= ctx.shape.dims[axis]) return undefined;
  const s0 = byPoint.get(ctx.shape.point(i0));
  if (!s0 || s0.start.length !== s1.start.length) return undefined;
  const v = ctx.axes[axis].si;
  const t = (v[ip[axis]] - v[i1[axis]]) / (v[i1[axis]] - v[i0[axis]]);
  if (!Number.isFinite(t)) return undefined;
  const x = new Float64Array(s1.start.length);
  for (let j = 0; j < x.length; j++) {
    const e = s1.start[j] + t * (s1.start[j] - s0.start[j]);
    x[j] = Number.isFinite(e) && e >= 0 ? e : s1.start[j];
  }
  return x;
}
