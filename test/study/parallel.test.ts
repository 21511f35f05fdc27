import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { cli, ROOT, tempFile } from '../helpers/cli.js';

const PILOT = join(ROOT, 'flowsheets', 'methanol-pilot.yaml');
const GRID = ['--grid', 'reactor.reactions.0.conversion=0.15:0.35:8', '--values', 'purge-split.out.recycle=0.95,0.96,0.97,0.98,0.99'];
const REPORT = ['--report', 'streams.purge.flows.H2[kmol/h],streams.recycle.fractions.N2,loop.recycle-ratio'];

describe('loopclose sweep --jobs and --shard, loopclose merge', () => {
  const dir = dirname(tempFile('x', ''));
  const run = (name: string, extra: string[]) => {
    const out = join(dir, name);
    const r = cli(['sweep', PILOT, ...GRID, ...REPORT, '--block', '6', '--out', out, ...extra]);
    expect(r.code, r.stderr).toBe(0);
    return out;
  };
  let serialText = '';
  beforeAll(() => {
    serialText = readFileSync(run('serial.csv', []), 'utf8');
  });

  it('writes on worker threads the same bytes as a serial run', () => {
    expect(serialText.split('\n').length).toBe(4 + 40 + 1);
    expect(readFileSync(run('jobs2.csv', ['--jobs', '2']), 'utf8')).toBe(serialText);
    expect(readFileSync(run('jobs3.csv', ['--jobs', '3']), 'utf8')).toBe(serialText);
  });

  it('merges shards into the bytes of the full run, each shard holding its share only', () => {
    const shards = [1, 2, 3].map((i) => run(`part-${i}.csv`, ['--shard', `${i}/3`]));
    const counts = shards.map((s) => readFileSync(s, 'utf8').split('\n').length - 5);
    expect(counts.reduce((a, b) => a + b, 0)).toBe(40);
    // Blocks of 6 in walk order: 7 blocks, dealt 0,3,6 / 1,4 / 2,5.
    expect(counts).toEqual([6 + 6 + 4, 12, 12]);
    const m = cli(['merge', shards[2], shards[0], shards[1]]);
    expect(m.code, m.stderr).toBe(0);
    expect(m.stdout).toBe(serialText);
    const out = join(dir, 'merged.csv');
    expect(cli(['merge', ...shards, '--out', out]).code).toBe(0);
    expect(readFileSync(out, 'utf8')).toBe(serialText);
  });

  it('merges JSON Lines shards run on worker threads', () => {
    const full = readFileSync(run('full.jsonl', ['--jsonl']), 'utf8');
    const shards = [1, 2].map((i) => run(`part-${i}.jsonl`, ['--jsonl', '--shard', `${i}/2`, '--jobs', '2']));
    const m = cli(['merge', ...shards]);
    expect(m.code, m.stderr).toBe(0);
    expect(m.stdout).toBe(full);
  });

  it('refuses a missing shard, a shard given twice, a shard cut short, a lost row and shards of different sweeps', () => {
    const a = run('m-1.csv', ['--shard', '1/2']);
    const b = run('m-2.csv', ['--shard', '2/2']);
    const missing = cli(['merge', a]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/shard 2\/2 is missing/);
    const twice = cli(['merge', a, b, a]);
    expect(twice.code).toBe(2);
    expect(twice.stderr).toMatch(/shard 1\/2 is given twice/);
    const lines = readFileSync(b, 'utf8').split('\n');
    const cut = join(dir, 'm-2-cut.csv');
    writeFileSync(cut, `${lines.slice(0, 10).join('\n')}\n${lines[10].slice(0, 5)}`);
    const partial = cli(['merge', a, cut]);
    expect(partial.code).toBe(2);
    expect(partial.stderr).toMatch(/ends with a partial line/);
    const lost = join(dir, 'm-2-lost.csv');
    writeFileSync(lost, `${[...lines.slice(0, 7), ...lines.slice(8)].join('\n')}`);
    const gap = cli(['merge', a, lost]);
    expect(gap.code).toBe(2);
    expect(gap.stderr).toMatch(/lacks 1 of its 18 points/);
    const doubled = join(dir, 'm-2-doubled.csv');
    writeFileSync(doubled, `${[...lines.slice(0, 8), lines[7], ...lines.slice(8)].join('\n')}`);
    expect(cli(['merge', a, doubled]).stderr).toMatch(/point \d+ is written twice/);
    const other = join(dir, 'other.csv');
    expect(cli(['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:4', '--shard', '2/2', '--out', other]).code).toBe(0);
    const mixed = cli(['merge', a, other]);
    expect(mixed.code).toBe(2);
    expect(mixed.stderr).toMatch(/come from different sweeps/);
  });
});
