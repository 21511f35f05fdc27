/**
 * `loopclose reconcile` through the built CLI: the snapshot of the ammonia demo (text, the JSON
 * contract, CSV), a historian export with its row problems said per row, a file problem with a
 * located message and exit 2, and resume after an interruption writing the same bytes.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { cli, ROOT, tempFile } from '../helpers/cli.js';
import { dirname, join } from 'node:path';
import { readStudyTable } from '../../src/report/study-table.js';

const DEMO = 'flowsheets/ammonia-loop.yaml';

describe('loopclose reconcile: one snapshot', () => {
  it('text: status first, the suspect named, the raw closure with its uncertainty, the caution', () => {
    const r = cli(['reconcile', DEMO]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout.split('\n')[0]).toMatch(/^status: gross-error/);
    expect(r.stdout).toMatch(/suspect: FI-101 \(bias \+\d\.\d % of its reading\)/);
    expect(r.stdout).toMatch(/\nN +[\d.]+ +[\d.]+ +\+\d\.\d\d % \+- \d\.\d\d %/);
    expect(r.stdout).toMatch(/reviewed by a qualified engineer/);
    expect(r.stdout).toMatch(/custody transfer and environmental reporting follow their own codes/);
  });

  it('--json holds the contract of the issue (SI, mol/s)', () => {
    const r = cli(['reconcile', DEMO, '--json']);
    expect(r.code, r.stderr).toBe(0);
    const o = JSON.parse(r.stdout);
    expect(o.status).toBe('gross-error');
    for (const k of ['in', 'out', 'relative', 'uncertainty']) {
      expect(typeof o.closure.elements.N[k]).toBe('number');
      expect(typeof o.closure.mass[k]).toBe('number');
    }
    const fi = o.instruments['FI-101'];
    expect(fi).toMatchObject({ kind: 'meter', stream: 'makeup', suspect: true });
    for (const k of ['measured', 'reconciled', 'sigma', 'reconciledSigma']) expect(typeof fi.molarFlow[k]).toBe('number');
    expect(typeof fi.test).toBe('number');
    const ai = o.instruments['AI-205'];
    expect(ai).toMatchObject({ kind: 'analyzer', stream: 'purge', suspect: false });
    expect(typeof ai.fractions.H2.measured).toBe('number');
    expect(typeof ai.fractions.H2.reconciled).toBe('number');
    expect(typeof ai.fractions.H2.sigma).toBe('number');
    expect(o.globalTest).toMatchObject({ dof: 7, passed: false });
    for (const k of ['statistic', 'critical', 'pValue']) expect(typeof o.globalTest[k]).toBe('number');
    expect(o.suspects).toHaveLength(1);
    expect(o.suspects[0].tag).toBe('FI-101');
    expect(o.suspects[0].bias).toBeGreaterThan(0.03);
    expect(o.afterRemoving.tags).toEqual(['FI-101']);
    expect(o.afterRemoving.globalTest.passed).toBe(true);
    expect(o.afterRemoving.instruments['FI-120'].molarFlow.reconciled).toBeGreaterThan(0);
    const conv = o.parameters['converter.reactions.0.conversion'];
    expect(typeof conv.value).toBe('number');
    expect(typeof conv.sigma).toBe('number');
    expect(o.unmeasured['streams.converter-out.total']).toMatchObject({ observable: true });
    // The meter's budget: instrument, line pressure, line temperature, and the equation of state
    // (SRK measured against GERG-2008 at this gas and state, with GERG-2008's own stated figure).
    expect(fi.budget.terms.map((t: { source: string }) => t.source)).toEqual(['instrument', 'line pressure (PI-101)', 'line temperature (TI-101)', 'equation of state (SRK)', 'reference equation (GERG-2008)']);
    expect(fi.budget.terms[3].note).toMatch(/^measured: SRK differs from GERG-2008 by -0\.5\d+ %/);
  });

  it('--csv: a header line and one row, with the status', () => {
    const r = cli(['reconcile', DEMO, '--csv']);
    expect(r.code, r.stderr).toBe(0);
    const [head, row] = r.stdout.trim().split('\n');
    const h = head.split(',');
    expect(h.slice(0, 3)).toEqual(['point', 'timestamp', 'status']);
    expect(row.split(',')[h.indexOf('status')]).toBe('gross-error');
  });

  it('a file without instruments: a clear message, exit 2', () => {
    const r = cli(['reconcile', 'flowsheets/methanol-pilot.yaml']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/declares no instruments/);
  });
});

/** The first rows of the demo's year of data, with row problems planted. */
function smallExport(): string {
  const lines = readFileSync('flowsheets/data/ammonia-loop-year.csv', 'utf8').split('\n');
  const at = lines.findIndex((l) => l.startsWith('timestamp'));
  const head = lines.slice(at, at + 2);
  const rows = lines.slice(at + 2, at + 2 + 14);
  const cols = head[0].split(',');
  const set = (r: number, col: string, v: string) => {
    const f = rows[r].split(',');
    f[cols.indexOf(col)] = v;
    rows[r] = f.join(',');
  };
  set(1, 'FI-205', ''); // an empty cell
  set(2, 'FI-310', '-0.3'); // a negative reading
  rows[3] = rows[3].replace(/^[^,]*/, '2024-13-45 25:00'); // a bad timestamp
  for (let r = 5; r < 12; r++) set(r, 'FI-120', '11000.0'); // frozen for 7 rows
  return [...head, ...rows].join('\n') + '\n';
}

describe('loopclose reconcile --readings: one row per timestamp', () => {
  const csv = tempFile('plant.csv', smallExport());

  it('says each row problem in its row and goes on; a bad timestamp makes its row invalid (exit 2)', () => {
    const r = cli(['reconcile', DEMO, '--readings', csv]);
    expect(r.code, r.stderr).toBe(2);
    const lines = r.stdout.trim().split('\n');
    expect(lines[0]).toMatch(/^# loopclose reconcile [0-9a-f]{64} points=14 /);
    expect(lines[2]).toMatch(/^# note: Results must be reviewed by a qualified engineer/);
    const rows = lines.slice(4);
    expect(rows).toHaveLength(14);
    expect(rows[1]).toMatch(/FI-205: no reading \(empty cell\)/);
    expect(rows[2]).toMatch(/FI-310: left out: negative reading/);
    expect(rows[3]).toMatch(/^4,2024-13-45 25:00,invalid,/);
    expect(rows[3]).toMatch(/:1: the timestamp `2024-13-45 25:00` is not an ISO 8601 date/);
    // Frozen from the sixth equal reading on (default --frozen 6): rows 11 and 12.
    expect(rows[9]).not.toMatch(/FI-120: left out: frozen/);
    expect(rows[10]).toMatch(/FI-120: left out: frozen: the same value 11000.0 for 6 rows running/);
    expect(rows[11]).toMatch(/FI-120: left out: frozen/);
    for (const k of [0, 1, 2, 4, 10]) expect(rows[k].split(',')[2]).toMatch(/^(reconciled|gross-error)$/);
    expect(r.stderr).toMatch(/14 rows; .*1 invalid/);
  });

  it('--jsonl: a header object, then one object per row with the contract fields', () => {
    const r = cli(['reconcile', DEMO, '--readings', csv, '--jsonl']);
    const lines = r.stdout.trim().split('\n').map((l) => JSON.parse(l));
    expect(lines[0]).toMatchObject({ loopclose: 'reconcile', points: 14 });
    expect(lines[1]).toMatchObject({ point: 1, timestamp: '2024-01-01T00:00Z' });
    expect(typeof lines[1].instruments['FI-101'].molarFlow.reconciled).toBe('number');
    expect(lines[4]).toMatchObject({ point: 4, status: 'invalid' });
  });

  it('a missing column and a unit of the wrong dimension: located messages, exit 2, nothing written', () => {
    const text = smallExport().replace(',FI-310,', ',FI-311,').replace(',degC,', ',bar,');
    const bad = tempFile('bad.csv', text.replace('AI-120.NH3', 'AI-120.NH4'));
    const out = tempFile('out.csv', '');
    const r = cli(['reconcile', DEMO, '--readings', bad, '--out', out, '--overwrite']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.csv:1:\d+: error: `[^`]*bad\.csv`: column `FI-311` is not an instrument of the flowsheet/);
    expect(r.stderr).toMatch(/did you mean `FI-310`/);
    expect(r.stderr).toMatch(/has no column `FI-310` for instrument `FI-310`/);
    expect(r.stderr).toMatch(/`AI-120` does not read `NH4`/);
    expect(r.stderr).toMatch(/bad\.csv:2:\d+: error: `[^`]*`: the unit of column `TI-101`: .*a temperature is wanted here/);
    expect(readFileSync(out, 'utf8')).toBe('');
  });

  it('--resume after an interruption writes the same bytes as an uninterrupted run', () => {
    const full = tempFile('full.csv', '');
    expect(cli(['reconcile', DEMO, '--readings', csv, '--out', full, '--overwrite', '--block', '4']).code).toBe(2);
    const whole = readFileSync(full, 'utf8');
    // Cut after the header and six rows and half of the seventh (a killed run).
    const lines = whole.split('\n');
    const cut = `${lines.slice(0, 4 + 6).join('\n')}\n${lines[10].slice(0, 25)}`;
    const part = tempFile('part.csv', '');
    writeFileSync(part, cut);
    const r = cli(['reconcile', DEMO, '--readings', csv, '--out', part, '--resume', '--block', '4']);
    expect(r.code, r.stderr).toBe(2);
    expect(readFileSync(part, 'utf8')).toBe(whole);
    // A different command refuses to resume.
    const again = cli(['reconcile', DEMO, '--readings', csv, '--out', part, '--resume', '--block', '5']);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/the command differs/);
  });
});

describe('a reconciliation over time, plotted', () => {
  it('closure per element and a meter\'s adjustment against time, from the rows of a historian export', () => {
    const year = readFileSync(join(ROOT, 'flowsheets', 'data', 'ammonia-loop-year.csv'), 'utf8').split('\n');
    const readings = tempFile('day.csv', `${year.slice(0, 27).join('\n')}\n`);
    const out = join(dirname(readings), 'day-out.csv');
    const r = cli(['reconcile', DEMO, '--readings', readings, '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    const header = readFileSync(out, 'utf8').split('\n')[3];
    expect(header).toContain('FI-101.adjustment[mol/s]');
    expect(header).toContain('FI-101.bias');
    const svg = join(dirname(readings), 'day.svg');
    const p = cli(['plot', out, '--x', 'timestamp', '--y', 'closure.N.relative,FI-101.adjustment', '--out', svg]);
    expect(p.code, p.stderr).toBe(0);
    const text = readFileSync(svg, 'utf8');
    expect(text).toContain('timestamp (UTC)');
    expect(text).toContain('FI-101.adjustment [mol/s]');
    expect(text).toContain('closure.N.relative');
  });

  it('the same rows written as JSON Lines give every CSV column, with its unit and the same numbers, and plot the same', () => {
    const year = readFileSync(join(ROOT, 'flowsheets', 'data', 'ammonia-loop-year.csv'), 'utf8').split('\n');
    // Rows 1-12 of the demo export, and a copy of row 12 with FI-101 reading 50 % high (a gross error, with suspects).
    const rows = year.slice(0, 15);
    const high = rows[14].split(',');
    high[0] = high[0].replace('T11:', 'T12:');
    high[3] = String(Number(high[3]) * 1.5);
    const readings = tempFile('jl.csv', `${[...rows, high.join(',')].join('\n')}\n`);
    const csvOut = join(dirname(readings), 'jl-out.csv');
    const jsonlOut = join(dirname(readings), 'jl-out.jsonl');
    expect(cli(['reconcile', DEMO, '--readings', readings, '--out', csvOut]).code).toBe(0);
    expect(cli(['reconcile', DEMO, '--readings', readings, '--out', jsonlOut, '--jsonl']).code).toBe(0);
    const c = readStudyTable(readFileSync(csvOut, 'utf8'), 'a.csv');
    const j = readStudyTable(readFileSync(jsonlOut, 'utf8'), 'a.jsonl');
    expect(c.rows.map((r) => r.status)).toContain('gross-error');
    expect(j.rows.map((r) => r.status)).toEqual(c.rows.map((r) => r.status));
    let compared = 0;
    for (const col of c.columns) {
      if (col.role === 'message' || col.path === 'suspects' || col.path === 'left-out') continue;
      const jc = j.columns.find((x) => x.path === col.path);
      expect(jc, col.path).toBeDefined();
      expect(jc!.unit, col.path).toBe(col.unit);
      c.rows.forEach((r, k) => {
        const a = r.values.get(col.path);
        const b = j.rows[k].values.get(col.path);
        if (typeof a === 'number') {
          expect(typeof b, `${col.path} row ${k}`).toBe('number');
          expect(Math.abs((b as number) - a), `${col.path} row ${k}`).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(a)));
          compared++;
        } else expect(b ?? null, `${col.path} row ${k}`).toBe(a ?? null);
      });
    }
    expect(compared).toBeGreaterThan(500);
    const svg = join(dirname(readings), 'jl.svg');
    const p = cli(['plot', jsonlOut, '--x', 'timestamp', '--y', 'closure.N.relative,FI-101.adjustment', '--out', svg]);
    expect(p.code, p.stderr).toBe(0);
    expect(readFileSync(svg, 'utf8')).toContain('FI-101.adjustment [mol/s]');
  });
});
