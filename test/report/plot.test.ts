import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/diagnostics.js';
import { plotHtml, plotSpec, plotSvg, studyReportHtml } from '../../src/report/plot.js';
import { parseTime, readStudyTable, splitCsvLine } from '../../src/report/study-table.js';

const NOTE = '# note: Results must be reviewed by a qualified engineer.';

/** A one-axis sweep in the CSV format of README "Output formats", with point 3 failed. Values invented for the test. */
const LINE_CSV = [
  `# loopclose sweep ${'a'.repeat(64)} points=5 shape=5 block=50 shard=1/1 flowsheet=${'b'.repeat(64)}`,
  '# command: loopclose sweep demo.yaml --grid reactor.reactions.0.conversion=0.1:0.3:5 --report streams.purge.total[kmol/h],loop.recycle-ratio --block 50',
  NOTE,
  'point,reactor.reactions.0.conversion,status,streams.purge.total[kmol/h],loop.recycle-ratio,message',
  '1,0.1,converged,10,5,',
  '2,0.15,converged,8,4.5,',
  '3,0.2,not-converged,,,"Newton stopped at 40 passes: a Jacobian would exceed the budget, ""try more"""',
  '4,0.25,converged,6,3.5,',
  '5,0.3,converged,5,3,',
  '',
].join('\n');

/** The same sweep as JSON Lines (SI, units in the header object). */
const LINE_JSONL = [
  JSON.stringify({ loopclose: 'sweep', digest: 'a'.repeat(64), flowsheet: 'b'.repeat(64), command: 'loopclose sweep demo.yaml ... --jsonl', points: 5, shape: [5], block: 50, shard: '1/1',
    inputs: [{ path: 'reactor.reactions.0.conversion', unit: '1' }], outputs: [{ path: 'streams.purge.total', unit: 'mol/s' }, { path: 'loop.recycle-ratio', unit: '1' }], adjusted: [], note: 'Results must be reviewed by a qualified engineer.' }),
  '{"point":1,"inputs":{"reactor.reactions.0.conversion":0.1},"status":"converged","outputs":{"streams.purge.total":10,"loop.recycle-ratio":5}}',
  '{"point":2,"inputs":{"reactor.reactions.0.conversion":0.15},"status":"converged","outputs":{"streams.purge.total":8,"loop.recycle-ratio":4.5}}',
  '{"point":3,"inputs":{"reactor.reactions.0.conversion":0.2},"status":"not-converged","outputs":null,"message":"Newton stopped"}',
  '{"point":4,"inputs":{"reactor.reactions.0.conversion":0.25},"status":"converged","outputs":{"streams.purge.total":6,"loop.recycle-ratio":3.5}}',
  '{"point":5,"inputs":{"reactor.reactions.0.conversion":0.3},"status":"converged","outputs":{"streams.purge.total":5,"loop.recycle-ratio":3}}',
  '',
].join('\n');

/** A two-axis sweep, 3 x 3, first axis slowest, point 5 (the centre) infeasible. */
const GRID_CSV = [
  `# loopclose sweep ${'c'.repeat(64)} points=9 shape=3x3 block=50 shard=1/1 flowsheet=${'b'.repeat(64)}`,
  '# command: loopclose sweep demo.yaml --grid a=1:3:3 --grid b=10:30:3 --report y --block 50',
  NOTE,
  'point,a,b[bar],status,y[kmol/h],message',
  '1,1,10,converged,11,', '2,1,20,converged,21,', '3,1,30,converged,31,',
  '6,2,30,converged,32,', '5,2,20,infeasible,,no steady state', '4,2,10,converged,12,',
  '7,3,10,converged,13,', '8,3,20,converged,23,', '9,3,30,converged,33,',
  '',
].join('\n');

/**
 * A reconciliation output over time, in the shape assumed for `loopclose reconcile` (one row per
 * timestamp; columns timestamp, status, closure per element, a suspect meter's adjustment with
 * its unit, message). Values invented for the test.
 */
const RECONCILE_CSV = [
  `# loopclose reconcile ${'d'.repeat(64)} rows=4`,
  NOTE,
  'timestamp,status,closure.N,closure.H,adjustment.feeds.makeup.meter.flow[m3/h],suspect,message',
  '2026-03-01T00:00:00Z,reconciled,0.0012,0.0008,-1.5,makeup,',
  '2026-03-01T01:00:00Z,gross-error,0.0010,0.0007,-1.2,makeup,',
  '2026-03-01T02:00:00Z,not-converged,,,,,"too few readings"',
  '2026-03-01T04:00:00+01:00,reconciled,0.0015,0.0009,-2.0,makeup,',
  '',
].join('\n');

/** The `d` of every line mark's path in a vega SVG. */
function linePaths(svg: string): string[] {
  const group = svg.split('<g class="mark-line role-mark').slice(1);
  return group.map((g) => /<path[^>]* d="([^"]+)"/.exec(g)![1]);
}

/** Vertices of an SVG path (M and L commands) and the number of sub-paths it has. */
function vertices(d: string): { x: number; y: number }[][] {
  const subs: { x: number; y: number }[][] = [];
  for (const m of d.matchAll(/([ML])\s*(-?[\d.]+)[ ,](-?[\d.]+)/g)) {
    if (m[1] === 'M') subs.push([]);
    subs[subs.length - 1].push({ x: Number(m[2]), y: Number(m[3]) });
  }
  return subs;
}

function inputErrorOf(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('no InputError');
}

describe('reading study outputs', () => {
  it('CSV and JSON Lines give the same rows; units come from the header', () => {
    const c = readStudyTable(LINE_CSV, 'line.csv');
    const j = readStudyTable(LINE_JSONL, 'line.jsonl');
    expect(c.kind).toBe('sweep');
    expect(c.columns.map((x) => `${x.role}:${x.path}[${x.unit}]`)).toEqual([
      'point:point[]', 'input:reactor.reactions.0.conversion[]', 'status:status[]', 'output:streams.purge.total[kmol/h]', 'output:loop.recycle-ratio[]', 'message:message[]',
    ]);
    expect(j.columns.find((x) => x.path === 'streams.purge.total')!.unit).toBe('mol/s');
    expect(c.rows.length).toBe(5);
    expect(j.rows.map((r) => r.status)).toEqual(c.rows.map((r) => r.status));
    for (let k = 0; k < 5; k++) {
      for (const p of ['point', 'reactor.reactions.0.conversion', 'streams.purge.total', 'loop.recycle-ratio']) expect(j.rows[k].values.get(p)).toBe(c.rows[k].values.get(p));
    }
    expect(c.rows[2].message).toBe('Newton stopped at 40 passes: a Jacobian would exceed the budget, "try more"');
    expect(c.command).toContain('loopclose sweep demo.yaml');
  });

  it('splits quoted CSV fields (RFC 4180)', () => {
    expect(splitCsvLine('1,"a,b","say ""hi""",')).toEqual(['1', 'a,b', 'say "hi"', '']);
    expect(splitCsvLine('')).toEqual(['']);
  });

  it('reads ISO 8601 times as UTC unless they carry a zone', () => {
    expect(parseTime('2026-03-01T00:00:00Z')).toBe(Date.UTC(2026, 2, 1));
    expect(parseTime('2026-03-01 01:30')).toBe(Date.UTC(2026, 2, 1, 1, 30));
    expect(parseTime('2026-03-01T03:00:00+01:00')).toBe(Date.UTC(2026, 2, 1, 2));
    expect(parseTime('yesterday')).toBeUndefined();
    // Days the month does not have are no dates (Gregorian calendar: 2024 is a leap year, 2023 not).
    expect(parseTime('2024-02-29T00:00Z')).toBe(Date.UTC(2024, 1, 29));
    for (const s of ['2024-02-30T00:00Z', '2023-02-29T00:00Z', '2024-04-31 12:00', '2024-00-10', '2024-01-00']) expect(parseTime(s)).toBeUndefined();
  });

  it('a file that is not a study output is refused at line 1, with what to give instead', () => {
    const e = inputErrorOf(() => readStudyTable('title: a flowsheet\nunits: {}\n', 'loop.yaml'));
    expect(e.diagnostics).toHaveLength(1);
    expect(e.diagnostics[0].message).toContain('`loop.yaml` is not a sweep or reconciliation output');
    expect(e.diagnostics[0].span).toMatchObject({ file: 'loop.yaml', line: 1, col: 1 });
  });

  it('a row cut short is named by its line', () => {
    const e = inputErrorOf(() => readStudyTable(`${LINE_CSV}6,0.35,conv`, 'cut.csv'));
    expect(e.diagnostics[0].message).toBe('`cut.csv` line 10 has 3 fields, the column line has 6');
    expect(e.diagnostics[0].span!.line).toBe(10);
  });
});

describe('plots', () => {
  it('a failed point is a gap in the line, never interpolated over, and is marked at its x', async () => {
    const t = readStudyTable(LINE_CSV, 'line.csv');
    const svg = await plotSvg(t, { x: 'reactor.reactions.0.conversion', y: ['streams.purge.total'] });
    const paths = linePaths(svg);
    expect(paths).toHaveLength(1);
    const subs = vertices(paths[0]);
    // Points 1-2 and 4-5: two pieces of two points each; nothing drawn at x = 0.2.
    expect(subs.map((s) => s.length)).toEqual([2, 2]);
    const xs = subs.flat().map((p) => p.x);
    const gapLeft = subs[0][1].x;
    const gapRight = subs[1][0].x;
    expect(gapRight).toBeGreaterThan(gapLeft);
    // The mark of the failed point: a dashed rule halfway between its neighbours (x 0.2 between 0.15 and 0.25).
    const rule = /<g class="mark-rule role-mark[^"]*"[^>]*><line[^>]* transform="translate\((-?[\d.]+),(-?[\d.]+)\)"[^>]*stroke-dasharray="4,3"/s.exec(svg);
    expect(rule).not.toBeNull();
    expect(Math.abs(Number(rule![1]) - (gapLeft + gapRight) / 2)).toBeLessThan(0.6);
    expect(xs).not.toContain(Number(rule![1]));
    expect(svg).toContain('1 failed point');
    expect(svg).toContain('streams.purge.total [kmol/h]');
    expect(svg).toContain('reactor.reactions.0.conversion');
  });

  it('two axes: one line per value of the second, its failed point left out of its own line only', async () => {
    const t = readStudyTable(GRID_CSV, 'grid.csv');
    const spec = plotSpec(t, { x: 'a', y: ['y'] });
    expect(JSON.stringify(spec)).toContain('"title":"b [bar]"');
    const svg = await plotSvg(t, { x: 'a', y: ['y'] });
    const subs = linePaths(svg).map((d) => vertices(d).map((s) => s.length));
    // Three lines (b = 10, 20, 30); b = 20 has lost its middle point (a = 2): two pieces of one point.
    expect(subs.map((s) => s.reduce((p, q) => p + q, 0)).sort()).toEqual([2, 3, 3]);
    expect(subs.find((s) => s.length === 2)).toEqual([1, 1]);
    expect(svg).toContain('1 failed point');
  });

  it('a heat map leaves the failed cell empty and marks it with a cross', async () => {
    const t = readStudyTable(GRID_CSV, 'grid.csv');
    const svg = await plotSvg(t, { x: 'a', y: ['y'], heatmap: true });
    const rects = svg.split('<g class="mark-rect role-mark').slice(1).map((g) => (g.split('</g>')[0].match(/<path/g) ?? []).length);
    expect(rects).toEqual([9, 8]); // the grid, then the coloured cells (one missing)
    const crosses = svg.split('<g class="mark-symbol role-mark').slice(1).map((g) => (g.split('</g>')[0].match(/<path/g) ?? []).length);
    expect(crosses).toEqual([1]);
  });

  it('a heat map cell of a converged point whose figure is undefined is empty but not marked as failed', async () => {
    // README: a figure whose "in" is zero is undefined (null in JSON, an empty CSV cell) at a
    // converged point; that point did not fail, so it gets no cross and is not counted as failed.
    const t = readStudyTable(GRID_CSV.replace('7,3,10,converged,13,', '7,3,10,converged,,'), 'grid.csv');
    const svg = await plotSvg(t, { x: 'a', y: ['y'], heatmap: true });
    const rects = svg.split('<g class="mark-rect role-mark').slice(1).map((g) => (g.split('</g>')[0].match(/<path/g) ?? []).length);
    expect(rects).toEqual([9, 7]); // the whole grid; two cells without a colour
    const crosses = svg.split('<g class="mark-symbol role-mark').slice(1).map((g) => (g.split('</g>')[0].match(/<path/g) ?? []).length);
    expect(crosses).toEqual([1]); // only the infeasible point
    expect(svg).toContain('1 failed point:');
  });

  it('a time axis for a reconciliation output: closure per element and a meter adjustment against time, failed row a gap', async () => {
    const t = readStudyTable(RECONCILE_CSV, 'reconcile.csv');
    expect(t.kind).toBe('reconcile');
    const spec = plotSpec(t, { x: 'timestamp', y: ['closure.N', 'adjustment.feeds.makeup.meter.flow'] });
    const text = JSON.stringify(spec);
    expect(text).toContain('"type":"temporal"');
    expect(text).toContain('"scale":{"type":"utc"}');
    const svg = await plotSvg(t, { x: 'timestamp', y: ['closure.N', 'adjustment.feeds.makeup.meter.flow'] });
    expect(svg).toContain('timestamp (UTC)');
    expect(svg).toContain('adjustment.feeds.makeup.meter.flow [m3/h]');
    const lines = linePaths(svg).map((d) => vertices(d));
    expect(lines).toHaveLength(2);
    for (const l of lines) {
      // 00:00 and 01:00, a gap at 02:00 (failed), then 04:00+01:00, which is 03:00 UTC.
      expect(l.map((s) => s.length)).toEqual([2, 1]);
      const xs = l.flat().map((p) => p.x);
      expect(xs[1] - xs[0]).toBeGreaterThan(0);
      expect(Math.abs(xs[2] - xs[1] - 2 * (xs[1] - xs[0]))).toBeLessThan(0.6);
    }
  });

  it('a row whose timestamp cannot be read (status invalid, as reconcile writes it) is a failed row, not a reason to refuse the time axis', async () => {
    // README "A historian export": a bad timestamp makes its row `invalid`; the row keeps the text it had.
    const text = RECONCILE_CSV.replace('2026-03-01T02:00:00Z,not-converged,,,,,"too few readings"', '2026-03-01T25:00Z,invalid,,,,,"the timestamp is not ISO 8601"');
    const t = readStudyTable(text, 'reconcile.csv');
    const svg = await plotSvg(t, { x: 'timestamp', y: ['closure.N'] });
    expect(svg).toContain('timestamp (UTC)');
    const [line] = linePaths(svg).map((d) => vertices(d));
    // The three rows that reconciled are drawn; the invalid one has no place on a time axis.
    expect(line.flat()).toHaveLength(3);
    const page = await studyReportHtml(t);
    expect(page).toContain('<h2>Failed points</h2>');
    expect(page).toContain('2026-03-01T25:00Z');
    expect(page).toContain('the timestamp is not ISO 8601');
  });

  it('bad axes: unknown path with a suggestion, text columns, a heat map without a second axis', () => {
    const t = readStudyTable(LINE_CSV, 'line.csv');
    let e = inputErrorOf(() => plotSpec(t, { x: 'reactor.reactions.0.convrsion', y: ['streams.purge.totl'] }));
    expect(e.diagnostics.map((d) => d.message)).toEqual([
      '--x: `reactor.reactions.0.convrsion` is not a column of `line.csv`',
      '--y: `streams.purge.totl` is not a column of `line.csv`',
    ]);
    expect(e.diagnostics[0].help).toContain('did you mean `reactor.reactions.0.conversion`?');
    e = inputErrorOf(() => plotSpec(t, { x: 'status', y: ['message'] }));
    expect(e.diagnostics.map((d) => d.message)).toEqual([
      '--x: `status` is not a numeric column (it holds text such as `converged`)',
      '--y: `message` is not a numeric column (it holds text such as `Newton stopped at 40 passes: a Jacobian ...`)',
    ]);
    e = inputErrorOf(() => plotSpec(t, { x: 'reactor.reactions.0.conversion', y: ['loop.recycle-ratio'], heatmap: true }));
    expect(e.diagnostics[0].message).toContain('--heatmap: needs exactly one second axis');
    // A path given with its unit in brackets names the same column.
    expect(() => plotSpec(t, { x: 'reactor.reactions.0.conversion', y: ['streams.purge.total[kmol/h]'] })).not.toThrow();
    // Another unit is refused, not ignored: the plot would show kmol/h for a request in mol/s.
    e = inputErrorOf(() => plotSpec(t, { x: 'reactor.reactions.0.conversion', y: ['streams.purge.total[mol/s]', 'loop.recycle-ratio[%]'] }));
    expect(e.diagnostics.map((d) => d.message)).toEqual([
      '--y: `streams.purge.total` is written in `kmol/h` in `line.csv`, not in `mol/s`; a plot does not convert',
      '--y: `loop.recycle-ratio` is written in no unit in `line.csv`, not in `%`; a plot does not convert',
    ]);
    expect(e.diagnostics[0].help).toContain('write `streams.purge.total[kmol/h]`');
  });

  it('the HTML page embeds the SVG, has no script and no outside reference, and is the same twice', async () => {
    const t = readStudyTable(LINE_CSV, 'line.csv');
    const html = await plotHtml(t, { x: 'reactor.reactions.0.conversion', y: ['streams.purge.total', 'loop.recycle-ratio'] });
    expect(html).toContain('<svg');
    expect(html).not.toContain('<script');
    expect(html).not.toMatch(/(?:src|href)\s*=\s*["']?\s*(?:https?:)?\/\//i);
    expect(html).toContain('Results must be reviewed by a qualified engineer');
    expect(html).toContain('Failed points');
    expect(await plotHtml(t, { x: 'reactor.reactions.0.conversion', y: ['streams.purge.total', 'loop.recycle-ratio'] })).toBe(html);
  });

  it('the study report plots every numeric output against the first input', async () => {
    const html = await studyReportHtml(readStudyTable(GRID_CSV, 'grid.csv'));
    expect(html.match(/<div class="plot"><svg/g)).toHaveLength(1);
    expect(html).toContain('9 points:');
    expect(html).toContain('1 infeasible');
  });
});
