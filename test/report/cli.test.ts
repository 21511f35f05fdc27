import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { BIN, ROOT, cli } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'loopclose-report-'));
const SWEEP = join(dir, 'sweep.csv');

function withEnv(args: string[], env: Record<string, string>) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ...env }, timeout: 60000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  const r = cli(['sweep', 'flowsheets/methanol-pilot.yaml', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:5', '--report', 'streams.purge.total[kmol/h],streams.recycle.fractions.N2', '--out', SWEEP]);
  expect(r.code).toBe(0);
});

describe('loopclose report', () => {
  it('writes one HTML file; with --no-date the same file gives the same bytes', () => {
    const a = join(dir, 'a.html');
    const b = join(dir, 'b.html');
    expect(cli(['report', 'flowsheets/ammonia-loop.yaml', '--out', a, '--no-date']).code).toBe(0);
    expect(cli(['report', 'flowsheets/ammonia-loop.yaml', '--out', b, '--no-date']).code).toBe(0);
    const html = readFileSync(a, 'utf8');
    expect(readFileSync(b, 'utf8')).toBe(html);
    expect(html).toContain('<svg');
    expect(html).toContain('Status: converged');
    expect(html).not.toContain('; made ');
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('dates the report, from SOURCE_DATE_EPOCH when it is set', () => {
    const r = withEnv(['report', 'flowsheets/ammonia-loop.yaml'], { SOURCE_DATE_EPOCH: '1767225600' });
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('; made 2026-01-01 00:00 UTC');
  });

  it('a result that did not converge: exit 3, the report says so and has no stream table', () => {
    const out = join(dir, 'nc.html');
    const r = cli(['report', 'flowsheets/methanol-pilot.yaml', '--max-passes', '3', '--method', 'wegstein', '--out', out]);
    expect(r.code).toBe(3);
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('Status: not-converged');
    expect(html).toContain('this is not a solution');
    expect(html).not.toContain('<h2>Streams');
  });

  it('--svg writes the drawing alone; --flow-unit sets the unit of flows', () => {
    const r = cli(['report', 'flowsheets/benzene-hydrogenation.yaml', '--svg']);
    expect(r.code).toBe(0);
    expect(r.stdout.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg')).toBe(true);
    const h = cli(['report', 'flowsheets/benzene-hydrogenation.yaml', '--flow-unit', 'lbmol/h', '--no-date']);
    expect(h.stdout).toContain('total [lbmol/h]');
    const bad = cli(['report', 'flowsheets/benzene-hydrogenation.yaml', '--flow-unit', 'bar']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain('--flow-unit');
  });

  it('the output\'s name and contents agree: no SVG into an .html file, no HTML page into an .svg one (nothing written)', () => {
    const html = join(dir, 'drawing.html');
    const a = cli(['report', 'flowsheets/benzene-hydrogenation.yaml', '--svg', '--out', html]);
    expect(a.code).toBe(2);
    expect(a.stderr).toContain('--svg asks for the drawing as SVG, but --out');
    expect(existsSync(html)).toBe(false);
    const svg = join(dir, 'page.svg');
    const b = cli(['report', 'flowsheets/benzene-hydrogenation.yaml', '--out', svg]);
    expect(b.code).toBe(2);
    expect(b.stderr).toContain('names an SVG picture, but the report is an HTML page');
    expect(existsSync(svg)).toBe(false);
    const ok = cli(['report', 'flowsheets/benzene-hydrogenation.yaml', '--svg', '--out', svg]);
    expect(ok.code).toBe(0);
    expect(readFileSync(svg, 'utf8').startsWith('<?xml')).toBe(true);
  });

  it('a sweep output gives the plots of the study (decided by the first line)', () => {
    const out = join(dir, 'sweep.html');
    const r = cli(['report', SWEEP, '--out', out]);
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html.match(/<div class="plot"><svg/g)).toHaveLength(2);
    expect(html).toContain('5 points:');
    expect(html).not.toContain('<script');
    const svg = cli(['report', SWEEP, '--svg']);
    expect(svg.code).toBe(2);
    expect(svg.stderr).toContain('--svg draws a flowsheet');
    // The options of a solve are refused with a study output, not ignored (nothing is written).
    const unit = cli(['report', SWEEP, '--flow-unit', 'mol/s', '--out', join(dir, 'unit.html')]);
    expect(unit.code).toBe(2);
    expect(unit.stderr).toContain('--flow-unit is for a flowsheet; this file is a study output');
    expect(existsSync(join(dir, 'unit.html'))).toBe(false);
  });

  it('says in --help how a sweep output is recognised', () => {
    const r = cli(['report', '--help']);
    expect(r.stdout).toContain('# loopclose sweep');
    expect(r.stdout).toContain('.csv or .jsonl');
  });

  it('a missing file: exit 2, one line of what is wrong, nothing written', () => {
    const out = join(dir, 'missing.html');
    const r = cli(['report', 'flowsheets/no-such-loop.yaml', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('no-such-loop.yaml');
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(existsSync(out)).toBe(false);
  });
});

describe('loopclose plot', () => {
  it('writes SVG or HTML by the name of --out', () => {
    const svg = join(dir, 'p.svg');
    const html = join(dir, 'p.html');
    expect(cli(['plot', SWEEP, '--x', 'reactor.reactions.0.conversion', '--y', 'streams.purge.total,streams.recycle.fractions.N2', '--out', svg]).code).toBe(0);
    expect(cli(['plot', SWEEP, '--x', 'reactor.reactions.0.conversion', '--y', 'streams.purge.total', '--out', html]).code).toBe(0);
    expect(readFileSync(svg, 'utf8').startsWith('<svg')).toBe(true);
    expect(readFileSync(svg, 'utf8')).toContain('streams.purge.total [kmol/h]');
    expect(readFileSync(html, 'utf8').startsWith('<!DOCTYPE html>')).toBe(true);
  });

  it('bad input: the project\'s diagnostics, exit 2, nothing written', () => {
    const out = join(dir, 'bad.html');
    let r = cli(['plot', SWEEP, '--x', 'reactor.reactions.0.convrsion', '--y', 'streams.purge.total', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('error: --x: `reactor.reactions.0.convrsion` is not a column of');
    expect(r.stderr).toContain('did you mean `reactor.reactions.0.conversion`?');
    expect(r.stderr).toContain('1 error; nothing was computed.');
    expect(existsSync(out)).toBe(false);
    r = cli(['plot', 'flowsheets/ammonia-loop.yaml', '--x', 'a', '--y', 'b']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('flowsheets/ammonia-loop.yaml:1:1');
    r = cli(['plot', SWEEP, '--x', 'status', '--y', 'streams.purge.total']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('is not a numeric column');
    r = cli(['plot', SWEEP, '--y', 'streams.purge.total', '--out', join(dir, 'p.png')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--x: give the path of the x axis');
    expect(r.stderr).toContain('ends in neither .html nor .svg');
    expect(r.stderr).not.toMatch(/\n\s+at /);
    r = cli(['plot', SWEEP, '--x', 'reactor.reactions.0.conversion', '--y', 'streams.purge.total', '--svg', '--out', join(dir, 'p2.html')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--svg asks for SVG');
  });
});
