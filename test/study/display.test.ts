import { describe, expect, it } from 'vitest';
import { cli } from '../helpers/cli.js';

describe('sweep output units', () => {
  const args = ['sweep', 'flowsheets/methanol-pilot.yaml', '--grid', 'reactor.reactions.0.conversion=0.2:0.3:2', '--report', 'streams.purge.flows.H2,streams.loop-gas.T,streams.recycle.fractions.N2'];

  it('CSV gives flows, pressures and temperatures in the file\'s display units, and says so in the header', () => {
    const r = cli(args);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split('\n');
    const head = lines.find((l) => l.startsWith('point,'))!;
    expect(head).toContain('streams.purge.flows.H2[kmol/h]');
    expect(head).toContain('streams.loop-gas.T[degC]');
    expect(head).toContain('streams.recycle.fractions.N2,');
    const row = lines[lines.indexOf(head) + 1].split(',');
    expect(Number(row[4])).toBeCloseTo(40, 9); // the condenser sets 40 degC on its vapor, loop-gas (the recycle is after the circulator)
  });

  it('JSON Lines stays in SI unless a unit is asked for, and both formats agree', () => {
    const csv = cli(args).stdout.trim().split('\n');
    const csvRow = csv[csv.findIndex((l) => l.startsWith('point,')) + 1].split(',');
    const jl = cli([...args, '--jsonl']).stdout.trim().split('\n').map((l) => JSON.parse(l));
    const row = jl.find((o) => o.point === 1);
    expect(row.outputs['streams.loop-gas.T']).toBeCloseTo(313.15, 9);
    expect(row.outputs['streams.purge.flows.H2'] * 3.6).toBeCloseTo(Number(csvRow[3]), 9);
  });
});
