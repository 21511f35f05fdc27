/**
 * Joins the outputs of the shards of one sweep into the output the full run would have
 * written, byte for byte: the full run's header, then every row in the full run's order.
 * Refuses shards of different sweeps, a shard given twice or missing, a point missing or
 * doubled, and a shard file that was cut short.
 */
import { InputError, type Diagnostic } from '../diagnostics.js';
import { blocksOf, GridShape } from './grid.js';
import { headerLines, parseHeader, parseRow, type SweepHeader } from './records.js';
import { parseShard, shardBlocks } from './shard.js';

export interface ShardFile {
  path: string;
  text: string;
}

interface Parsed {
  path: string;
  header: SweepHeader;
  headText: string;
  rows: string[];
}

const MAX_LISTED = 8;

function list(points: number[]): string {
  const head = points.slice(0, MAX_LISTED).join(', ');
  return points.length > MAX_LISTED ? `${head} and ${points.length - MAX_LISTED} more` : head;
}

export function mergeShards(files: readonly ShardFile[]): string {
  const diags: Diagnostic[] = [];
  const bad = (message: string, help?: string) => diags.push({ severity: 'error', message, help });
  if (files.length === 0) throw new InputError([{ severity: 'error', message: 'nothing to merge', help: 'give the output files of every shard, e.g. `loopclose merge part-*.csv --out sweep.csv`' }]);
  const parsed: Parsed[] = [];
  for (const f of files) {
    const lines = f.text.split('\n');
    const first = parseHeader(lines.slice(0, 4));
    if (!first) {
      bad(`\`${f.path}\` is not a sweep output of loopclose (its first line is not a sweep header)`);
      continue;
    }
    const need = headerLines(first.format);
    if (!f.text.endsWith('\n')) {
      bad(`\`${f.path}\` ends with a partial line: its shard did not finish`, `run that shard's command again with --resume, then merge`);
      continue;
    }
    parsed.push({ path: f.path, header: first, headText: lines.slice(0, need).join('\n') + '\n', rows: lines.slice(need, -1) });
  }
  if (diags.length) throw new InputError(diags);
  const ref = parsed[0];
  for (const p of parsed.slice(1)) {
    if (p.header.format !== ref.header.format) bad(`\`${p.path}\` is ${p.header.format === 'jsonl' ? 'JSON Lines' : 'CSV'} and \`${ref.path}\` is not`, 'merge the shards of one sweep, all written in one format');
    else if (p.header.digest !== ref.header.digest) {
      bad(`\`${p.path}\` and \`${ref.path}\` come from different sweeps (digests ${p.header.digest.slice(0, 12)} and ${ref.header.digest.slice(0, 12)})`,
        p.header.flowsheet !== ref.header.flowsheet ? 'the flowsheet file differs between them' : `the commands differ:\n    ${ref.header.command}\n    ${p.header.command}`);
    }
  }
  if (diags.length) throw new InputError(diags);
  const shards = parsed.map((p) => {
    try {
      return parseShard(p.header.shard);
    } catch {
      bad(`\`${p.path}\`: its header names no valid shard (\`${p.header.shard}\`)`);
      return { index: 0, count: 0 };
    }
  });
  if (diags.length) throw new InputError(diags);
  const count = shards[0].count;
  const byIndex = new Map<number, Parsed>();
  shards.forEach((s, k) => {
    if (s.count !== count) bad(`\`${parsed[k].path}\` is shard ${s.index}/${s.count}, but \`${ref.path}\` is one of ${count}`, 'merge the shards of one split');
    else if (byIndex.has(s.index)) bad(`shard ${s.index}/${count} is given twice: \`${byIndex.get(s.index)!.path}\` and \`${parsed[k].path}\``, 'give each shard once');
    else byIndex.set(s.index, parsed[k]);
  });
  const missingShards: number[] = [];
  for (let i = 1; i <= count; i++) if (!byIndex.has(i)) missingShards.push(i);
  if (missingShards.length) bad(`shard${missingShards.length > 1 ? 's' : ''} ${missingShards.map((i) => `${i}/${count}`).join(', ')} ${missingShards.length > 1 ? 'are' : 'is'} missing`, 'run every shard and give all their files');
  if (diags.length) throw new InputError(diags);

  const h = ref.header;
  const shape = new GridShape(h.shape);
  if (shape.size !== h.points) throw new InputError([{ severity: 'error', message: `\`${ref.path}\`: the header's shape ${h.shape.join('x')} does not hold ${h.points} points` }]);
  const blocks = blocksOf(shape, h.block);
  const line = new Map<number, string>();
  const from = new Map<number, string>();
  for (const [i, p] of byIndex) {
    const expected = new Set<number>();
    for (const b of shardBlocks(blocks, { index: i, count })) for (const pt of b) expected.add(pt);
    const missing = new Set(expected);
    p.rows.forEach((text, k) => {
      const r = parseRow(h.format, text, h.inputs.length);
      if (!r) {
        bad(`\`${p.path}\` line ${headerLines(h.format) + k + 1} is not a row`, 'the file was edited; run the shard again');
        return;
      }
      if (line.has(r.point)) {
        bad(`point ${r.point} is written twice (${from.get(r.point) === p.path ? `in \`${p.path}\`` : `in \`${from.get(r.point)}\` and \`${p.path}\``})`);
        return;
      }
      if (!expected.has(r.point)) {
        bad(`\`${p.path}\` (shard ${i}/${count}) holds point ${r.point}, which belongs to another shard`);
        return;
      }
      missing.delete(r.point);
      line.set(r.point, text);
      from.set(r.point, p.path);
    });
    if (missing.size) {
      bad(`\`${p.path}\` (shard ${i}/${count}) lacks ${missing.size} of its ${expected.size} points: ${list([...missing].sort((a, b) => a - b))}`,
        `run that shard's command again with --resume`);
    }
  }
  if (diags.length) throw new InputError(diags);
  const out: string[] = [fullHeader(ref)];
  for (const b of blocks) for (const pt of b) out.push(`${line.get(pt)!}\n`);
  return out.join('');
}

/** The header the full run writes: the shard's own, with shard 1/1. */
function fullHeader(p: Parsed): string {
  if (p.header.format === 'jsonl') {
    const o = JSON.parse(p.headText) as Record<string, unknown>;
    o.shard = '1/1';
    return `${JSON.stringify(o)}\n`;
  }
  const [first, ...rest] = p.headText.split('\n');
  return [first.replace(/ shard=\d+\/\d+ /, ' shard=1/1 '), ...rest].join('\n');
}
