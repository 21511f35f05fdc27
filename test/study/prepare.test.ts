import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { readFileSync } from 'node:fs';
import { InputError } from '../../src/diagnostics.js';
import { blockRows, prepareSweep, type SweepSpec } from '../../src/study/sweep.js';
import { ROOT } from '../helpers/cli.js';

const PILOT = join(ROOT, 'flowsheets', 'methanol-pilot.yaml');

function spec(grid: string): SweepSpec {
  return {
    file: 'flowsheets/methanol-pilot.yaml', text: readFileSync(PILOT, 'utf8'),
    axes: [{ kind: 'grid', text: grid }], report: ['loop.recycle-ratio'], targets: [], block: 50, continuation: true,
  };
}

describe('prepareSweep for a worker thread (checked: the main thread tried every axis value already)', () => {
  it('gives the same context and the same rows as the main thread', () => {
    const s = spec('reactor.reactions.0.conversion=0.2:0.3:4');
    const main = prepareSweep(s);
    const worker = prepareSweep(s, { checked: true });
    expect(worker.blocks).toEqual(main.blocks);
    expect(worker.axes.map((a) => Array.from(a.si))).toEqual(main.axes.map((a) => Array.from(a.si)));
    expect([...blockRows(worker, 0)]).toEqual([...blockRows(main, 0)]);
  });

  it('leaves out only the per-value check: a grid that leaves the range is refused before solving, unless checked', () => {
    // a conversion above 1 is outside what the file accepts
    const s = spec('reactor.reactions.0.conversion=0.5:1.5:3');
    expect(() => prepareSweep(s)).toThrow(InputError);
    expect(() => prepareSweep(s, { checked: true })).not.toThrow();
  });
});
