/**
 * What `loopclose reconcile` prints: the terminal report of one snapshot, its JSON (the contract
 * of the issue, SI), and the row formats of many snapshots (CSV and JSON Lines, one row per
 * timestamp, with a header like a sweep's so that the output can be resumed and plotted).
 */
import type { Model } from '../flowsheet/model.js';
import { CAUTION, csvField, csvLine, num, table, toJson } from '../report/format.js';
import { toUnit } from '../units/index.js';
import type { PlantReconciliation, PlantReport } from './plant.js';
import { pValueText } from './statistics.js';

export const PLANT_CAUTION = `${CAUTION} Reconciled values are estimates under the stated assumptions; custody transfer and environmental reporting follow their own codes.`;

const pctpm = (v: number, u: number) => `${v >= 0 ? '+' : ''}${(v * 100).toFixed(2)} % +- ${(u * 100).toFixed(2)} %`;

export function plantJson(report: PlantReport, model: Model, extra: Record<string, unknown> = {}): string {
  return toJson({ file: model.file, ...extra, ...report, note: PLANT_CAUTION });
}

/** The terminal report of one snapshot. */
export function plantText(report: PlantReport, model: Model, opts: { flowUnit?: string } = {}): string {
  const fu = opts.flowUnit ?? model.display.flowUnit;
  const flow = (v: number | null | undefined) => (v === null || v === undefined ? '-' : num(toUnit(v, 'molarFlow', fu)));
  const out: string[] = [];
  out.push(`status: ${report.status}  (redundancy ${report.redundancy}, ${report.iterations} iterations)`);
  out.push(report.message);
  out.push(`${model.title ? `${model.title} - ` : ''}${model.file}`);
  out.push('');
  out.push('Raw closure from the readings alone: (in - out) / in, +- its expanded uncertainty (95 %, k = 2)');
  const els = Object.entries(report.closure.elements);
  if (els.length) {
    out.push(table(['element', `in (${fu} of atoms)`, 'out', 'closure'], els.map(([el, c]) => [el, flow(c.in), flow(c.out), pctpm(c.relative, c.uncertainty)])));
  }
  if (report.closure.mass) {
    const m = report.closure.mass;
    out.push(`  total mass: in ${num(m.in * 3600)} kg/h, out ${num(m.out * 3600)} kg/h, closure ${pctpm(m.relative, m.uncertainty)}`);
  }
  if (report.closure.note) out.push(`  ${report.closure.note}`);
  out.push('');
  out.push(`Instruments (flows in ${fu}; sigma is the standard uncertainty; test: |adjustment| / its sigma, an analyzer's for each component)`);
  const rows: string[][] = [];
  for (const [tag, r] of Object.entries(report.instruments)) {
    if (r.use === 'context') {
      rows.push([tag, r.kind, r.stream, r.reading !== undefined ? num(r.reading) + (r.kind === 'pressure' ? ' Pa' : ' K') : '-', '', '', '', '', r.reason ?? 'line condition']);
      continue;
    }
    const state = r.use !== 'used' ? (r.reason ? `${r.use}: ${r.reason}` : r.use) : `${r.classification ?? ''}${r.suspect ? ', SUSPECT' : r.failed ? ', test fails' : ''}`;
    const test = r.test === null ? '-' : num(r.test, 3);
    if (r.molarFlow) {
      const m = r.molarFlow;
      rows.push([tag, r.kind, r.stream, flow(m.measured), flow(m.reconciled), flow(m.sigma), flow(m.reconciledSigma), test, state]);
    } else if (r.fractions) {
      const fr = Object.entries(r.fractions);
      fr.forEach(([id, e], k) => {
        rows.push([k === 0 ? tag : '', k === 0 ? r.kind : '', k === 0 ? r.stream : '', `${id} ${e.measured === null ? '-' : num(e.measured, 4)}`, e.reconciled === null ? '-' : num(e.reconciled, 4), e.sigma === null ? '-' : num(e.sigma, 3), e.reconciledSigma === null ? '-' : num(e.reconciledSigma, 3), e.test === undefined ? (k === 0 ? test : '') : e.test === null ? '-' : num(e.test, 3), k === 0 ? state : '']);
      });
    } else rows.push([tag, r.kind, r.stream, '-', '-', '-', '-', test, state]);
  }
  out.push(table(['tag', 'kind', 'stream', 'measured', 'reconciled', 'sigma', 'sigma after', 'test', 'state'], rows, ['left', 'left', 'left', 'right', 'right', 'right', 'right', 'right', 'left']));
  out.push('');
  const g = report.globalTest;
  if (g.passed === null) out.push('Global test: none (no redundancy: nothing checks the readings)');
  else out.push(`Global test: gamma ${num(g.statistic!, 4)}, degrees of freedom ${g.dof}, critical ${num(g.critical!, 4)} at 95 %, ${pValueText(g.pValue!, 2)}: ${g.passed ? 'passes' : 'FAILS'}`);
  if (report.measurementTest) out.push(`Measurement tests: ${report.measurementTest.count}, each at the Sidak level ${report.measurementTest.level.toPrecision(3)} (critical ${num(report.measurementTest.critical, 4)})`);
  if (report.suspects.length) {
    out.push('Suspects (serial elimination, in the order taken out):');
    for (const s of report.suspects) {
      // A reading of 0 has no bias as a fraction of it (JSON null, an empty CSV field).
      out.push(`  ${s.tag}${s.component ? ` ${s.component}` : ''}: ${Number.isFinite(s.bias) ? `bias ${pctpm(s.bias, 2 * s.biasSigma)} of its reading (95 %)` : 'its reading is 0: no bias as a fraction of it'}, test ${num(s.statistic, 3)}${s.indistinguishableFrom.length ? `; the data cannot tell it from ${s.indistinguishableFrom.join(', ')}` : ''}`);
    }
    const a = report.afterRemoving!;
    out.push(`  without ${a.tags.join(', ')}: global test ${a.globalTest.passed === null ? 'not possible (no redundancy left)' : `${a.globalTest.passed ? 'passes' : 'still fails'} (gamma ${num(a.globalTest.statistic!, 4)}, critical ${num(a.globalTest.critical!, 4)})`}`);
  }
  const params = Object.entries(report.parameters);
  if (params.length) {
    out.push('');
    out.push(`Figures the data decide${report.suspects.length ? ' (without the suspects)' : ''}: value +- standard uncertainty; the file's value beside a parameter`);
    out.push(table(['path', 'value', 'sigma', 'file'], params.map(([p, v]) => [p, v.value === null ? 'not observable' : num(v.value), v.sigma === null ? '-' : num(v.sigma, 3), v.file !== undefined ? num(v.file) : v.parameter ? '' : '(a figure)'])));
  }
  const un = Object.entries(report.unmeasured);
  if (un.length) {
    out.push('');
    out.push(`Streams no meter reads (${fu})`);
    out.push(table(['stream', 'value', 'sigma'], un.map(([p, v]) => [p, v.value === null ? 'not observable' : flow(v.value), v.sigma === null ? '-' : flow(v.sigma)])));
  }
  const budgets = Object.entries(report.instruments).filter(([, r]) => r.budget && r.use === 'used');
  if (budgets.length) {
    out.push('');
    out.push(`Uncertainty budgets (standard uncertainties, ${fu}; mass in kg/h)`);
    for (const [tag, r] of budgets) {
      const mass = r.kind === 'mass';
      const f = (v: number) => (mass ? num(v * 3600, 3) : num(toUnit(v, 'molarFlow', fu), 3));
      out.push(`  ${tag}: ${r.budget!.terms.map((t) => `${t.source} ${f(t.sigma)}${t.note ? ` (${t.note})` : ''}`).join('; ')}`);
    }
  }
  if (report.notes.length) {
    out.push('');
    for (const n of report.notes) out.push(`note: ${n}`);
  }
  out.push(`note: ${PLANT_CAUTION}`);
  return out.join('\n');
}

/** The columns of a row output (CSV), fixed by the model. */
export interface RowColumns {
  names: string[];
  elements: string[];
  flowTags: string[];
  analyzers: { tag: string; ids: string[] }[];
  parameters: string[];
  streams: string[];
  /** Each stream's key in PlantReport.unmeasured (`streams.NAME.total`). */
  streamKeys: string[];
}

export function rowColumns(plant: PlantReconciliation): RowColumns {
  const model = plant.model;
  const elements = [...new Set(model.elements.flatMap((e) => Object.keys(e)))];
  const flowTags = model.instruments.filter((d) => d.kind !== 'analyzer' && d.kind !== 'pressure' && d.kind !== 'temperature').map((d) => d.tag);
  const analyzers = model.instruments.filter((d) => d.kind === 'analyzer').map((d) => ({ tag: d.tag, ids: d.components!.map((k) => model.ids[k]) }));
  const start = Float64Array.from(plant.network.start);
  const parameters = plant.network.figures.filter((f) => Number.isFinite(f.value(start))).map((f) => f.path);
  const metered = new Set(model.instruments.filter((d) => flowTags.includes(d.tag)).map((d) => d.stream));
  const streams = [...plant.network.streams.keys()].filter((s) => !metered.has(s));
  const names = ['point', 'timestamp', 'status', 'redundancy', 'global.statistic', 'global.dof', 'global.critical', 'global.p-value'];
  for (const el of elements) names.push(`closure.${el}.relative`, `closure.${el}.uncertainty`);
  names.push('closure.mass.relative', 'closure.mass.uncertainty');
  // Per flow instrument: the adjustment (reconciled - measured) and, for a suspect, its estimated
  // bias as a fraction of its reading (what a plot of a meter against time wants).
  for (const t of flowTags) names.push(`${t}.measured[mol/s]`, `${t}.reconciled[mol/s]`, `${t}.adjustment[mol/s]`, `${t}.test`, `${t}.bias`);
  for (const a of analyzers) {
    for (const id of a.ids) names.push(`${a.tag}.${id}.measured`, `${a.tag}.${id}.reconciled`);
    names.push(`${a.tag}.test`);
  }
  for (const p of parameters) names.push(p, `${p}.sigma`);
  for (const s of streams) names.push(`streams.${s}.total[mol/s]`, `streams.${s}.total.sigma[mol/s]`);
  names.push('suspects', 'left-out', 'message');
  return { names, elements, flowTags, analyzers, parameters, streams, streamKeys: streams.map((s) => `streams.${s}.total`) };
}

/** What a row says besides its figures: readings left out or missing. */
export function rowSaid(report: PlantReport | undefined, said: readonly string[]): string {
  const parts = [...said];
  if (report) {
    for (const [tag, r] of Object.entries(report.instruments)) {
      // What the export already said of this tag (a cell that is not a number, a frozen meter) is
      // not said twice; what is said of one of an analyzer's components (`AI-205.H2: ...`) does not
      // say why the whole analyzer was left out.
      if (r.use === 'left-out' && !said.some((s) => s.startsWith(`${tag}:`))) parts.push(`${tag}: left out: ${r.reason}`);
    }
    // An analyzer's component the run left out (a 0 read with a relative uncertainty) is a note.
    for (const note of report.notes) {
      const m = /^"([^"]+)": (left out: .*)$/.exec(note);
      if (m) parts.push(`${m[1]}: ${m[2]}`);
    }
  }
  return parts.join('; ');
}

export function rowCsv(cols: RowColumns, point: number, timestamp: string, report: PlantReport | undefined, status: string, said: readonly string[], message?: string): string {
  if (!report) {
    const words: (string | number)[] = [point, timestamp, status];
    while (words.length < cols.names.length - 3) words.push('');
    words.push('', rowSaid(undefined, said), message ?? '');
    return csvLine(words);
  }
  // The figures between the words: every one a number, or absent (null, undefined or not finite:
  // an empty field). Their text comes from one JSON.stringify of the row's figures, which writes
  // each finite number as String(x) does (ECMA-262, SerializeJSONProperty: ToString) and every
  // other value as null; the nulls become empty fields. One call per row instead of one per
  // figure: the shortest round-trip text of about 90 numbers a row is most of a row's output cost.
  const g = report.globalTest;
  const f = rowFigures;
  f.length = 0;
  f.push(report.redundancy, g.statistic, g.dof, g.critical, g.pValue);
  for (const el of cols.elements) {
    const c = report.closure.elements[el];
    f.push(c?.relative, c?.uncertainty);
  }
  f.push(report.closure.mass?.relative, report.closure.mass?.uncertainty);
  for (const t of cols.flowTags) {
    const r = report.instruments[t];
    const m = r?.molarFlow?.measured;
    const rc = r?.molarFlow?.reconciled;
    let bias: number | undefined;
    for (const x of report.suspects) if (x.tag === t && !x.component) { bias = x.bias; break; }
    f.push(m, rc, m !== null && m !== undefined && rc !== null && rc !== undefined ? rc - m : null, r?.test, bias);
  }
  for (const a of cols.analyzers) {
    const r = report.instruments[a.tag];
    const fr = r?.fractions;
    for (const id of a.ids) f.push(fr?.[id]?.measured, fr?.[id]?.reconciled);
    f.push(r?.test);
  }
  for (const p of cols.parameters) {
    const e = report.parameters[p];
    f.push(e?.value, e?.sigma);
  }
  for (const key of cols.streamKeys) {
    const u = report.unmeasured[key];
    f.push(u?.value, u?.sigma);
  }
  let figures = JSON.stringify(f);
  figures = figures.slice(1, -1);
  if (figures.includes('null')) figures = figures.replace(/null/g, '');
  const suspects = report.suspects.map((x) => `${x.tag}${x.component ? `.${x.component}` : ''}:${Number.isFinite(x.bias) ? x.bias : ''}`).join(' ');
  return `${n(point)},${csvField(timestamp)},${csvField(status)},${figures},${csvField(suspects)},${csvField(rowSaid(report, said))},${csvField(message ?? (report.status === 'reconciled' ? '' : report.message))}`;
}

/** The figures of a row (rowCsv's work space: filled and read within one call). */
const rowFigures: (number | null | undefined)[] = [];

/** A number's CSV text (String(x): the shortest that reads back as x), or empty when absent or not finite. */
function n(x: number | null | undefined): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '' : String(x);
}

/** One JSON Lines row: the snapshot contract without the budgets. */
export function rowJson(point: number, timestamp: string, report: PlantReport | undefined, status: string, said: readonly string[], message?: string): string {
  if (!report) return JSON.stringify({ point, timestamp, status, said: rowSaid(undefined, said), ...(message ? { message } : {}) });
  const instruments: Record<string, unknown> = {};
  for (const [tag, r] of Object.entries(report.instruments)) {
    const { budget: _b, ...rest } = r;
    instruments[tag] = rest;
  }
  const o = {
    point, timestamp, status, message: report.message, redundancy: report.redundancy, closure: report.closure, globalTest: report.globalTest,
    suspects: report.suspects, ...(report.afterRemoving ? { afterRemoving: { tags: report.afterRemoving.tags, globalTest: report.afterRemoving.globalTest } } : {}),
    instruments, parameters: report.parameters, unmeasured: report.unmeasured, said: rowSaid(report, said),
  };
  return JSON.stringify(o, (_k, x) => (typeof x === 'number' && !Number.isFinite(x) ? null : x));
}
