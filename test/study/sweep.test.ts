import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { cli, ROOT, tempFile } from '../helpers/cli.js';

const PILOT = 'flowsheets/methanol-pilot.yaml';
const PILOT_TEXT = readFileSync(join(ROOT, PILOT), 'utf8');

interface Row { point: number; inputs: Record<string, number>; status: string; outputs: Record<string, number> | null; adjusted?: Record<string, number> | null; message?: string }

function jsonl(stdout: string): { header: Record<string, unknown>; rows: Row[] } {
  const lines = stdout.trim().split('\n');
  return { header: JSON.parse(lines[0]), rows: lines.slice(1).map((l) => JSON.parse(l) as Row) };
}

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);
}

/** The pilot file with the reactor's conversion and the hydrogen meter flow edited as text. */
function edited(conversion: number, h2Flow?: number): string {
  let t = PILOT_TEXT.replace('conversion: 0.25', `conversion: ${conversion}`);
  if (h2Flow !== undefined) t = t.replace('flow: 12.6 m3/h', `flow: ${h2Flow} m3/h`);
  expect(t).not.toBe(PILOT_TEXT);
  return t;
}

describe('loopclose sweep', () => {
  it('gives, for each row, what a single solve of the same inputs gives (to 1e-9)', () => {
    const r = cli(['sweep', PILOT, '--jsonl', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:4', '--grid', 'feeds.hydrogen.meter.flow=12:14:3 m3/h',
      '--report', 'streams.purge.flows.H2,streams.recycle.fractions.N2,loop.recycle-ratio,reactor.conversion.CO2,streams.crude-methanol.total[kmol/h]']);
    expect(r.code).toBe(0);
    const { rows } = jsonl(r.stdout);
    expect(rows.length).toBe(12);
    // Serpentine walk: the second row of the grid runs backwards.
    expect(rows.map((x) => x.point)).toEqual([1, 2, 3, 6, 5, 4, 7, 8, 9, 12, 11, 10]);
    for (const row of [rows[0], rows[4], rows[11]]) {
      const c = row.inputs['reactor.reactions.0.conversion'];
      const f = row.inputs['feeds.hydrogen.meter.flow'];
      const s = cli(['solve', tempFile('point.yaml', edited(c, f)), '--json']);
      expect(s.code).toBe(0);
      const j = JSON.parse(s.stdout);
      const o = row.outputs!;
      expect(row.status).toBe('converged');
      expect(rel(o['streams.purge.flows.H2'], j.streams.purge.flows.H2)).toBeLessThan(1e-9);
      expect(rel(o['streams.recycle.fractions.N2'], j.streams.recycle.fractions.N2)).toBeLessThan(1e-9);
      expect(rel(o['loop.recycle-ratio'], j.loop.recycleRatio)).toBeLessThan(1e-9);
      expect(rel(o['reactor.conversion.CO2'], j.units.reactor.reactions[0].conversion)).toBeLessThan(1e-9);
      // A display unit in brackets: kmol/h = mol/s * 3.6.
      expect(rel(o['streams.crude-methanol.total'], j.streams['crude-methanol'].total * 3.6)).toBeLessThan(1e-9);
    }
    // The grid's own numbering: point = 1 + 3 * (conversion index) + (flow index).
    expect(rows.find((x) => x.point === 5)!.inputs).toEqual({ 'reactor.reactions.0.conversion': Number((0.15 + 0.2 / 3).toPrecision(15)), 'feeds.hydrogen.meter.flow': 13 });
  });

  it('closes the nitrogen balance at every point: N2 in the feeds leaves in purge and crude (steady-state material balance)', () => {
    // Conservation of mass for an inert at steady state (common practice, no source needed).
    const r = cli(['sweep', PILOT, '--jsonl', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:6',
      '--report', 'streams.purge.flows.N2,streams.crude-methanol.flows.N2,streams.hydrogen.flows.N2,streams.carbon-dioxide.flows.N2']);
    expect(r.code).toBe(0);
    for (const row of jsonl(r.stdout).rows) {
      const o = row.outputs!;
      const fed = o['streams.hydrogen.flows.N2'] + o['streams.carbon-dioxide.flows.N2'];
      expect(rel(o['streams.purge.flows.N2'] + o['streams.crude-methanol.flows.N2'], fed)).toBeLessThan(1e-8);
    }
  });

  it('writes a failed point with its status and message and goes on; the next point starts from a good neighbour', () => {
    // All gas recycled (no purge): hydrogen and nitrogen leave only dissolved in the crude, which
    // cannot take what comes in, so the loop has no steady state (found from the iterate).
    const r = cli(['sweep', PILOT, '--values', 'purge-split.out.recycle=0.9,1,0.95', '--report', 'streams.recycle.fractions.N2']);
    expect(r.code).toBe(4);
    const lines = r.stdout.trim().split('\n');
    expect(lines[3]).toBe('point,purge-split.out.recycle,status,streams.recycle.fractions.N2,message');
    expect(lines[4]).toMatch(/^1,0\.9,converged,0\.0\d+,$/);
    expect(lines[5]).toMatch(/^2,1,infeasible,,"`H2` builds up in the recycle loop/);
    expect(lines[6]).toMatch(/^3,0\.95,converged,0\.0\d+,$/);
    expect(r.stderr).toMatch(/3 points; 2 converged, 1 infeasible/);
  });

  it('is silent on standard error when it is not a terminal, and names the caution in the header', () => {
    const r = cli(['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:3']);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('');
    expect(r.stdout.split('\n')[2]).toMatch(/^# note: Results must be reviewed by a qualified engineer/);
  });

  it('holds a target at every point, and reports an impossible target as infeasible (exit 4)', () => {
    const r = cli(['sweep', PILOT, '--jsonl', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:3', '--report', 'streams.recycle.fractions.N2',
      '--target', 'streams.recycle.fractions.N2 = 0.10', '--by', 'purge-split.out.recycle', '--within', '0.8:0.999']);
    expect(r.code).toBe(0);
    const { rows, header } = jsonl(r.stdout);
    expect(header.adjusted).toEqual([{ path: 'purge-split.out.recycle', unit: '1' }]);
    const recycle: number[] = [];
    for (const row of rows) {
      expect(row.status).toBe('converged');
      expect(Math.abs(row.outputs!['streams.recycle.fractions.N2'] - 0.1)).toBeLessThan(1e-9);
      recycle.push(row.adjusted!['purge-split.out.recycle']);
    }
    // More conversion per pass makes less recycle gas, so a larger purge share holds 10 % N2.
    expect(recycle[0]).toBeGreaterThan(recycle[1]);
    expect(recycle[1]).toBeGreaterThan(recycle[2]);
    const bad = cli(['sweep', PILOT, '--jsonl', '--grid', 'reactor.reactions.0.conversion=0.2:0.3:2', '--report', 'streams.recycle.fractions.N2',
      '--target', 'streams.recycle.fractions.N2 = 0.5', '--by', 'purge-split.out.recycle', '--within', '0.8:0.99']);
    expect(bad.code).toBe(4);
    for (const row of jsonl(bad.stdout).rows) {
      expect(row.status).toBe('infeasible');
      expect(row.outputs).toBeNull();
      expect(row.message).toMatch(/cannot be met/);
    }
  });

  it('refuses bad input with one message per problem, exit 2, and writes no file', () => {
    const out = join(dirname(tempFile('x', '')), 'never.csv');
    const r = cli(['sweep', PILOT, '--out', out, '--grid', 'reactor.reaction.0.conversion=0.1:0.3:3', '--grid', 'feeds.hydrogen.meter.flow=10:14:3', '--report', 'streams.purge.flows.XX']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/`reactor` has no number `reaction\.0\.conversion`/);
    expect(r.stderr).toMatch(/give the unit of the values/);
    expect(r.stderr).toMatch(/`XX` is not a component/);
    expect(r.stderr).toMatch(/3 errors; nothing was computed/);
    expect(r.stderr).not.toMatch(/at .*\.m?js:\d+/);
    expect(existsSync(out)).toBe(false);
    const range = cli(['sweep', PILOT, '--out', out, '--grid', 'reactor.reactions.0.conversion=0.5:1.2:8']);
    expect(range.code).toBe(2);
    expect(range.stderr).toMatch(/with `reactor\.reactions\.0\.conversion` = 1\.2/);
    expect(existsSync(out)).toBe(false);
    expect(cli(['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:3', '--jobs', '0']).stderr).toMatch(/--jobs must be a whole number >= 1/);
  });

  it('an --out in a missing folder, or a folder, is an input error (exit 2), not an internal one; so for reconcile', () => {
    const dir = dirname(tempFile('x', ''));
    for (const [out, why] of [[join(dir, 'no-such-folder', 'o.csv'), 'its folder does not exist'], [dir, 'it is a folder']]) {
      const r = cli(['sweep', PILOT, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:2', '--out', out]);
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toContain(`--out: cannot write ${out}: ${why}`);
      expect(r.stderr).not.toMatch(/internal error/);
      const p = cli(['reconcile', 'flowsheets/ammonia-loop.yaml', '--readings', 'flowsheets/data/ammonia-loop-year.csv', '--out', out]);
      expect(p.code, p.stderr).toBe(2);
      expect(p.stderr).toContain(`--out: cannot write ${out}: ${why}`);
    }
  });

  it('a pressure drop is swept and adjusted as a difference: in bar, never in a gauge unit that adds the atmosphere', () => {
    // preheat: 30 barg in (31.01325 bar), dp 0.1 bar -> 30.91325 bar out.
    const ok = cli(['sweep', PILOT, '--grid', 'preheat.dp=0.1:0.5:3 bar', '--report', 'streams.reactor-in.P[bar]', '--out', '-']);
    expect(ok.code, ok.stderr).toBe(0);
    const rows = ok.stdout.split('\n').filter((l) => /^\d+,/.test(l)).map((l) => Number(l.split(',')[3]));
    expect(rows).toEqual([30.91325, 30.71325, 30.51325].map((p) => expect.closeTo(p, 6)));
    const grid = cli(['sweep', PILOT, '--grid', 'preheat.dp=0.1:0.5:3 barg', '--report', 'streams.reactor-in.P[bar]', '--out', '-']);
    expect(grid.code).toBe(2);
    expect(grid.stderr).toMatch(/`preheat\.dp` is a pressure difference; `barg` reads a gauge pressure/);
    const target = cli(['solve', PILOT, '--target', 'streams.reactor-in.P = 29.5 barg', '--by', 'preheat.dp', '--within', '0.1:1 psig']);
    expect(target.code).toBe(2);
    expect(target.stderr).toMatch(/`preheat\.dp` is a pressure difference; `psig` reads a gauge pressure/);
  });

  it('will not write over an existing output unless told to resume or overwrite', () => {
    const out = tempFile('old.csv', 'someone else\'s data\n');
    const r = cli(['sweep', PILOT, '--out', out, '--grid', 'reactor.reactions.0.conversion=0.2:0.3:3']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/exists.*--resume.*--overwrite/s);
    expect(readFileSync(out, 'utf8')).toBe('someone else\'s data\n');
    const resume = cli(['sweep', PILOT, '--out', out, '--resume', '--grid', 'reactor.reactions.0.conversion=0.2:0.3:3']);
    expect(resume.code).toBe(2);
    expect(resume.stderr).toMatch(/is not a sweep output/);
  });
});
