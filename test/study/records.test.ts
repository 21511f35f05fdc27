import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { headerText, makeHeader, normalizedOptions, parseHeader, parseRow, rowText, splitCsv } from '../../src/study/records.js';
import { prepareSweep, type SweepSpec } from '../../src/study/sweep.js';
import { ROOT } from '../helpers/cli.js';

const PILOT = join(ROOT, 'flowsheets', 'methanol-pilot.yaml');

function spec(over: Partial<SweepSpec> = {}): SweepSpec {
  return {
    file: 'flowsheets/methanol-pilot.yaml', text: readFileSync(PILOT, 'utf8'),
    axes: [{ kind: 'grid', text: 'reactor.reactions.0.conversion=0.2:0.3:3' }, { kind: 'values', text: 'feeds.hydrogen.meter.flow=12,13 m3/h' }],
    report: ['streams.purge.flows.H2[kmol/h]', 'loop.recycle-ratio'], targets: [], block: 50, continuation: true, ...over,
  };
}

describe('sweep output records', () => {
  const ctx = prepareSweep(spec());

  it('reads back the header it writes, in both formats', () => {
    for (const format of ['csv', 'jsonl'] as const) {
      const h = makeHeader(ctx, format, { index: 2, count: 3 });
      const text = headerText(h);
      expect(text.endsWith('\n')).toBe(true);
      const back = parseHeader(text.split('\n'));
      expect(back).toEqual(h);
    }
  });

  it('labels columns with their unit: the asked display unit, else SI', () => {
    const h = makeHeader(ctx, 'csv', { index: 1, count: 1 });
    expect(headerText(h).split('\n')[3]).toBe('point,reactor.reactions.0.conversion,feeds.hydrogen.meter.flow[m3/h],status,streams.purge.flows.H2[kmol/h],loop.recycle-ratio,message');
    expect(headerText(h).split('\n')[0]).toMatch(/^# loopclose sweep [0-9a-f]{64} points=6 shape=3x2 block=50 shard=1\/1 flowsheet=[0-9a-f]{64}$/);
  });

  it('changes the digest with the flowsheet text or a row-deciding option, not with the file path', () => {
    const d = makeHeader(ctx, 'csv', { index: 1, count: 1 }).digest;
    expect(makeHeader(prepareSweep(spec({ text: `${spec().text}# a comment\n` })), 'csv', { index: 1, count: 1 }).digest).not.toBe(d);
    expect(makeHeader(prepareSweep(spec({ block: 7 })), 'csv', { index: 1, count: 1 }).digest).not.toBe(d);
    expect(makeHeader(prepareSweep(spec({ continuation: false })), 'csv', { index: 1, count: 1 }).digest).not.toBe(d);
    expect(makeHeader(ctx, 'jsonl', { index: 1, count: 1 }).digest).not.toBe(d);
    expect(makeHeader(prepareSweep(spec({ file: PILOT })), 'csv', { index: 1, count: 1 }).digest).toBe(d);
    expect(makeHeader(ctx, 'csv', { index: 3, count: 4 }).digest).toBe(d);
    expect(normalizedOptions(spec(), 'csv')).toBe("--grid reactor.reactions.0.conversion=0.2:0.3:3 --values 'feeds.hydrogen.meter.flow=12,13 m3/h' --report 'streams.purge.flows.H2[kmol/h],loop.recycle-ratio' --block 50");
  });

  it('writes a JSON Lines row as point, inputs, status, outputs; a failed point with its message and no outputs', () => {
    const h = makeHeader(ctx, 'jsonl', { index: 1, count: 1 });
    const ok = rowText(ctx, h, { point: 4, status: 'converged', outputs: [1.5, 4.25] });
    expect(ok).toBe('{"point":4,"inputs":{"reactor.reactions.0.conversion":0.25,"feeds.hydrogen.meter.flow":13},"status":"converged","outputs":{"streams.purge.flows.H2":1.5,"loop.recycle-ratio":4.25}}');
    const bad = rowText(ctx, h, { point: 6, status: 'infeasible', message: 'stream `purge` would need a negative flow, of H2' });
    expect(JSON.parse(bad)).toEqual({ point: 6, inputs: { 'reactor.reactions.0.conversion': 0.3, 'feeds.hydrogen.meter.flow': 13 }, status: 'infeasible', outputs: null, message: 'stream `purge` would need a negative flow, of H2' });
    expect(parseRow('jsonl', bad, 2)).toEqual({ point: 6, status: 'infeasible' });
  });

  it('writes a CSV row with full precision, quoting a message with commas', () => {
    const h = makeHeader(ctx, 'csv', { index: 1, count: 1 });
    const v = 0.1 + 0.2;
    const line = rowText(ctx, h, { point: 1, status: 'converged', outputs: [v, Number.NaN] });
    expect(line).toBe('1,0.2,12,converged,0.30000000000000004,,');
    expect(Number(splitCsv(line)[4])).toBe(v);
    const bad = rowText(ctx, h, { point: 2, status: 'not-converged', message: 'stopped, "early"' });
    expect(bad).toBe('2,0.2,13,not-converged,,,"stopped, ""early"""');
    expect(splitCsv(bad)).toEqual(['2', '0.2', '13', 'not-converged', '', '', 'stopped, "early"']);
    expect(parseRow('csv', bad, 2)).toEqual({ point: 2, status: 'not-converged' });
    expect(parseRow('csv', '2,0.2,1', 2)).toBeUndefined();
  });
});
