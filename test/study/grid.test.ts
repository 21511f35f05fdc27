import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/diagnostics.js';
import { blocksOf, GridShape, parseAxes, parseGridAxis, parseValuesAxis } from '../../src/study/grid.js';
import { loadFlowsheet } from '../../src/flowsheet/validate.js';
import { parseShard, shardBlocks, shardFromEnvironment } from '../../src/study/shard.js';
import { ROOT } from '../helpers/cli.js';
import { join } from 'node:path';

const PILOT = join(ROOT, 'flowsheets', 'methanol-pilot.yaml');

function messageOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e.diagnostics.map((d) => `${d.message} | ${d.help ?? ''}`).join('\n');
    throw e;
  }
  throw new Error('expected an InputError');
}

describe('grid axes', () => {
  const p = loadFlowsheet(PILOT).model;

  it('spaces N values evenly from START to STOP, both ends exact', () => {
    const a = parseGridAxis(p, 'reactor.reactions.0.conversion=0.15:0.35:5');
    expect(a.values).toEqual([0.15, 0.2, 0.25, 0.3, 0.35]);
    expect(a.unit).toBe('');
    const b = parseGridAxis(p, 'reactor.reactions.0.conversion=0.15:0.35:1000');
    expect(b.values.length).toBe(1000);
    expect(b.values[0]).toBe(0.15);
    expect(b.values[999]).toBe(0.35);
    for (let k = 1; k < 1000; k++) expect(b.values[k] - b.values[k - 1]).toBeCloseTo(0.2 / 999, 14);
  });

  it('takes the unit of a dimensional input after the values, and requires it', () => {
    const a = parseGridAxis(p, 'feeds.hydrogen.meter.flow=10:14:9 m3/h');
    expect(a.unit).toBe('m3/h');
    expect(a.values).toEqual([10, 10.5, 11, 11.5, 12, 12.5, 13, 13.5, 14]);
    expect(messageOf(() => parseGridAxis(p, 'feeds.hydrogen.meter.flow=10:14:9'))).toMatch(/give the unit of the values.*\| add the unit after the values, e\.g\. `feeds\.hydrogen\.meter\.flow=10:14:9 m3\/h`/s);
    expect(messageOf(() => parseGridAxis(p, 'feeds.hydrogen.meter.flow=10:14:9 bar'))).toMatch(/unit/);
    expect(messageOf(() => parseGridAxis(p, 'reactor.reactions.0.conversion=0.1:0.3:3 m3/h'))).toMatch(/plain number.*takes no unit/);
  });

  it('lists --values as given and refuses a repeated value', () => {
    expect(parseValuesAxis(p, 'purge-split.out.recycle=0.95,0.9,0.97').values).toEqual([0.95, 0.9, 0.97]);
    expect(messageOf(() => parseValuesAxis(p, 'purge-split.out.recycle=0.95,0.95'))).toMatch(/listed twice/);
  });

  it('reports every bad axis at once, with the path problem named', () => {
    const msg = messageOf(() => parseAxes(p, [
      { kind: 'grid', text: 'reactor.reaction.0.conversion=0.1:0.3:3' },
      { kind: 'grid', text: 'purge-split.out.recycle=0.9:0.99:x' },
      { kind: 'values', text: 'cooler.T 40,50' },
    ]));
    expect(msg.split('\n').length).toBe(3);
    expect(msg).toMatch(/`reactor` has no number `reaction\.0\.conversion`/);
    expect(msg).toMatch(/number of points `x`/);
    expect(msg).toMatch(/has no `=`/);
    expect(messageOf(() => parseAxes(p, []))).toMatch(/at least one --grid or --values/);
    expect(messageOf(() => parseAxes(p, [
      { kind: 'grid', text: 'purge-split.out.recycle=0.9:0.99:3' },
      { kind: 'values', text: 'purge-split.out.recycle=0.95' },
    ]))).toMatch(/swept twice/);
  });
});

describe('grid numbering and walk', () => {
  it('numbers points row-major from 1, the first axis slowest', () => {
    const g = new GridShape([3, 4]);
    expect(g.point([0, 0])).toBe(1);
    expect(g.point([0, 3])).toBe(4);
    expect(g.point([1, 0])).toBe(5);
    expect(g.point([2, 3])).toBe(12);
    for (let pt = 1; pt <= 12; pt++) expect(g.point(g.index(pt))).toBe(pt);
  });

  it('walks a 2-D grid as a serpentine', () => {
    expect(Array.from(new GridShape([3, 4]).walk())).toEqual([1, 2, 3, 4, 8, 7, 6, 5, 9, 10, 11, 12]);
    expect(Array.from(new GridShape([5]).walk())).toEqual([1, 2, 3, 4, 5]);
  });

  it('visits every point once, each one grid step from the one before (1 to 4 axes)', () => {
    for (const dims of [[1], [7], [2, 2], [3, 5], [4, 1, 3], [2, 3, 2, 3]]) {
      const g = new GridShape(dims);
      const w = Array.from(g.walk());
      expect(new Set(w).size).toBe(g.size);
      expect(Math.min(...w)).toBe(1);
      expect(Math.max(...w)).toBe(g.size);
      for (let k = 1; k < w.length; k++) expect(g.distance2(w[k - 1], w[k])).toBe(1);
    }
  });

  it('cuts the walk into blocks that shards share out without gap or overlap', () => {
    const g = new GridShape([6, 7]);
    const blocks = blocksOf(g, 5);
    expect(blocks.length).toBe(9);
    expect(blocks.map((b) => b.length)).toEqual([5, 5, 5, 5, 5, 5, 5, 5, 2]);
    expect(blocks.flatMap((b) => Array.from(b))).toEqual(Array.from(g.walk()));
    const seen = new Map<number, number>();
    for (let i = 1; i <= 4; i++) {
      for (const b of shardBlocks(blocks, { index: i, count: 4 })) for (const pt of b) seen.set(pt, (seen.get(pt) ?? 0) + 1);
    }
    expect(seen.size).toBe(42);
    expect([...seen.values()].every((c) => c === 1)).toBe(true);
    expect(shardBlocks(blocks, { index: 2, count: 4 })).toEqual([blocks[1], blocks[5]]);
  });

  it('parses --shard i/N and refuses i outside 1..N', () => {
    expect(parseShard('3/8')).toEqual({ index: 3, count: 8 });
    expect(messageOf(() => parseShard('0/4'))).toMatch(/1 <= i <= N/);
    expect(messageOf(() => parseShard('5/4'))).toMatch(/1 <= i <= N/);
    expect(messageOf(() => parseShard('2-4'))).toMatch(/not i\/N/);
  });
});

describe('--shard auto: the share from an array job', () => {
  it('Slurm: the task\'s place in its array (from 0 or 1, with a step) and the array\'s size', () => {
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_COUNT: '8' })).toEqual({ index: 3, count: 8 });
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '0', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_COUNT: '4' })).toEqual({ index: 1, count: 4 });
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '5', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_STEP: '2', SLURM_ARRAY_TASK_COUNT: '4' })).toEqual({ index: 3, count: 4 });
  });
  it('Grid Engine: first, last and step size', () => {
    expect(shardFromEnvironment({ SGE_TASK_ID: '7', SGE_TASK_FIRST: '1', SGE_TASK_LAST: '8', SGE_TASK_STEPSIZE: '1' })).toEqual({ index: 7, count: 8 });
  });
  it('refuses with a clear message when no scheduler set one, or the array is uneven', () => {
    expect(messageOf(() => shardFromEnvironment({}))).toMatch(/no array-job task is set in the environment \(SLURM_ARRAY_TASK_ID or SGE_TASK_ID\)/);
    expect(messageOf(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '4', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_STEP: '2', SLURM_ARRAY_TASK_COUNT: '4' }))).toMatch(/not on the array's steps/);
    expect(messageOf(() => shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '4' }))).toMatch(/SLURM_ARRAY_TASK_COUNT/);
  });
});
