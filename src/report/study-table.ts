/**
 * Reading a study's output back for plots: a sweep output (CSV or JSON Lines, see README
 * "Output formats") or a reconciliation output over time (one row per timestamp). Header lines
 * start with `#` (CSV) or are one JSON object (JSON Lines); the first one names the study:
 * `# loopclose sweep ...`, `# loopclose reconcile ...`, `{"loopclose":"sweep",...}`.
 * Columns are named by path, with the unit in brackets: `streams.purge.total[kmol/h]`.
 */
import { didYouMean, InputError, type Diagnostic, type SourceSpan } from '../diagnostics.js';

export type StudyKind = 'sweep' | 'reconcile';

export interface StudyColumn {
  /** Path, without the unit (`streams.purge.total`, `adjusted:purge-split.out.recycle`). */
  path: string;
  /** Unit text, '' for none (fractions, ratios, counts, text). */
  unit: string;
  role: 'point' | 'input' | 'status' | 'output' | 'adjusted' | 'message' | 'time' | 'other';
}

export interface StudyRow {
  /** 1-based line in the file. */
  line: number;
  /** Raw value by column path: a number, a string, or null when empty. */
  values: Map<string, number | string | null>;
  status: string;
  message?: string;
}

export interface StudyTable {
  kind: StudyKind;
  format: 'csv' | 'jsonl';
  file: string;
  /** The command that made it, when the header says. */
  command?: string;
  /** The caution note of the header, when it has one. */
  note?: string;
  columns: StudyColumn[];
  rows: StudyRow[];
}

/**
 * Whether a row holds an answer: a sweep's point only when converged; a reconciliation's row when
 * it was reconciled (with or without gross errors found, or with nothing to test). Every other
 * status is a failed point.
 */
export function isAnswer(kind: StudyKind, status: string): boolean {
  return kind === 'reconcile' ? status === 'reconciled' || status === 'gross-error' || status === 'not-redundant' : status === 'converged';
}

function span(file: string, line: number, col = 1, length = 1): SourceSpan {
  return { file, line, col, endLine: line, endCol: col + length };
}

/** Splits one CSV line (RFC 4180 quoting; a field holds no newline). */
export function splitCsvLine(line: string): string[] {
  const out: string[] = [];
  let i = 0;
  const n = line.length;
  for (;;) {
    if (line[i] === '"') {
      let s = '';
      i++;
      for (;;) {
        const q = line.indexOf('"', i);
        if (q < 0) {
          s += line.slice(i);
          i = n;
          break;
        }
        s += line.slice(i, q);
        if (line[q + 1] === '"') {
          s += '"';
          i = q + 2;
        } else {
          i = q + 1;
          break;
        }
      }
      out.push(s);
    } else {
      const c = line.indexOf(',', i);
      out.push(c < 0 ? line.slice(i) : line.slice(i, c));
      i = c < 0 ? n : c;
    }
    if (i >= n) break;
    i++; // the comma
    if (i === n) {
      out.push('');
      break;
    }
  }
  return out;
}

/** `path[unit]` -> { path, unit }. */
export function unlabel(text: string): { path: string; unit: string } {
  const m = /^(.*)\[([^\]]*)\]$/.exec(text.trim());
  return m ? { path: m[1], unit: m[2] } : { path: text.trim(), unit: '' };
}

/** What kind of study output a text is, from its first line; undefined when it is none. */
export function studyKindOf(firstLine: string): StudyKind | undefined {
  const m = /^# loopclose (sweep|reconcile)\b/.exec(firstLine);
  if (m) return m[1] as StudyKind;
  if (firstLine.startsWith('{')) {
    try {
      const o = JSON.parse(firstLine) as { loopclose?: unknown };
      if (o.loopclose === 'sweep' || o.loopclose === 'reconcile') return o.loopclose;
    } catch {
      return undefined;
    }
  }
  return undefined;
}

function numeric(s: string): number | string | null {
  if (s === '') return null;
  const t = s.trim();
  if (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) return Number(t);
  return s;
}

function notStudy(file: string, first: string): InputError {
  return new InputError([{
    severity: 'error',
    message: `\`${file}\` is not a sweep or reconciliation output of loopclose (its first line is ${first ? `\`${first.slice(0, 60)}\`` : 'empty'})`,
    span: span(file, 1, 1, Math.max(1, Math.min(first.length, 60))),
    help: 'give a file written by `loopclose sweep` (CSV or JSON Lines); its first line starts with `# loopclose sweep`',
  }]);
}

/** Reads a study output. Problems are InputErrors with the file's line and column. */
export function readStudyTable(text: string, file: string): StudyTable {
  const lines = text.split(/\r?\n/);
  if (lines.length && lines[lines.length - 1] === '') lines.pop();
  const first = lines[0] ?? '';
  const kind = studyKindOf(first);
  if (!kind) throw notStudy(file, first);
  return first.startsWith('{') ? readJsonl(lines, file, kind) : readCsv(lines, file, kind);
}

function roleOf(kind: StudyKind, path: string, inputs: Set<string>, afterStatus: boolean): StudyColumn['role'] {
  if (path === 'point') return 'point';
  if (path === 'status') return 'status';
  if (path === 'message') return 'message';
  if (path === 'timestamp' || path === 'time') return 'time';
  if (path.startsWith('adjusted:')) return 'adjusted';
  if (kind === 'sweep') return afterStatus ? 'output' : 'input';
  return inputs.has(path) ? 'input' : 'output';
}

function readCsv(lines: string[], file: string, kind: StudyKind): StudyTable {
  let k = 0;
  let command: string | undefined;
  let note: string | undefined;
  while (k < lines.length && lines[k].startsWith('#')) {
    const c = /^# command: (.*)$/.exec(lines[k]);
    if (c) command = c[1];
    const n = /^# note: (.*)$/.exec(lines[k]);
    if (n) note = n[1];
    k++;
  }
  if (k >= lines.length) {
    throw new InputError([{ severity: 'error', message: `\`${file}\` has a header but no column line`, span: span(file, k), help: 'the file was cut short: run the sweep again (with --resume)' }]);
  }
  const names = splitCsvLine(lines[k]);
  const headerLine = k + 1;
  const statusAt = names.indexOf('status');
  if (statusAt < 0) {
    throw new InputError([{ severity: 'error', message: `\`${file}\`: the column line has no \`status\` column`, span: span(file, headerLine, 1, lines[k].length), help: 'give a file written by `loopclose sweep` as it was written' }]);
  }
  const columns: StudyColumn[] = names.map((name, c) => {
    const { path, unit } = unlabel(name);
    return { path, unit, role: roleOf(kind, path, new Set(), c > statusAt) };
  });
  const seen = new Set<string>();
  const diags: Diagnostic[] = [];
  for (const c of columns) {
    if (seen.has(c.path)) diags.push({ severity: 'error', message: `\`${file}\`: column \`${c.path}\` appears twice`, span: span(file, headerLine) });
    seen.add(c.path);
  }
  const rows: StudyRow[] = [];
  for (let i = k + 1; i < lines.length; i++) {
    const line = lines[i];
    if (line === '' || line.startsWith('#')) continue;
    const f = splitCsvLine(line);
    if (f.length !== columns.length) {
      diags.push({ severity: 'error', message: `\`${file}\` line ${i + 1} has ${f.length} fields, the column line has ${columns.length}`, span: span(file, i + 1, 1, line.length), help: 'a sweep that was cut short ends in a partial line: run it again with --resume' });
      if (diags.length > 8) break;
      continue;
    }
    const values = new Map<string, number | string | null>();
    columns.forEach((c, j) => values.set(c.path, c.role === 'message' || c.role === 'status' || c.role === 'time' ? (f[j] === '' ? null : f[j]) : numeric(f[j])));
    rows.push({ line: i + 1, values, status: f[statusAt], ...(values.get('message') ? { message: String(values.get('message')) } : {}) });
  }
  if (diags.length) throw new InputError(diags);
  return { kind, format: 'csv', file, ...(command ? { command } : {}), ...(note ? { note } : {}), columns, rows };
}

type Json = Record<string, unknown>;

function flatten(prefix: string, v: unknown, out: Map<string, number | string | null>): void {
  if (v !== null && typeof v === 'object' && !Array.isArray(v)) {
    for (const [key, w] of Object.entries(v as Json)) flatten(prefix ? `${prefix}.${key}` : key, w, out);
  } else if (typeof v === 'number' || typeof v === 'string') out.set(prefix, v);
  else out.set(prefix, null);
}

/** A finite number at a path of nested objects, else null. */
function at(o: unknown, ...keys: string[]): number | null {
  let v: unknown = o;
  for (const k of keys) v = v !== null && typeof v === 'object' ? (v as Json)[k] : undefined;
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

/**
 * The figure a reconciliation CSV column holds (src/plant/output.ts, rowColumns and rowCsv),
 * read from a JSON Lines row; null when the row does not have it.
 */
export function reconcileFigure(o: Json, path: string): number | string | null {
  const GLOBAL: Record<string, string> = { 'global.statistic': 'statistic', 'global.dof': 'dof', 'global.critical': 'critical', 'global.p-value': 'pValue' };
  if (path === 'redundancy') return at(o, 'redundancy');
  if (GLOBAL[path]) return at(o, 'globalTest', GLOBAL[path]);
  const sigma = path.endsWith('.sigma');
  const base = sigma ? path.slice(0, -'.sigma'.length) : path;
  for (const table of ['parameters', 'unmeasured']) {
    const t = o[table] as Json | undefined;
    if (t && typeof t === 'object' && base in t) return at(t, base, sigma ? 'sigma' : 'value');
  }
  let m = /^closure\.(.+)\.(relative|uncertainty)$/.exec(path);
  if (m) return m[1] === 'mass' ? at(o, 'closure', 'mass', m[2]) : at(o, 'closure', 'elements', m[1], m[2]);
  const instruments = (o.instruments ?? {}) as Json;
  m = /^(.+)\.(measured|reconciled|adjustment|test|bias)$/.exec(path);
  if (!m) return null;
  const [, head, what] = m;
  if (head in instruments) {
    if (what === 'test') return at(instruments, head, 'test');
    if (what === 'bias') {
      const s = Array.isArray(o.suspects) ? (o.suspects as Json[]).find((x) => x.tag === head && !x.component) : undefined;
      return s ? at(s, 'bias') : null;
    }
    const measured = at(instruments, head, 'molarFlow', 'measured');
    const reconciled = at(instruments, head, 'molarFlow', 'reconciled');
    if (what === 'adjustment') return measured !== null && reconciled !== null ? reconciled - measured : null;
    return what === 'measured' ? measured : reconciled;
  }
  // An analyzer's component: TAG.ID.measured, TAG.ID.reconciled.
  const dot = head.lastIndexOf('.');
  if (dot > 0 && head.slice(0, dot) in instruments && (what === 'measured' || what === 'reconciled')) return at(instruments, head.slice(0, dot), 'fractions', head.slice(dot + 1), what);
  return null;
}

function readJsonl(lines: string[], file: string, kind: StudyKind): StudyTable {
  const head = JSON.parse(lines[0]) as Json;
  const cols = (x: unknown) => (Array.isArray(x) ? (x as { path?: unknown; unit?: unknown }[]) : []).map((c) => ({ path: String(c.path), unit: c.unit === undefined || c.unit === '1' ? '' : String(c.unit) }));
  const inputs = cols(head.inputs);
  const outputs = cols(head.outputs);
  const adjusted = cols(head.adjusted);
  const known = new Map<string, StudyColumn>();
  const add = (c: StudyColumn) => {
    if (!known.has(c.path)) known.set(c.path, c);
  };
  add({ path: 'point', unit: '', role: 'point' });
  for (const c of inputs) add({ ...c, role: c.path === 'timestamp' || c.path === 'time' ? 'time' : 'input' });
  add({ path: 'status', unit: '', role: 'status' });
  for (const c of outputs) add({ ...c, role: 'output' });
  for (const c of adjusted) add({ path: `adjusted:${c.path}`, unit: c.unit, role: 'adjusted' });
  const diags: Diagnostic[] = [];
  const rows: StudyRow[] = [];
  for (let i = 1; i < lines.length; i++) {
    const line = lines[i];
    if (line.trim() === '') continue;
    let o: Json;
    try {
      o = JSON.parse(line) as Json;
    } catch {
      diags.push({ severity: 'error', message: `\`${file}\` line ${i + 1} is not a JSON object`, span: span(file, i + 1, 1, line.length), help: 'a sweep that was cut short ends in a partial line: run it again with --resume' });
      continue;
    }
    const values = new Map<string, number | string | null>();
    if (kind === 'sweep') {
      values.set('point', typeof o.point === 'number' ? o.point : null);
      for (const c of inputs) values.set(c.path, (o.inputs as Json | undefined)?.[c.path] as number ?? null);
      for (const c of outputs) values.set(c.path, (o.outputs as Json | null | undefined)?.[c.path] as number ?? null);
      for (const c of adjusted) values.set(`adjusted:${c.path}`, (o.adjusted as Json | null | undefined)?.[c.path] as number ?? null);
    } else if (outputs.length) {
      // A reconciliation row is the nested snapshot contract; the header names its figures by the
      // paths and units of the CSV columns: each is read from the row as the CSV writer reads it.
      values.set('point', typeof o.point === 'number' ? o.point : null);
      for (const c of inputs) values.set(c.path, typeof o[c.path] === 'string' || typeof o[c.path] === 'number' ? (o[c.path] as string | number) : null);
      for (const c of outputs) values.set(c.path, reconcileFigure(o, c.path));
    } else {
      for (const [key, v] of Object.entries(o)) if (key !== 'message') flatten(key, v, values);
      for (const key of values.keys()) add({ path: key, unit: '', role: roleOf(kind, key, new Set(inputs.map((c) => c.path)), true) });
    }
    const status = typeof o.status === 'string' ? o.status : '';
    values.set('status', status);
    const message = typeof o.message === 'string' ? o.message : undefined;
    values.set('message', message ?? null);
    rows.push({ line: i + 1, values, status, ...(message ? { message } : {}) });
  }
  if (diags.length) throw new InputError(diags.slice(0, 9));
  add({ path: 'message', unit: '', role: 'message' });
  return {
    kind, format: 'jsonl', file,
    ...(typeof head.command === 'string' ? { command: head.command } : {}),
    ...(typeof head.note === 'string' ? { note: head.note } : {}),
    columns: [...known.values()], rows,
  };
}

/** The column named by a path given on the command line (`PATH` or `PATH[unit]`). */
export function columnOf(t: StudyTable, given: string, option: string): StudyColumn {
  const { path, unit } = unlabel(given);
  const exact = t.columns.find((col) => col.path === given.trim());
  if (exact) return exact;
  const c = t.columns.find((col) => col.path === path);
  // A plot draws the file's numbers as written: a unit other than the file's is refused, not ignored.
  if (c && unit !== '' && unit !== c.unit) {
    throw new InputError([{
      severity: 'error',
      message: `${option}: \`${path}\` is written in ${c.unit ? `\`${c.unit}\`` : 'no unit'} in \`${t.file}\`, not in \`${unit}\`; a plot does not convert`,
      help: `write \`${c.unit ? `${c.path}[${c.unit}]` : c.path}\`, or run the study again with \`--report '${path}[${unit}]'\``,
    }]);
  }
  if (c) return c;
  const plottable = t.columns.filter((col) => col.role !== 'message' && col.role !== 'status').map((col) => col.path);
  const hint = didYouMean(path, plottable);
  throw new InputError([{
    severity: 'error',
    message: `${option}: \`${path}\` is not a column of \`${t.file}\``,
    help: `${hint ? `${hint} ` : ''}its columns are ${plottable.map((p) => `\`${p}\``).join(', ')}`,
  }]);
}

/** Milliseconds since 1970 (UTC) of an ISO 8601 date-time; a time without a zone is read as UTC. */
export function parseTime(s: string): number | undefined {
  const m = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d+)?)?)?\s*(Z|[+-]\d{2}:?\d{2})?$/.exec(s.trim());
  if (!m) return undefined;
  // A day the month does not have (2024-02-30) is no date (ISO 8601 dates are of the Gregorian
  // calendar), though Date.parse rolls it over into the next month.
  const year = Number(m[1]);
  const month = Number(m[2]);
  if (month < 1 || month > 12 || Number(m[3]) < 1 || Number(m[3]) > new Date(Date.UTC(year, month, 0)).getUTCDate()) return undefined;
  const iso = `${m[1]}-${m[2]}-${m[3]}T${m[4] ?? '00'}:${m[5] ?? '00'}:${m[6] ?? '00'}${m[7] ?? ''}${m[8] ? (m[8] === 'Z' ? 'Z' : m[8].length === 5 ? `${m[8].slice(0, 3)}:${m[8].slice(3)}` : m[8]) : 'Z'}`;
  const t = Date.parse(iso);
  return Number.isFinite(t) ? t : undefined;
}

/** How a column can be an axis: numbers, times, or not at all (with an example of its text). */
export function axisKind(t: StudyTable, c: StudyColumn): { kind: 'quantitative' | 'temporal' } | { kind: 'text'; example: string } {
  let times = 0;
  let numbers = 0;
  let example: string | undefined;
  for (const r of t.rows) {
    const v = r.values.get(c.path);
    if (v === null || v === undefined) continue;
    if (typeof v === 'number') numbers++;
    else if (parseTime(v) !== undefined) times++;
    // A failed row keeps the text it was given (reconcile writes a bad timestamp as it stands,
    // status invalid): it has no place on the axis but does not make the column text.
    else if (c.role === 'time' && !isAnswer(t.kind, r.status)) continue;
    else example ??= v.length > 40 ? `${v.slice(0, 40)}...` : v;
  }
  if (example !== undefined) return { kind: 'text', example };
  if (times > 0 && numbers === 0) return { kind: 'temporal' };
  if (numbers > 0 && times === 0) return { kind: 'quantitative' };
  if (c.role === 'time') return { kind: 'temporal' };
  return { kind: 'text', example: 'no values' };
}
