/**
 * Messages and output that a plant engineer can act on: the diagnostic look, JSON diagnostics,
 * colour only on a terminal, the user's units, and output that never hides a failure.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { formatDiagnostic } from '../../src/diagnostics.js';
import { useColor } from '../../src/cli/main.js';
import { BIN, cli, ROOT, tempFile } from '../helpers/cli.js';

const PILOT = 'flowsheets/methanol-pilot.yaml';
const BAD = 'test/bad/pressure-as-mass.yaml';

describe('the diagnostic look', () => {
  it('first line FILE:LINE:COL: error: MESSAGE, then the line with its number, a marker under the token and what to change', () => {
    const r = cli(['solve', BAD]);
    expect(r.code).toBe(2);
    const lines = r.stderr.split('\n');
    expect(lines[0]).toBe('test/bad/pressure-as-mass.yaml:8:40: error: `pressure` of `meter` of feed `makeup`: `kg` is a mass; a pressure is wanted here');
    expect(lines[1]).toBe('    8:     meter: { flow: 180 m3/h, pressure: 78 kg, temperature: 40 degC }');
    expect(lines[2]).toBe(`${' '.repeat(7 + 39)}~~~~~`);
    expect(lines[3]).toMatch(/^ {4}to fix: accepted units: pressure: /);
  });

  it('colour only on a terminal, and never with NO_COLOR', () => {
    const d = { severity: 'error' as const, message: 'm', help: 'h' };
    expect(formatDiagnostic(d, undefined, { color: true })).toContain('\u001b[');
    expect(formatDiagnostic(d, undefined, { color: false })).not.toContain('\u001b[');
    const tty = { isTTY: true } as NodeJS.WriteStream;
    const pipe = { isTTY: false } as NodeJS.WriteStream;
    const saved = process.env.NO_COLOR;
    try {
      delete process.env.NO_COLOR;
      expect(useColor(tty)).toBe(true);
      expect(useColor(pipe)).toBe(false);
      process.env.NO_COLOR = '1';
      expect(useColor(tty)).toBe(false);
    } finally {
      if (saved === undefined) delete process.env.NO_COLOR;
      else process.env.NO_COLOR = saved;
    }
    // The child's standard error is a pipe: plain text.
    expect(cli(['solve', BAD]).stderr).not.toContain('\u001b[');
  });

  it('--json on invalid input prints the diagnostics as JSON, exit 2, for solve and meter and for a bad option', () => {
    for (const cmd of [['solve', BAD, '--json'], ['meter', BAD, '--json']]) {
      const r = cli(cmd);
      expect(r.code).toBe(2);
      const j = JSON.parse(r.stdout);
      expect(j.status).toBe('invalid');
      expect(j.diagnostics[0]).toEqual({
        severity: 'error', message: '`pressure` of `meter` of feed `makeup`: `kg` is a mass; a pressure is wanted here', file: BAD, line: 8, column: 40, endLine: 8, endColumn: 45,
        fix: expect.stringMatching(/^accepted units: pressure:/),
      });
    }
    const o = cli(['solve', PILOT, '--json', '--bogus']);
    expect(o.code).toBe(2);
    expect(JSON.parse(o.stdout).diagnostics[0].message).toMatch(/unknown option '--bogus'/);
  });
});

describe('output that never hides a failure', () => {
  it('solve --csv of a state that is not a solution: a status line in the CSV and the message on standard error', () => {
    const r = cli(['solve', PILOT, '--csv', '--max-passes', '3']);
    expect(r.code).toBe(3);
    expect(r.stdout.split('\n')[0]).toMatch(/^# status: not-converged: /);
    expect(r.stderr).toMatch(/^loopclose: not-converged: /);
  });

  it('a reader that goes away ends the output quietly', () => {
    const dir = dirname(tempFile('x', ''));
    const a = join(dir, 'a.csv');
    expect(cli(['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:40', '--out', a]).code).toBe(0);
    const r = spawnSync('bash', ['-c', `"${process.execPath}" "${BIN}" merge "${a}" | head -1; echo "rc=\${PIPESTATUS[0]}" >&2`], { cwd: ROOT, encoding: 'utf8' });
    expect(r.stdout.split('\n').filter(Boolean)).toHaveLength(1);
    expect(r.stderr).toBe('rc=0\n');
  });

  it('--out /dev/stdout works for a sweep (a device is written straight, not synced)', () => {
    const r = cli(['sweep', PILOT, '--values', 'reactor.reactions.0.conversion=0.2,0.3', '--report', 'loop.recycle-ratio', '--out', '/dev/stdout']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout.trim().split('\n').slice(-2).map((l) => l.split(',')[2])).toEqual(['converged', 'converged']);
  });

  it('solve --out and merge --out refuse to replace a file without --overwrite', () => {
    const dir = dirname(tempFile('x', ''));
    const out = join(dir, 'solve.txt');
    writeFileSync(out, 'kept\n');
    const r = cli(['solve', PILOT, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--out: `.*solve\.txt` exists/);
    expect(readFileSync(out, 'utf8')).toBe('kept\n');
    expect(cli(['solve', PILOT, '--out', out, '--overwrite']).code).toBe(0);
    expect(readFileSync(out, 'utf8')).toMatch(/^status: converged/);
    const shard = join(dir, 's.csv');
    expect(cli(['sweep', PILOT, '--values', 'reactor.reactions.0.conversion=0.2,0.3', '--out', shard]).code).toBe(0);
    const merged = join(dir, 'm.csv');
    writeFileSync(merged, 'kept\n');
    expect(cli(['merge', shard, '--out', merged]).code).toBe(2);
    expect(readFileSync(merged, 'utf8')).toBe('kept\n');
    expect(cli(['merge', shard, '--out', merged, '--overwrite']).code).toBe(0);
    expect(existsSync(merged)).toBe(true);
  });
});

describe('units follow the user', () => {
  it('a target bounded in m3/h reports the input it reached in m3/h, the output in the unit of the target', () => {
    const r = cli(['solve', PILOT, '--target', 'streams.purge.total = 2.5 kmol/h', '--by', 'feeds.hydrogen.meter.flow', '--within', '10:14 m3/h']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/streams\.purge\.total = 2\.5 kmol\/h: reached 2\.5 kmol\/h by feeds\.hydrogen\.meter\.flow = 12\.\d+ m3\/h/);
    const bad = cli(['solve', PILOT, '--target', 'streams.purge.total = 25 kmol/h', '--by', 'feeds.hydrogen.meter.flow', '--within', '10:14 m3/h']);
    expect(bad.code).toBe(4);
    expect(bad.stdout).toMatch(/closest .*\d kmol\/h .*14 m3\/h/);
    expect(bad.stdout).not.toMatch(/\d{4,} mol\/s|0\.0038\d+ m3\/s/);
  });

  it('an unmet target at the farthest a fraction can go does not advise wider bounds', () => {
    const r = cli(['solve', PILOT, '--target', 'streams.recycle.fractions.N2 = 0.001', '--by', 'purge-split.out.purge', '--within', '0.001:1']);
    expect(r.code).toBe(4);
    expect(r.stdout).toMatch(/as far as `purge-split\.out\.purge` can go/);
    expect(r.stdout).not.toMatch(/widen --within/);
  });

  it('an output that does not depend on the adjusted input says so', () => {
    const r = cli(['solve', PILOT, '--target', 'streams.hydrogen.total = 20 kmol/h', '--by', 'purge-split.out.purge', '--within', '0.001:0.2']);
    expect(r.code).toBe(4);
    expect(r.stdout).toMatch(/does not depend on it/);
  });

  it('streams in standard volume, with the reference named; molar mass and density in the table', () => {
    const r = cli(['solve', 'flowsheets/ammonia-loop.yaml', '--flow-unit', 'Nm3/h']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/flows in Nm3\/h \(ideal-gas volume at 0 degC, 101\.325 kPa/);
    // 2400 Nm3/h of makeup at the real-gas reference volume is 2399 Nm3/h on the ideal-gas basis
    // (Z of the makeup at 0 degC, 1 atm just below 1).
    const makeup = /^total\s+(\S+)/m.exec(r.stdout)![1];
    expect(Math.abs(Number(makeup) - 2400) / 2400).toBeLessThan(1e-3);
    expect(r.stdout).toMatch(/^molar mass g\/mol /m);
    expect(r.stdout).toMatch(/^density kg\/m3 /m);
    const s = cli(['sweep', 'flowsheets/ammonia-loop.yaml', '--values', 'purge-split.out.purge=0.025', '--report', 'streams.purge.total[Sm3/h],streams.purge.density', '--jsonl']);
    expect(s.code).toBe(0);
    const row = JSON.parse(s.stdout.trim().split('\n')[1]);
    // 1 mol = 23.645 L at 15 degC and 101.325 kPa, ideal gas (R T / P, CODATA 2018 R).
    const json = JSON.parse(cli(['solve', 'flowsheets/ammonia-loop.yaml', '--json']).stdout);
    expect(row.outputs['streams.purge.total']).toBeCloseTo(json.streams.purge.total * 3600 * 0.0236449, 2);
    expect(row.outputs['streams.purge.density']).toBeCloseTo(json.streams.purge.density, 8);
  });

  it('sweep inputs are written at full precision', () => {
    const r = cli(['sweep', PILOT, '--values', 'reactor.reactions.0.conversion=0.1234567890123,0.25', '--report', 'loop.recycle-ratio']);
    expect(r.stdout).toMatch(/^1,0\.1234567890123,converged,/m);
  });
});

describe('not-converged hints speak physics first', () => {
  it('names the stream and the components still changing before the solver\'s own account', () => {
    const r = cli(['solve', PILOT, '--max-passes', '12']);
    expect(r.code).toBe(3);
    const physics = r.stdout.indexOf('what the loop is doing at the last iterate:');
    const solver = r.stdout.indexOf('the solver: ');
    expect(physics).toBeGreaterThan(0);
    expect(solver).toBeGreaterThan(physics);
    expect(r.stdout).toMatch(/`recycle` still changes from pass to pass: \w+ by [\d.e+-]+ kmol\/h \([\d.e+]+ x its tolerance\)/);
  });
});

describe('small things that say what they mean', () => {
  it('a suggested bound is rounded the way a person would type it, in the file\'s unit', () => {
    const r = cli(['solve', PILOT, '--target', 'streams.purge.total = 2.5 kmol/h', '--by', 'feeds.hydrogen.meter.flow']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('to fix: for example --within "6.3:18.9 m3/h"');
  });

  it('one spelling: the output says vapor, as the file does', () => {
    const r = cli(['solve', PILOT]);
    expect(r.stdout).toMatch(/^vapor fraction /m);
    expect(r.stdout + cli(['solve', PILOT, '--csv']).stdout).not.toMatch(new RegExp(`vapo${'u'}r`));
  });

  it('Wegstein\'s bounds are set by solver.acceleration: a wider lowest bound speeds a slow loop', () => {
    const text = readFileSync(join(ROOT, PILOT), 'utf8');
    const wide = tempFile('wide.yaml', `${text}solver: { acceleration: { lowest: -20, highest: 0 } }\n`);
    const a = JSON.parse(cli(['solve', PILOT, '--method', 'wegstein', '--json']).stdout);
    const b = JSON.parse(cli(['solve', wide, '--method', 'wegstein', '--json']).stdout);
    expect(a.status).toBe('converged');
    expect(b.status).toBe('converged');
    expect(b.passes).toBeLessThan(a.passes / 2);
  });
});
