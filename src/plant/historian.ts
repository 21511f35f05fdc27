/**
 * A historian export as rows of readings (`--readings FILE.csv`).
 *
 * Layout: the first line names the columns: the first is the timestamp (ISO 8601; read as UTC
 * unless it carries a zone), every other one an instrument's tag (`FI-101`), or an analyzer's
 * tag and component (`AI-205.H2`). A second line may give the unit of each column (its first
 * cell empty, or anything that is not a timestamp, and no reading in its cells); without it, a column takes the `unit:` of
 * its instrument (an analyzer's columns are mole fractions). Columns of other tags are ignored
 * (and listed as such).
 * Problems with the file itself (a column an instrument needs is missing, a unit that does not
 * fit its instrument, a column given twice) are located messages (FILE:LINE:COL), all at once.
 * Problems of one row are that row's own: a bad timestamp, or a count of fields other than the
 * column line's (RFC 4180, sec. 2, rule 4), makes the row invalid; an empty cell
 * is no reading; a cell that is not a number, a negative or out-of-range reading (plant.ts) or a
 * frozen meter (the same value for `frozen` rows running) leaves that tag out of the row, said
 * in the row, and the row goes on.
 */
import { didYouMean, InputError, type Diagnostic } from '../diagnostics.js';
import type { Model } from '../flowsheet/model.js';
import { parseTime, splitCsvLine } from '../report/study-table.js';
import { parseQuantity, UnitError, type StandardRef } from '../units/index.js';
import { readingDimension, type InstrumentDecl } from './declarations.js';
import type { RowInput, RowReading } from './plant.js';

export interface HistorianColumn {
  /** Position in the line (0 is the timestamp). */
  index: number;
  tag: string;
  /** Analyzer columns: the component index. */
  component?: number;
  unit: string;
  /** SI = scale * value + offset. */
  scale: number;
  offset: number;
  reference?: StandardRef;
}

export interface HistorianRow {
  /** 1-based line in the file. */
  line: number;
  timestamp: string;
  /** ms since 1970 UTC; undefined when the timestamp is bad. */
  time?: number;
  cells: string[];
  /** The line as written (for the column of a cell in a message). */
  text: string;
  /** A row whose instant was already seen (the line of its first), or that goes back in time (the line before). */
  sameAs?: number;
  before?: number;
}

export interface Historian {
  file: string;
  columns: HistorianColumn[];
  rows: HistorianRow[];
  /** Columns of tags that are not instruments of the flowsheet. */
  ignored: string[];
  /** Consecutive equal readings from which a tag counts as frozen. */
  frozen: number;
  /** Fields of the column line: every row must have as many (RFC 4180, sec. 2, rule 4). */
  width: number;
}

/** Default number of consecutive equal readings that mark a frozen instrument (common practice, no source). */
export const DEFAULT_FROZEN = 6;

function at(file: string, line: number, col = 1, length = 1) {
  return { file, line, col, endLine: line, endCol: col + length };
}

/** Column start (1-based) of field k in a CSV line. */
function columnOf(line: string, k: number): number {
  let col = 1;
  let field = 0;
  let quoted = false;
  for (let i = 0; i < line.length && field < k; i++) {
    const ch = line[i];
    if (ch === '"') quoted = !quoted;
    else if (ch === ',' && !quoted) {
      field++;
      col = i + 2;
    }
  }
  return col;
}

export function parseHistorian(text: string, file: string, model: Model, frozen = DEFAULT_FROZEN): Historian {
  // A byte order mark (as some tools start a UTF-8 file) is not part of the first line.
  const all = (text.charCodeAt(0) === 0xfeff ? text.slice(1) : text).split(/\r?\n/);
  while (all.length && all[all.length - 1].trim() === '') all.pop();
  // Comment lines (`#`) before the column line are skipped; line numbers stay those of the file.
  let skipped = 0;
  while (skipped < all.length && all[skipped].startsWith('#')) skipped++;
  const lines = all.slice(skipped);
  const L = (k: number) => k + 1 + skipped;
  const diags: Diagnostic[] = [];
  if (lines.length === 0) throw new InputError([{ severity: 'error', message: `\`${file}\` is empty`, span: at(file, 1), help: 'the first line names the columns: timestamp, then one column per tag' }]);
  const head = splitCsvLine(lines[0]).map((s) => s.trim());
  // A file separated by semicolons or tabs (as written where the comma is the decimal sign) has one
  // column here: one message for it, not one per missing tag.
  const other = /[;\t]/.exec(lines[0]);
  if (head.length === 1 && other) {
    throw new InputError([{ severity: 'error', message: `\`${file}\` is not comma-separated: its column line holds ${other[0] === ';' ? 'semicolons' : 'tabs'} and no comma`, span: at(file, L(0), other.index + 1), help: 'export the file as CSV with commas between cells and a decimal point in numbers (RFC 4180)' }]);
  }
  const byTag = new Map(model.instruments.map((d) => [d.tag, d]));
  // Unit row: a second line whose first cell is not a timestamp and that holds no reading (a
  // number other than the unit `1`), with its first cell empty or some unit given. A first row
  // of readings whose timestamp is bad or missing stays a row (said invalid in its place).
  let unitRow: string[] | undefined;
  let first = 1;
  if (lines.length > 1) {
    const second = splitCsvLine(lines[1]).map((s) => s.trim());
    const rest = second.slice(1);
    const holdsReading = rest.some((c) => c !== '1' && NUMBER.test(c));
    if ((second[0] === '' || parseTime(second[0]) === undefined) && !holdsReading && (second[0] === '' || rest.some((c) => c !== ''))) {
      unitRow = second;
      first = 2;
    }
  }
  const columns: HistorianColumn[] = [];
  const ignored: string[] = [];
  const seen = new Map<string, number>();
  const knownNames: string[] = [];
  for (const d of model.instruments) {
    if (d.kind === 'analyzer') for (const k of d.components!) knownNames.push(`${d.tag}.${model.ids[k]}`);
    else knownNames.push(d.tag);
  }
  for (let c = 1; c < head.length; c++) {
    const name = head[c];
    const col = columnOf(lines[0], c);
    if (name === '') {
      diags.push({ severity: 'error', message: `\`${file}\`: column ${c + 1} has no name`, span: at(file, L(0), col), help: 'name every column by its tag, e.g. `FI-101` or `AI-205.H2`' });
      continue;
    }
    let tag = name;
    let component: number | undefined;
    let decl = byTag.get(name);
    if (!decl) {
      const dot = name.lastIndexOf('.');
      const t = dot > 0 ? name.slice(0, dot) : '';
      const dd = byTag.get(t);
      if (dd && dd.kind === 'analyzer') {
        const k = model.index.get(name.slice(dot + 1));
        if (k === undefined || !dd.components!.includes(k)) {
          diags.push({ severity: 'error', message: `\`${file}\`: column \`${name}\`: analyzer \`${t}\` does not read \`${name.slice(dot + 1)}\``, span: at(file, L(0), col, name.length), help: `it reads: ${dd.components!.map((i) => model.ids[i]).join(', ')}` });
          continue;
        }
        decl = dd;
        tag = t;
        component = k;
      }
    } else if (decl.kind === 'analyzer') {
      diags.push({ severity: 'error', message: `\`${file}\`: column \`${name}\` is an analyzer: give one column per component`, span: at(file, L(0), col, name.length), help: `name them ${decl.components!.map((i) => `\`${name}.${model.ids[i]}\``).join(', ')}` });
      continue;
    }
    if (!decl) {
      const near = didYouMean(name, knownNames);
      if (near) diags.push({ severity: 'error', message: `\`${file}\`: column \`${name}\` is not an instrument of the flowsheet`, span: at(file, L(0), col, name.length), help: near });
      else ignored.push(name);
      continue;
    }
    if (seen.has(name)) {
      diags.push({ severity: 'error', message: `\`${file}\`: column \`${name}\` is given twice (columns ${seen.get(name)! + 1} and ${c + 1})`, span: at(file, L(0), col, name.length), help: 'keep one of them' });
      continue;
    }
    seen.set(name, c);
    const given = unitRow?.[c]?.trim();
    const unit = given || decl.unit || (decl.kind === 'analyzer' ? '' : undefined);
    if (unit === undefined) {
      diags.push({ severity: 'error', message: `\`${file}\`: column \`${name}\` has no unit`, span: at(file, L(0), col, name.length), help: `add a second line with the unit of each column, or \`unit: ${decl.kind === 'meter' ? 'm3/h' : decl.kind === 'mass' ? 't/h' : decl.kind === 'pressure' ? 'barg' : decl.kind === 'temperature' ? 'degC' : decl.kind === 'standard' ? 'Nm3/h' : 'kmol/h'}\` to instrument \`${tag}\`` });
      continue;
    }
    const conv = linearUnit(decl, unit, model);
    if ('error' in conv) {
      diags.push({ severity: 'error', message: `\`${file}\`: the unit of column \`${name}\`: ${conv.error}`, span: given ? at(file, L(1), columnOf(lines[1], c), unit.length || 1) : decl.span, help: conv.help });
      continue;
    }
    columns.push({ index: c, tag, component, unit, scale: conv.scale, offset: conv.offset, reference: conv.reference });
  }
  for (const name of knownNames) {
    if (!seen.has(name) && !diags.some((d) => d.message.includes(`\`${name}\``))) {
      const tag = name.includes('.') && !byTag.has(name) ? name.slice(0, name.lastIndexOf('.')) : name;
      diags.push({ severity: 'error', message: `\`${file}\` has no column \`${name}\` for instrument \`${tag}\``, span: at(file, L(0), 1, lines[0].length || 1), help: `add the column, or remove \`${tag}\` from \`instruments:\`` });
    }
  }
  if (diags.length) throw new InputError(diags);
  const rows: HistorianRow[] = [];
  for (let k = first; k < lines.length; k++) {
    const line = lines[k];
    if (line.trim() === '' || line.startsWith('#')) continue;
    const cells = splitCsvLine(line);
    const timestamp = cells[0].trim();
    rows.push({ line: L(k), timestamp, time: parseTime(timestamp), cells, text: line });
  }
  if (rows.length === 0) {
    throw new InputError([{ severity: 'error', message: `\`${file}\` has no rows of readings, only its column line${unitRow ? ' and unit line' : ''}`, span: at(file, L(first - 1)), help: 'export the period to reconcile: one row per timestamp under the column line' }]);
  }
  // A repeated instant (a doubled row, overlapping exports, local time at a daylight-saving
  // change) or a step back in time is said in its row; the row is still reconciled.
  const firstAt = new Map<number, number>();
  let last: HistorianRow | undefined;
  for (const row of rows) {
    if (row.time === undefined) continue;
    const seen = firstAt.get(row.time);
    if (seen !== undefined) row.sameAs = seen;
    else {
      firstAt.set(row.time, row.line);
      if (last && row.time < last.time!) row.before = last.line;
    }
    last = row;
  }
  return { file, columns, rows, ignored, frozen, width: head.length };
}

/** SI = scale * value + offset for a unit of an instrument's dimension. */
function linearUnit(d: InstrumentDecl, unit: string, model: Model): { scale: number; offset: number; reference?: StandardRef } | { error: string; help?: string } {
  if (d.kind === 'analyzer') {
    if (unit === '' || unit === '1' || unit === 'mol/mol') return { scale: 1, offset: 0 };
    try {
      return { scale: parseQuantity(`1 ${unit}`, 'dimensionless').value, offset: 0 };
    } catch (e) {
      if (e instanceof UnitError) return { error: e.message, help: 'an analyzer column is a mole fraction: leave the unit empty, or write `%` or `ppm`' };
      throw e;
    }
  }
  const dim = readingDimension(d.kind);
  const ctx = { atmosphere: model.thermo.atmosphere, standards: model.thermo.standards as Map<string, never> };
  try {
    const dims = d.kind === 'standard' && d.reference ? (['standardFlow', 'volumeFlow'] as const) : [dim];
    const one = parseQuantity(`1 ${unit}`, dims, ctx);
    const zero = parseQuantity(`0 ${unit}`, dims, ctx);
    const reference = one.standard ?? d.reference;
    if (d.kind === 'standard' && one.standard && d.reference && one.standard.name !== d.reference.name) {
      return { error: `\`${unit}\` is at reference \`${one.standard.name}\`, but \`${d.tag}\` reads at \`${d.reference.name}\``, help: `write the column in the unit of its reference` };
    }
    return { scale: one.value - zero.value, offset: zero.value, reference };
  } catch (e) {
    if (e instanceof UnitError) return { error: e.message, help: e.help };
    throw e;
  }
}

/**
 * For each row, the tags left out because they are frozen: the same value as in the
 * `frozen - 1` rows before it (rows whose cell is empty break a run; rows of the wrong width are
 * passed over).
 */
export function frozenTags(h: Historian): Map<number, Map<string, string>> {
  const out = new Map<number, Map<string, string>>();
  if (!(h.frozen >= 2)) return out;
  for (const c of h.columns) {
    let run = 0;
    let last = '';
    h.rows.forEach((row, r) => {
      // A row whose cells cannot be matched to their columns (invalid) neither counts nor breaks a run.
      if (row.cells.length !== h.width) return;
      const v = (row.cells[c.index] ?? '').trim();
      if (v === '') {
        run = 0;
        last = '';
        return;
      }
      if (v === last) run++;
      else {
        run = 1;
        last = v;
      }
      if (run >= h.frozen) {
        let m = out.get(r);
        if (!m) out.set(r, (m = new Map()));
        m.set(c.component === undefined ? c.tag : `${c.tag}#${c.component}`, `frozen: the same value ${v} for ${run} rows running`);
      }
    });
  }
  return out;
}

/** One row as readings, with the tags left out and what is said about the row. */
export function rowInput(h: Historian, model: Model, r: number, frozen: Map<number, Map<string, string>>): { input: RowInput; said: string[]; invalid?: string } {
  const row = h.rows[r];
  const said: string[] = [];
  if (row.time === undefined) {
    return { input: { readings: new Map() }, said, invalid: `${h.file}:${row.line}:1: the timestamp \`${row.timestamp}\` is not an ISO 8601 date and time (e.g. 2024-01-01T00:00Z)` };
  }
  // A row with more or fewer fields than the column line cannot say which cell is whose (an
  // unquoted decimal comma, a dropped cell): none of its readings is used.
  if (row.cells.length !== h.width) {
    return { input: { readings: new Map() }, said, invalid: `${h.file}:${row.line}:1: the row has ${row.cells.length} fields, the column line ${h.width}: its cells cannot be matched to their columns (quote a cell that holds a comma, e.g. a decimal comma: "12,5")` };
  }
  if (row.sameAs !== undefined) said.push(`timestamp: the same instant as line ${row.sameAs} (a doubled row, or local time at a daylight-saving change?)`);
  else if (row.before !== undefined) said.push(`timestamp: earlier than line ${row.before}, the row before it`);
  const readings = new Map<string, RowReading>();
  const leftOut = new Map<string, string>();
  const fz = frozen.get(r);
  const n = model.ids.length;
  const where = `${h.file}:${row.line}`;
  const labelOf = (c: HistorianColumn) => (c.component === undefined ? c.tag : `${c.tag}.${model.ids[c.component]}`);
  for (const c of h.columns) {
    const cell = row.cells[c.index];
    const raw = cell === undefined ? '' : cell.trim();
    if (raw === '') {
      said.push(`${labelOf(c)}: no reading (empty cell)`);
      continue;
    }
    const v = Number(raw);
    if (!NUMBER.test(raw) || !Number.isFinite(v)) {
      said.push(`${labelOf(c)}: left out: \`${raw}\` at ${h.file}:${row.line}:${columnOf(row.text, c.index)} is not a number`);
      if (c.component === undefined) leftOut.set(c.tag, `not a number (\`${raw}\`)`);
      continue;
    }
    const frozenWhy = fz?.get(c.component === undefined ? c.tag : `${c.tag}#${c.component}`);
    if (frozenWhy) {
      said.push(`${labelOf(c)}: left out: ${frozenWhy}`);
      if (c.component === undefined) leftOut.set(c.tag, frozenWhy);
      continue;
    }
    const si = c.scale * v + c.offset;
    if (c.component === undefined) readings.set(c.tag, { value: si, reference: c.reference, where });
    else {
      let rr = readings.get(c.tag);
      if (!rr) readings.set(c.tag, (rr = { fractions: new Float64Array(n).fill(Number.NaN), where }));
      rr.fractions![c.component] = si;
    }
  }
  return { input: { readings, leftOut }, said };
}

/** A decimal number as a historian writes it (no hexadecimal, no Infinity, no blanks). */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

