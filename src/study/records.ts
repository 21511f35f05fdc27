/**
 * The sweep output formats, CSV and JSON Lines: a header that identifies the run, then one
 * line per point.
 *
 * CSV:
 *   # loopclose sweep <digest> points=21 shape=21 block=50 shard=1/1 flowsheet=<sha256>
 *   # command: loopclose sweep flowsheets/methanol-pilot.yaml --grid '...' --report '...'
 *   # note: <caution>
 *   point,<input>[unit],...,status,<output>[unit],...,adjusted:<input>[unit],...,message
 *   1,0.15,converged,0.52,...,
 * JSON Lines:
 *   {"loopclose":"sweep","digest":...,"flowsheet":...,"command":...,"points":21,"shape":[21],
 *    "block":50,"shard":"1/1","inputs":[{"path":...,"unit":...}],"outputs":[...],"adjusted":[...],"note":...}
 *   {"point":1,"inputs":{...},"status":"converged","outputs":{...}}
 *
 * The digest is the sha256 of the flowsheet text's sha256 and the normalized command (the
 * options that decide the rows; not --out, --jobs, --shard, --resume). Numbers are written with
 * the shortest text that reads back to the same double; a missing value is empty (CSV) or null.
 */
import { createHash } from 'node:crypto';
import { CAUTION, csvLine } from '../report/format.js';
import type { Dimension } from '../units/index.js';
import type { Shard } from './shard.js';
import { pointInputs, type PointRow, type SweepContext, type SweepSpec } from './sweep.js';

export type SweepFormat = 'csv' | 'jsonl';

export interface Column {
  path: string;
  unit: string;
}

export interface SweepHeader {
  format: SweepFormat;
  digest: string;
  flowsheet: string;
  command: string;
  points: number;
  shape: number[];
  block: number;
  shard: string;
  inputs: Column[];
  outputs: Column[];
  adjusted: Column[];
}

const SI: Record<Dimension, string> = {
  pressure: 'Pa', temperature: 'K', molarFlow: 'mol/s', massFlow: 'kg/s', volumeFlow: 'm3/s', standardFlow: 'mol/s',
  molarMass: 'kg/mol', density: 'kg/m3', dimensionless: '1', time: 's', molarVolume: 'm3/mol', power: 'W', molarEnergy: 'J/mol', molarHeatCapacity: 'J/(mol K)',
};

export function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** A shell word: quoted unless it is plainly safe. */
function word(s: string): string {
  return /^[A-Za-z0-9._/:=,@%+-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`;
}

/** The options that decide the rows, in a fixed order and spelling. */
export function normalizedOptions(spec: SweepSpec, format: SweepFormat): string {
  const parts: string[] = [];
  for (const a of spec.axes) parts.push(a.kind === 'grid' ? '--grid' : '--values', word(a.text.replace(/\s+/g, ' ')));
  if (spec.report.length) parts.push('--report', word(spec.report.join(',')));
  for (const t of spec.targets) {
    parts.push('--target', word(t.text.trim()), '--by', word(t.by.trim()));
    if (t.within !== undefined) parts.push('--within', word(t.within.trim()));
  }
  if (spec.method) parts.push('--method', spec.method);
  if (spec.maxPasses !== undefined) parts.push('--max-passes', String(spec.maxPasses));
  if (spec.rtol !== undefined) parts.push('--tolerance', String(spec.rtol));
  parts.push('--block', String(spec.block));
  if (!spec.continuation) parts.push('--no-continuation');
  if (format === 'jsonl') parts.push('--jsonl');
  return parts.join(' ');
}

export function makeHeader(ctx: SweepContext, format: SweepFormat, shard: Shard): SweepHeader {
  const options = normalizedOptions(ctx.spec, format);
  const flowsheet = sha256(ctx.spec.text);
  return {
    format,
    digest: sha256(`${flowsheet}\n${options}`),
    flowsheet,
    command: `loopclose sweep ${word(ctx.spec.file)} ${options}`,
    points: ctx.shape.size,
    shape: [...ctx.shape.dims],
    block: ctx.spec.block,
    shard: `${shard.index}/${shard.count}`,
    inputs: ctx.axes.map((a) => ({ path: a.path, unit: a.unit || '1' })),
    outputs: ctx.outputs.map((o) => ({ path: o.path, unit: o.unit ?? SI[o.dimension] })),
    adjusted: ctx.targets.map((t) => ({ path: t.by.path, unit: t.by.dimension ? SI[t.by.dimension] : '1' })),
  };
}

const label = (c: Column) => (c.unit === '1' ? c.path : `${c.path}[${c.unit}]`);

/** The header text, ending in a newline. */
export function headerText(h: SweepHeader): string {
  if (h.format === 'jsonl') {
    return `${JSON.stringify({
      loopclose: 'sweep', digest: h.digest, flowsheet: h.flowsheet, command: h.command, points: h.points, shape: h.shape, block: h.block,
      shard: h.shard, inputs: h.inputs, outputs: h.outputs, adjusted: h.adjusted, note: CAUTION,
    })}\n`;
  }
  const columns = ['point', ...h.inputs.map(label), 'status', ...h.outputs.map(label), ...h.adjusted.map((c) => `adjusted:${label(c)}`), 'message'];
  return [
    `# loopclose sweep ${h.digest} points=${h.points} shape=${h.shape.join('x')} block=${h.block} shard=${h.shard} flowsheet=${h.flowsheet}`,
    `# command: ${h.command}`,
    `# note: ${CAUTION}`,
    csvLine(columns),
    '',
  ].join('\n');
}

/** Lines in the header of a format. */
export function headerLines(format: SweepFormat): number {
  return format === 'jsonl' ? 1 : 4;
}

/** Reads a header back (resume, merge); undefined when the text is not one. */
export function parseHeader(lines: readonly string[]): SweepHeader | undefined {
  const first = lines[0] ?? '';
  if (first.startsWith('{')) {
    let o: Record<string, unknown>;
    try {
      o = JSON.parse(first) as Record<string, unknown>;
    } catch {
      return undefined;
    }
    // A reconciliation over time (src/plant/rows.ts) writes the same layout under its own kind.
    if ((o.loopclose !== 'sweep' && o.loopclose !== 'reconcile') || typeof o.digest !== 'string') return undefined;
    return {
      format: 'jsonl', digest: o.digest, flowsheet: String(o.flowsheet), command: String(o.command), points: Number(o.points),
      shape: (o.shape as number[]) ?? [], block: Number(o.block), shard: String(o.shard),
      inputs: (o.inputs as Column[]) ?? [], outputs: (o.outputs as Column[]) ?? [], adjusted: (o.adjusted as Column[]) ?? [],
    };
  }
  const m = /^# loopclose (?:sweep|reconcile) ([0-9a-f]{64}) (.*)$/.exec(first);
  const c = /^# command: (.*)$/.exec(lines[1] ?? '');
  if (!m || !c || lines.length < 4) return undefined;
  const kv = new Map(m[2].split(' ').map((pair) => pair.split('=') as [string, string]));
  const cols = splitCsv(lines[3]);
  const nIn = cols.indexOf('status') - 1;
  const unlabel = (s: string): Column => {
    const b = /^(.*)\[([^\]]+)\]$/.exec(s);
    return b ? { path: b[1], unit: b[2] } : { path: s, unit: '1' };
  };
  const rest = cols.slice(nIn + 2, -1);
  return {
    format: 'csv', digest: m[1], flowsheet: kv.get('flowsheet') ?? '', command: c[1], points: Number(kv.get('points')),
    shape: (kv.get('shape') ?? '').split('x').map(Number), block: Number(kv.get('block')), shard: kv.get('shard') ?? '',
    inputs: cols.slice(1, nIn + 1).map(unlabel),
    outputs: rest.filter((s) => !s.startsWith('adjusted:')).map(unlabel),
    adjusted: rest.filter((s) => s.startsWith('adjusted:')).map((s) => unlabel(s.slice('adjusted:'.length))),
  };
}

/** One point's line, without the newline. */
export function rowText(ctx: Pick<SweepContext, 'axes' | 'shape'>, h: SweepHeader, row: PointRow): string {
  const inputs = pointInputs(ctx, row.point);
  if (h.format === 'jsonl') {
    const o: Record<string, unknown> = {
      point: row.point,
      inputs: Object.fromEntries(h.inputs.map((c, k) => [c.path, inputs[k]])),
      status: row.status,
      outputs: row.outputs ? Object.fromEntries(h.outputs.map((c, k) => [c.path, finite(row.outputs![k])])) : null,
    };
    if (h.adjusted.length) o.adjusted = row.adjusted ? Object.fromEntries(h.adjusted.map((c, k) => [c.path, finite(row.adjusted![k])])) : null;
    if (row.message !== undefined) o.message = row.message;
    return JSON.stringify(o);
  }
  const outs = h.outputs.map((_, k) => (row.outputs ? row.outputs[k] : ''));
  const adj = h.adjusted.map((_, k) => (row.adjusted ? row.adjusted[k] : ''));
  return csvLine([row.point, ...inputs, row.status, ...outs, ...adj, row.message ?? '']);
}

function finite(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/** Point number and status of a complete row line; undefined when it is not a row. */
export function parseRow(format: SweepFormat, line: string, inputs: number): { point: number; status: string } | undefined {
  if (format === 'jsonl') {
    try {
      const o = JSON.parse(line) as { point?: unknown; status?: unknown };
      return Number.isInteger(o.point) && typeof o.status === 'string' ? { point: o.point as number, status: o.status } : undefined;
    } catch {
      return undefined;
    }
  }
  const f = splitCsv(line);
  const point = Number(f[0]);
  const status = f[1 + inputs];
  return /^\d+$/.test(f[0] ?? '') && status ? { point, status } : undefined;
}

/** Splits one CSV line (RFC 4180 quoting, no embedded newlines: messages are one line). */
export function splitCsv(line: string): string[] {
  const out: string[] = [];
  let i = 0;
  while (i <= line.length) {
    if (line[i] === '"') {
      let s = '';
      i++;
      while (i < line.length) {
        if (line[i] === '"' && line[i + 1] === '"') {
          s += '"';
          i += 2;
        } else if (line[i] === '"') {
          i++;
          break;
        } else s += line[i++];
      }
      out.push(s);
      i++; // the comma
    } else {
      const j = line.indexOf(',', i);
      const end = j < 0 ? line.length : j;
      out.push(line.slice(i, end));
      i = end + 1;
    }
  }
  return out;
}
