/**
 * Plots of a study: lines of outputs against one axis (one line per value of a second axis),
 * or a heat map over two. Failed points (any status but converged) are gaps in the lines,
 * never interpolated over, and are marked by a dashed rule and a cross at their x (an empty
 * cell with a cross in a heat map). Written as Vega-Lite, compiled to Vega and rendered to SVG
 * by vega's headless view; no browser is needed. vega and vega-lite are loaded on first use.
 */
import { InputError } from '../diagnostics.js';
import { CAUTION } from './format.js';
import { esc } from './html/markup.js';
import { axisKind, columnOf, isAnswer, parseTime, type StudyColumn, type StudyRow, type StudyTable } from './study-table.js';

export interface PlotOptions {
  /** Path of the x axis. */
  x: string;
  /** Paths plotted against it (one chart each). */
  y: string[];
  /** Path of the second axis: one line per value (default: the other inputs of a sweep). */
  series?: string;
  /** A heat map over x and the series axis instead of lines. */
  heatmap?: boolean;
}

export const FAILED_COLOUR = '#9b1c1c';
const FONT = "'DejaVu Sans', 'Liberation Sans', Arial, sans-serif";
const WIDTH = 560;
const HEIGHT = 250;

type VlSpec = Record<string, unknown>;

/** `path [unit]`, or the path alone. */
export function axisTitle(c: StudyColumn, temporal = false): string {
  if (temporal) return `${c.path} (UTC)`;
  return c.unit ? `${c.path} [${c.unit}]` : c.path;
}

function bad(message: string, help?: string): InputError {
  return new InputError([{ severity: 'error', message, ...(help ? { help } : {}) }]);
}

interface Resolved {
  x: StudyColumn;
  xKind: 'quantitative' | 'temporal';
  ys: StudyColumn[];
  series: StudyColumn[];
}

/** Checks the axes against the table: every path exists, x and every y are numeric (or x is a time). */
export function resolveAxes(t: StudyTable, o: PlotOptions): Resolved {
  const problems: InputError[] = [];
  const tryCol = (p: string, opt: string): StudyColumn | undefined => {
    try {
      return columnOf(t, p, opt);
    } catch (e) {
      if (e instanceof InputError) problems.push(e);
      else throw e;
      return undefined;
    }
  };
  const x = tryCol(o.x, '--x');
  const ys = o.y.map((p) => tryCol(p, '--y'));
  const seriesGiven = o.series !== undefined ? tryCol(o.series, '--series') : undefined;
  if (o.y.length === 0) problems.push(bad('--y: give at least one path to plot', 'e.g. --y streams.purge.total'));
  if (problems.length) throw new InputError(problems.flatMap((e) => e.diagnostics));
  let xKind: 'quantitative' | 'temporal' = 'quantitative';
  const k = axisKind(t, x!);
  if (k.kind === 'text') problems.push(bad(`--x: \`${x!.path}\` is not a numeric column (it holds text such as \`${k.example}\`)`, 'give an input or an output of the study, or a timestamp'));
  else xKind = k.kind;
  for (const y of ys) {
    const ky = axisKind(t, y!);
    if (ky.kind !== 'quantitative') problems.push(bad(`--y: \`${y!.path}\` is not a numeric column (it holds ${ky.kind === 'text' ? `text such as \`${ky.example}\`` : 'times'})`, 'give an output of the study'));
  }
  let series: StudyColumn[];
  if (seriesGiven) {
    if (seriesGiven.path === x!.path) problems.push(bad('--series: give another path than --x'));
    series = [seriesGiven];
  } else {
    series = t.columns.filter((c) => c.role === 'input' && c.path !== x!.path);
  }
  if (o.heatmap) {
    if (series.length !== 1) problems.push(bad(`--heatmap: needs exactly one second axis (${series.length ? `the study has ${series.map((c) => `\`${c.path}\``).join(', ')}` : 'the study has no other input'})`, 'name it with --series PATH'));
    else if (axisKind(t, series[0]).kind !== 'quantitative') problems.push(bad(`--series: \`${series[0].path}\` is not a numeric column`));
  }
  if (problems.length) throw new InputError(problems.flatMap((e) => e.diagnostics));
  return { x: x!, xKind, ys: ys as StudyColumn[], series };
}

function xValue(r: StudyRow, c: StudyColumn, kind: 'quantitative' | 'temporal'): number | undefined {
  const v = r.values.get(c.path);
  if (kind === 'temporal') return typeof v === 'string' ? parseTime(v) : undefined;
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
}

/** A value as short text: whole numbers as they are, others to 6 significant digits without trailing zeros. */
export function label(v: number | string | null | undefined): string {
  if (typeof v === 'number') return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(6)));
  return v === null || v === undefined ? '-' : String(v);
}

function seriesKey(r: StudyRow, series: StudyColumn[]): string {
  if (series.length === 1) return label(r.values.get(series[0].path));
  return series.map((c) => `${c.path}=${label(r.values.get(c.path))}`).join(', ');
}

/** Series keys in the order of their values (numbers ascending), so that colours follow the values. */
function seriesOrder(rows: StudyRow[], series: StudyColumn[]): string[] {
  const keyed = new Map<string, (number | string | null | undefined)[]>();
  for (const r of rows) {
    const k = seriesKey(r, series);
    if (!keyed.has(k)) keyed.set(k, series.map((c) => r.values.get(c.path)));
  }
  return [...keyed.entries()].sort((a, b) => {
    for (let i = 0; i < a[1].length; i++) {
      const p = a[1][i];
      const q = b[1][i];
      if (typeof p === 'number' && typeof q === 'number' && p !== q) return p - q;
      const s = String(p).localeCompare(String(q));
      if (s) return s;
    }
    return 0;
  }).map((e) => e[0]);
}

const failedNote = 'dashed rules and crosses: failed points (status not converged), left as gaps';
const failedNoteSeries = 'crosses in the strip below, in the colour of their line: failed points (status not converged), left as gaps';

function baseConfig(): VlSpec {
  return {
    font: FONT,
    background: '#ffffff',
    axis: { labelFontSize: 11, titleFontSize: 12, grid: true, gridColor: '#e6e6e6' },
    legend: { labelFontSize: 11, titleFontSize: 11, titleLimit: 420, labelLimit: 300 },
    title: { fontSize: 13, subtitleFontSize: 11, anchor: 'start' },
    mark: { invalid: 'break-paths-filter-domains' },
  };
}

/** One chart: y against x, one line per series value, failed points as gaps with a mark. */
function lineChart(t: StudyTable, r: Resolved, y: StudyColumn): VlSpec {
  const values: Record<string, unknown>[] = [];
  const failed: Record<string, unknown>[] = [];
  const series = r.series.length > 0;
  for (const row of t.rows) {
    const x = xValue(row, r.x, r.xKind);
    if (x === undefined) continue;
    const ok = isAnswer(t.kind, row.status);
    const v = row.values.get(y.path);
    const yv = ok && typeof v === 'number' && Number.isFinite(v) ? v : null;
    const s = series ? seriesKey(row, r.series) : '';
    values.push({ x, y: yv, s });
    if (!ok) failed.push({ x, s, status: row.status });
  }
  const order = series ? seriesOrder(t.rows, r.series) : [];
  const perSeries = values.length / Math.max(1, order.length);
  const xEnc = { field: 'x', type: r.xKind, title: axisTitle(r.x, r.xKind === 'temporal'), ...(r.xKind === 'temporal' ? { scale: { type: 'utc' } } : { scale: { zero: false, nice: false, padding: 8 } }) };
  const layers: VlSpec[] = [{
    data: { values },
    mark: { type: 'line', strokeWidth: 1.8, ...(perSeries <= 60 ? { point: { size: 22 } } : {}) },
    encoding: {
      x: xEnc,
      y: { field: 'y', type: 'quantitative', title: axisTitle(y), scale: { zero: false } },
      ...(series ? {
        color: {
          field: 's', type: 'ordinal', sort: order, title: r.series.length === 1 ? axisTitle(r.series[0]) : 'series',
          scale: { scheme: order.length <= 10 ? 'tableau10' : 'viridis' },
        },
      } : { color: { value: '#1f4e79' } }),
    },
  }];
  if (failed.length && !series) {
    // One line: a dashed rule at the x of each failed point, and a cross at the foot of it.
    layers.push({ data: { values: failed }, mark: { type: 'rule', color: FAILED_COLOUR, strokeDash: [4, 3], strokeWidth: 1.2 }, encoding: { x: xEnc } });
    layers.push({
      data: { values: failed },
      mark: { type: 'point', shape: 'cross', color: FAILED_COLOUR, filled: true, size: 60, opacity: 1 },
      encoding: { x: xEnc, y: { value: HEIGHT - 6 } },
    });
  }
  const title = { text: axisTitle(y), ...(failed.length ? { subtitle: `${failed.length} failed point${failed.length === 1 ? '' : 's'}: ${series ? failedNoteSeries : failedNote}` } : {}) };
  if (failed.length && series) {
    // Several lines: a strip under the chart, one row per line, with a cross in the line's
    // colour at the x of each of its failed points.
    const seriesTitle = r.series.length === 1 ? axisTitle(r.series[0]) : 'series';
    return {
      title,
      vconcat: [
        { width: WIDTH, height: HEIGHT, layer: layers },
        {
          width: WIDTH, height: Math.max(24, 12 * order.length),
          data: { values: failed },
          mark: { type: 'point', shape: 'cross', filled: true, size: 50, opacity: 1 },
          encoding: {
            x: { ...xEnc, title: null },
            y: { field: 's', type: 'ordinal', sort: order, title: 'failed', axis: { titleAngle: 0, titleAlign: 'right', labels: order.length <= 12 } },
            color: { field: 's', type: 'ordinal', sort: order, title: seriesTitle },
          },
        },
      ],
      spacing: 4,
      resolve: { scale: { x: 'shared', color: 'shared' } },
    };
  }
  return { title, width: WIDTH, height: HEIGHT, layer: layers };
}

function heatChart(t: StudyTable, r: Resolved, v: StudyColumn): VlSpec {
  const s = r.series[0];
  const ok: Record<string, unknown>[] = [];
  const failed: Record<string, unknown>[] = [];
  // Converged points whose figure is undefined (an empty cell in the file): no colour, no cross.
  const empty: Record<string, unknown>[] = [];
  const xs = new Map<string, number>();
  const ss = new Map<string, number>();
  for (const row of t.rows) {
    const x = xValue(row, r.x, r.xKind);
    const sv = row.values.get(s.path);
    if (x === undefined || typeof sv !== 'number') continue;
    const xl = r.xKind === 'temporal' ? new Date(x).toISOString().replace('.000Z', 'Z') : label(x);
    const sl = label(sv);
    xs.set(xl, x);
    ss.set(sl, sv);
    const value = row.values.get(v.path);
    if (!isAnswer(t.kind, row.status)) failed.push({ x: xl, s: sl, status: row.status });
    else if (typeof value === 'number' && Number.isFinite(value)) ok.push({ x: xl, s: sl, v: value });
    else empty.push({ x: xl, s: sl });
  }
  const xOrder = [...xs.entries()].sort((a, b) => a[1] - b[1]).map((e) => e[0]);
  const sOrder = [...ss.entries()].sort((a, b) => b[1] - a[1]).map((e) => e[0]);
  const band = { type: 'band', paddingInner: 0, paddingOuter: 0 };
  const xEnc = { field: 'x', type: 'ordinal', sort: xOrder, title: axisTitle(r.x, r.xKind === 'temporal'), scale: band };
  const sEnc = { field: 's', type: 'ordinal', sort: sOrder, title: axisTitle(s), scale: band };
  const layers: VlSpec[] = [
    // The whole grid, so that empty (failed) cells keep their place on both axes.
    { data: { values: [...ok, ...failed, ...empty] }, mark: { type: 'rect', fill: '#ffffff', stroke: '#d0d0d0', strokeWidth: 0.5 }, encoding: { x: xEnc, y: sEnc } },
    { data: { values: ok }, mark: { type: 'rect' }, encoding: { x: xEnc, y: sEnc, color: { field: 'v', type: 'quantitative', title: axisTitle(v), scale: { scheme: 'viridis' } } } },
  ];
  if (failed.length) layers.push({ data: { values: failed }, mark: { type: 'point', shape: 'cross', color: FAILED_COLOUR, filled: true, size: 70, opacity: 1 }, encoding: { x: xEnc, y: sEnc } });
  return {
    title: { text: axisTitle(v), ...(failed.length ? { subtitle: `${failed.length} failed point${failed.length === 1 ? '' : 's'}: empty cells with a cross (status not converged)` } : {}) },
    width: Math.min(WIDTH, Math.max(160, 22 * xOrder.length)),
    height: Math.min(360, Math.max(120, 20 * sOrder.length)),
    layer: layers,
  };
}

/** The Vega-Lite specification of a plot (one chart per y path, stacked). */
export function plotSpec(t: StudyTable, o: PlotOptions): VlSpec {
  const r = resolveAxes(t, o);
  const charts = r.ys.map((y) => (o.heatmap ? heatChart(t, r, y) : lineChart(t, r, y)));
  return {
    $schema: 'vega-lite-v6',
    ...(charts.length === 1 ? charts[0] : { vconcat: charts, spacing: 28 }),
    config: baseConfig(),
    padding: 8,
  };
}

/** Renders a Vega-Lite specification to SVG with vega's headless view (no browser). */
export async function renderSvg(spec: VlSpec): Promise<string> {
  const [vl, vega] = await Promise.all([import('vega-lite'), import('vega')]);
  const { $schema: _schema, ...rest } = spec;
  const compiled = vl.compile(rest as never).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none' });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

export async function plotSvg(t: StudyTable, o: PlotOptions): Promise<string> {
  return renderSvg(plotSpec(t, o));
}

const HTML_STYLE = `
body{margin:0;padding:18px 22px;font-family:${FONT};font-size:14px;line-height:1.4;color:#1d1d1d;background:#fff}
h1{font-size:19px;margin:0 0 4px}
h2{font-size:16px;margin:20px 0 6px;border-bottom:1px solid #c9c9c9}
.meta{color:#555;word-break:break-all}
.caution{border:1px solid #7a5200;padding:6px 10px;background:#fffaf0}
.summary{padding:6px 12px;border-left:6px solid #1c6b2a;background:#f3f5f7}
.summary.some-failed{border-color:#9b1c1c}
.plot svg{max-width:100%;height:auto}
table{border-collapse:collapse;font-size:13px}
th,td{padding:2px 8px;border-bottom:1px solid #e3e3e3;text-align:left;vertical-align:top}
td.n{text-align:right;font-variant-numeric:tabular-nums}
@media print{@page{size:auto;margin:12mm}body{padding:0;font-size:10pt}.plot{page-break-inside:avoid}}
`;

function summary(t: StudyTable): string {
  const counts = new Map<string, number>();
  for (const r of t.rows) counts.set(r.status, (counts.get(r.status) ?? 0) + 1);
  const failed = t.rows.filter((r) => !isAnswer(t.kind, r.status)).length;
  const parts = [...counts.entries()].map(([s, n]) => `${n} ${s || '(no status)'}`).join(', ');
  return `<p class="summary${failed ? ' some-failed' : ''}"><strong>${t.rows.length} ${t.kind === 'sweep' ? 'points' : 'rows'}:</strong> ${esc(parts || 'none')}</p>`;
}

function failedTable(t: StudyTable, limit = 40): string {
  const failed = t.rows.filter((r) => !isAnswer(t.kind, r.status));
  if (!failed.length) return '';
  const keys = t.columns.filter((c) => c.role === 'point' || c.role === 'input' || c.role === 'time');
  const rows = failed.slice(0, limit).map((r) => `<tr>${keys.map((c) => `<td class="n">${esc(label(r.values.get(c.path)))}</td>`).join('')}<td>${esc(r.status)}</td><td>${esc(r.message ?? '')}</td></tr>`);
  return `<h2>Failed points</h2><p>Not solutions: left out of the lines (gaps) and marked.</p><table><thead><tr>${keys.map((c) => `<th>${esc(axisTitle(c))}</th>`).join('')}<th>status</th><th>message</th></tr></thead><tbody>${rows.join('')}</tbody></table>` +
    (failed.length > limit ? `<p>and ${failed.length - limit} more (see the file)</p>` : '');
}

function page(t: StudyTable, heading: string, plots: string[]): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${esc(heading)}</title>`,
    `<style>${HTML_STYLE}</style>`,
    '</head>',
    '<body>',
    `<h1>${esc(heading)}</h1>`,
    `<p class="meta">${esc(t.file)}${t.command ? `<br>${esc(t.command)}` : ''}</p>`,
    summary(t),
    `<p class="caution"><strong>Caution.</strong> ${esc(t.note ?? CAUTION)}</p>`,
    ...plots.map((svg) => `<div class="plot">${svg}</div>`),
    failedTable(t),
    '</body>',
    '</html>',
    '',
  ].join('\n');
}

/** A plot as a self-contained HTML page (the SVG inline; no script). */
export async function plotHtml(t: StudyTable, o: PlotOptions): Promise<string> {
  const svg = await plotSvg(t, o);
  return page(t, `Plot of ${t.file}`, [svg]);
}

/** The default axes of a study: x is the first input (or the time), outputs and adjusted inputs are plotted. */
export function defaultAxes(t: StudyTable): PlotOptions {
  const time = t.columns.find((c) => c.role === 'time');
  const input = t.columns.find((c) => c.role === 'input');
  const x = time ?? input ?? t.columns.find((c) => c.role === 'point');
  if (!x) throw bad(`\`${t.file}\` has no column to plot against`, 'give a file written by `loopclose sweep`');
  const y = t.columns.filter((c) => (c.role === 'output' || c.role === 'adjusted') && axisKind(t, c).kind === 'quantitative').map((c) => c.path);
  return { x: x.path, y };
}

/** The report of a study output: one chart per output against the first input, and the failed points. */
export async function studyReportHtml(t: StudyTable): Promise<string> {
  const o = defaultAxes(t);
  const plots: string[] = [];
  for (const y of o.y) plots.push(await plotSvg(t, { ...o, y: [y] }));
  if (!plots.length) plots.push('<p>no numeric outputs to plot</p>');
  return page(t, `${t.kind === 'sweep' ? 'Sweep' : 'Reconciliation'}: ${t.file}`, plots);
}
