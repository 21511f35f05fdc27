/**
 * The start of the command line: V8 is handed the code cache the build made (src/cli/start.ts),
 * mathjs is read only for a unit outside the built-in table, and nothing changes for the user:
 * the same output without a cache or with a stale one, every command still listed and found, a
 * unit outside the table still parsed, --jobs as before, and the library entry exporting what the
 * sources export.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { commandName } from '../../src/cli/main.js';
import { BIN, cli, ROOT, tempFile } from '../helpers/cli.js';

const DIST = join(ROOT, 'dist');
const PILOT = 'flowsheets/methanol-pilot.yaml';

/** Runs the CLI with a probe that prints, at exit, which bundle files of dist/ were read with require(). */
function requiredFiles(args: string[]): { code: number; required: string[] } {
  const probe = tempFile('probe.cjs', "process.on('exit', () => process.stderr.write('\\nREQUIRED ' + JSON.stringify(Object.keys(require.cache).map((k) => require('node:path').basename(k))) + '\\n'));\n");
  const r = spawnSync(process.execPath, ['--require', probe, BIN, ...args], { cwd: ROOT, encoding: 'utf8', timeout: 60000 });
  const m = /REQUIRED (.*)\n/.exec(r.stderr);
  expect(m, r.stderr).not.toBeNull();
  return { code: r.status ?? -1, required: JSON.parse(m![1]) };
}

describe('what each command reads', () => {
  it('the command line starts from the code cache the build made; without it, or with a stale one, it prints the same', () => {
    const solve = (bin: string) => spawnSync(process.execPath, [bin, 'solve', join(ROOT, PILOT)], { encoding: 'utf8', env: { ...process.env, LOOPCLOSE_CODE_CACHE: 'report' } });
    const built = solve(BIN);
    expect(built.status).toBe(0);
    expect(built.stderr).toBe('loopclose code cache: accepted\n');
    // A copy of bin/ and dist/ without the cache, then with the cache of another source.
    const dir = dirname(tempFile('package.json', readFileSync(join(ROOT, 'package.json'), 'utf8')));
    cpSync(join(ROOT, 'bin'), join(dir, 'bin'), { recursive: true });
    cpSync(DIST, join(dir, 'dist'), { recursive: true, filter: (f) => !f.endsWith('.map') });
    const cache = join(dir, 'dist', 'cli-code.cjs.cache');
    rmSync(cache);
    const none = solve(join(dir, 'bin', 'loopclose.js'));
    expect(none.status).toBe(0);
    expect(none.stderr).toBe('loopclose code cache: none\n');
    expect(none.stdout).toBe(built.stdout);
    // V8 checks the cache against the source it is given: a cache of a changed source is refused.
    writeFileSync(join(dir, 'dist', 'cli-code.cjs'), `${readFileSync(join(DIST, 'cli-code.cjs'), 'utf8')}\n// changed\n`);
    cpSync(join(DIST, 'cli-code.cjs.cache'), cache);
    const stale = solve(join(dir, 'bin', 'loopclose.js'));
    expect(stale.status).toBe(0);
    expect(stale.stderr).toBe('loopclose code cache: rejected\n');
    expect(stale.stdout).toBe(built.stdout);
  });

  it('mathjs is read from disk only when a unit outside the built-in table is parsed, and then gives the same answer', () => {
    const reading = ['meter', '--gas', 'H2=0.985,N2=0.015', '--flow', '12.6 m3/h', '--temperature', '35 degC', '--json'];
    const table = requiredFiles([...reading, '--pressure', '3.1 MPa']);
    expect(table.code).toBe(0);
    expect(table.required).not.toContain('units-mathjs.cjs');
    const solve = requiredFiles(['solve', PILOT]);
    expect(solve.code).toBe(0);
    expect(solve.required).not.toContain('units-mathjs.cjs');
    // N/cm2 is not in the table: mathjs answers it (310 N/cm2 = 3.1 MPa exactly).
    const other = requiredFiles([...reading, '--pressure', '310 N/cm^2']);
    expect(other.code).toBe(0);
    expect(other.required).toContain('units-mathjs.cjs');
    const a = cli([...reading, '--pressure', '3.1 MPa']);
    const b = cli([...reading, '--pressure', '310 N/cm^2']);
    expect(a.code).toBe(0);
    expect(b.code).toBe(0);
    const flowOf = (s: string): number => JSON.parse(s).feeds.reading.molarFlow;
    expect(flowOf(a.stdout)).toBeGreaterThan(4);
    expect(flowOf(b.stdout)).toBe(flowOf(a.stdout));
  });

  it('a unit outside the table in a file parses too (a meter pressure written in kN/m^2, gauge)', () => {
    const text = readFileSync(join(ROOT, PILOT), 'utf8');
    // 30 barg, and the same gauge pressure in kPa written as mathjs spells it (not in the table).
    const other = text.replace('pressure: 30 barg, temperature: 35 degC', 'pressure: 3000 kN/m^2 g, temperature: 35 degC');
    expect(other).not.toBe(text);
    const a = cli(['solve', join(ROOT, PILOT), '--json']);
    const path = tempFile('pilot.yaml', other);
    const b = cli(['solve', path, '--json']);
    expect(a.code).toBe(0);
    expect(b.code, b.stderr).toBe(0);
    expect(JSON.parse(b.stdout).streams).toEqual(JSON.parse(a.stdout).streams);
  });
});

describe('the commands are all found', () => {
  it('commandName takes the first word that is not an option', () => {
    expect(commandName(['node', 'loopclose', 'solve', 'x.yaml'])).toBe('solve');
    expect(commandName(['node', 'loopclose', '--debug', 'sweep', 'x.yaml', '--jobs', '2'])).toBe('sweep');
    expect(commandName(['node', 'loopclose', '--version'])).toBeUndefined();
    expect(commandName(['node', 'loopclose'])).toBeUndefined();
  });

  it('help lists every command in its order, and a misspelled command gets its suggestion', () => {
    const r = cli(['help']);
    expect(r.code).toBe(0);
    const names = [...r.stdout.matchAll(/^ {2}(\w+) \[options\]/gm)].map((m) => m[1]);
    expect(names).toEqual(['meter', 'solve', 'report', 'plot', 'sweep', 'merge', 'reconcile']);
    const s = cli(['sweep', '--help']);
    expect(s.code).toBe(0);
    expect(s.stdout).toContain('--jobs <n>');
    const bad = cli(['reconcil', PILOT]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain('(Did you mean reconcile?)');
  });

  it('sweep with --jobs 2 writes the same rows as serial', () => {
    const args = (out: string) => ['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:6', '--block', '2', '--report', 'loop.recycle-ratio', '--out', out];
    const dir = dirname(tempFile('flowsheet.yaml', readFileSync(join(ROOT, PILOT), 'utf8')));
    const serial = join(dir, 'serial.csv');
    const parallel = join(dir, 'jobs.csv');
    expect(cli(args(serial)).code).toBe(0);
    const p = cli([...args(parallel), '--jobs', '2']);
    expect(p.code, p.stderr).toBe(0);
    expect(readFileSync(parallel, 'utf8')).toBe(readFileSync(serial, 'utf8'));
  });
});

describe('the library entry', () => {
  it('dist/index.mjs exports what src/index.ts exports', async () => {
    const built = await import(pathToFileURL(join(DIST, 'index.mjs')).href);
    const src = await import('../../src/index.js');
    expect(Object.keys(built).sort()).toEqual(Object.keys(src).sort());
    expect(built.parseQuantity('310 N/cm^2', 'pressure').value).toBe(3.1e6);
  });
});
